package regiongraph

import (
	"flag"
	"os"
	"path/filepath"
	"testing"
)

var cityDataset = flag.String("city-dataset", "", "a dataset of the simulated city (narrows ingest --out DIR) for BenchmarkReadCityLayouts")

// BenchmarkReadCityLayouts reads a store of the simulated city (its real
// per-day size and spread of trips) in both layouts, whole and with the
// minimum trips and columns of a scan, and reports the bytes read and the
// edges kept. It needs -city-dataset (narrows simulate --size city, then
// narrows ingest --out DIR).
func BenchmarkReadCityLayouts(b *testing.B) {
	if *cityDataset == "" {
		b.Skip("give -city-dataset DIR, a dataset of the simulated city")
	}
	s, err := ReadFile(*cityDataset)
	if err != nil {
		b.Fatal(err)
	}
	file := filepath.Join(b.TempDir(), "graphs.parquet")
	if err := createFile(file, s.WriteParquet); err != nil {
		b.Fatal(err)
	}
	days := s.Days(0)
	rows := len(s.Edges)
	s = nil
	analysis := []string{"speed_median_mps", "detour_median", "duration_median_s", "distance_sum_m", "straight_sum_m", "duration_sum_s"}
	for _, bc := range []struct {
		name string
		opts ReadOptions
	}{
		{"all", ReadOptions{}},
		{"scan-min-trips-3", ReadOptions{MinTrips: 3, Columns: analysis}},
		{"scan-min-trips-3-one-day", ReadOptions{MinTrips: 3, Columns: analysis, From: days[len(days)/2].String(), To: days[len(days)/2].String()}},
	} {
		for _, layout := range []struct{ name, path string }{{"file", file}, {"dataset", *cityDataset}} {
			b.Run(bc.name+"/"+layout.name, func(b *testing.B) {
				var kept int
				var c *readCounter
				for b.Loop() {
					opts := bc.opts
					c = new(readCounter)
					opts.counter = c
					got, err := ReadFileOptions(layout.path, opts)
					if err != nil {
						b.Fatal(err)
					}
					kept = len(got.Edges)
				}
				b.ReportMetric(float64(rows)*float64(b.N)/b.Elapsed().Seconds(), "rows/s")
				b.ReportMetric(float64(kept), "edges")
				b.ReportMetric(float64(c.bytes.Load())/1e6, "MB-read")
			})
		}
	}
	_ = os.Remove(file)
}
