package patterns

import (
	"context"
	"testing"
)

// BenchmarkScanStoreYearWorst scans the year store of BenchmarkScanStoreYear
// (a 2,000-region city) at wide settings: a large skyband, a low support
// and large groups. The target is a whole scan under 10 s.
func BenchmarkScanStoreYearWorst(b *testing.B) {
	store := scanTestStore(6, 45, 365, 4200, []scanPlant{scanPlantA, scanPlantB})
	for _, c := range []struct {
		name             string
		k                int
		support          float64
		maxEdges, visits int
	}{
		{"k10-support0.05", 10, 0.05, 6, 2_000_000},
		{"k30-support0.02-edges20", 30, 0.02, 20, 2_000_000},
	} {
		b.Run(c.name, func(b *testing.B) {
			opts := DefaultScanOptions()
			opts.Skyline.K, opts.Support, opts.MaxGroupEdges, opts.MaxGroupVisits = c.k, c.support, c.maxEdges, c.visits
			var scan *Scan
			for b.Loop() {
				var err error
				if scan, err = ScanStore(context.Background(), store, opts); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(len(scan.Findings)), "findings")
			b.ReportMetric(float64(scan.GroupVisits), "visits")
		})
	}
}
