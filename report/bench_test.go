package report

import (
	"fmt"
	"math/rand"
	"testing"

	"github.com/paulmach/orb"

	"narrows/partition"
	"narrows/patterns"
)

// bigInput is a synthetic study of a side x side grid of regions with
// nFindings one-edge findings and nEdges candidate edges over days days in
// each of two periods.
func bigInput(side, nFindings, nEdges, days int) Input {
	rng := rand.New(rand.NewSource(1))
	p := &partition.Partition{Bound: orb.Bound{Min: orb.Point{10, 50}, Max: orb.Point{10 + float64(side)*0.005, 50 + float64(side)*0.005}}}
	for row := 0; row < side; row++ {
		for col := 0; col < side; col++ {
			x0, y0 := 10+float64(col)*0.005, 50+float64(row)*0.005
			p.Regions = append(p.Regions, partition.Region{ID: row*side + col + 1,
				Polygon: orb.Polygon{{{x0, y0}, {x0 + 0.005, y0}, {x0 + 0.005, y0 + 0.005}, {x0, y0 + 0.005}, {x0, y0}}},
				AreaKM2: 0.2, PerimeterKM: 1.8, Point: orb.Point{x0 + 0.0025, y0 + 0.0025},
				BorderRoads: []partition.BorderRoad{{Name: fmt.Sprintf("Road %d", row), LengthKM: 0.5}}})
		}
	}
	n := side * side
	mk := func(start string) *patterns.Scan {
		ds := fxDays(start, days)
		s := &patterns.Scan{Options: patterns.ScanOptions{Support: 0.2}, Days: ds, EdgeDaily: map[patterns.EdgeKey][]patterns.DailyValue{}}
		for range ds {
			s.CandidatesPerDay = append(s.CandidatesPerDay, rng.Intn(40))
		}
		for len(s.EdgeDaily) < nEdges {
			k := patterns.EdgeKey{From: 1 + rng.Intn(n), To: 1 + rng.Intn(n)}
			if k.From == k.To {
				continue
			}
			var dv []patterns.DailyValue
			for _, d := range ds {
				tr := 2 + rng.Intn(60)
				dv = append(dv, patterns.DailyValue{Day: d, Trips: tr, Speed: 3 + 10*rng.Float64(), Detour: 1 + rng.Float64(), Candidate: rng.Intn(4) == 0,
					DistanceSum: float64(tr) * 3000, StraightSum: float64(tr) * 2000})
			}
			s.EdgeDaily[k] = dv
		}
		keys := sortedEdgeKeys(s.EdgeDaily)
		for i := 0; i < nFindings; i++ {
			k := keys[i]
			e := patterns.FindingEdge{From: k.From, To: k.To, TripsMedian: 20, SpeedMedian: 5, DetourMedian: 1.6, ExtraKMPerDay: 30, ExtraHoursPerDay: 1, Daily: s.EdgeDaily[k]}
			f := fxFinding(i+1, e)
			f.Days = ds[:days/2]
			f.Share = 0.5
			s.Findings = append(s.Findings, f)
		}
		return s
	}
	c := &patterns.Comparison{Before: mk("2026-01-05"), After: mk("2026-06-01"), Counts: map[patterns.Verdict]int{}}
	for i, f := range c.Before.Findings {
		vd := verdictOrder[i%len(verdictOrder)]
		c.Assessments = append(c.Assessments, patterns.Assessment{Finding: f, Verdict: vd, InBefore: true, InAfter: vd != patterns.Cleared,
			DaysBefore: days / 2, TotalBefore: days, TotalAfter: days, FisherP: 0.5, FisherPAdjusted: 0.6})
	}
	return Input{Title: "Synthetic", Regions: p, Comparison: c}
}

// BenchmarkWriteAll writes every output of 400 regions, 200 findings,
// 2 x 2000 candidate edges over 2 x 60 days (240 000 edge-day rows).
func BenchmarkWriteAll(b *testing.B) {
	in := bigInput(20, 200, 2000, 60)
	b.ResetTimer()
	var out [][]byte
	for i := 0; i < b.N; i++ {
		var err error
		if out, err = writeAll(in); err != nil {
			b.Fatal(err)
		}
	}
	b.StopTimer()
	b.ReportMetric(float64(len(out[0]))/1e6, "xlsx-MB")
}

// BenchmarkWriteAllTypical writes every output of 289 regions, 50
// findings, 2 x 300 candidate edges over 2 x 60 days (36 000 edge-day rows).
func BenchmarkWriteAllTypical(b *testing.B) {
	in := bigInput(17, 50, 300, 60)
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := writeAll(in); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkSVG(b *testing.B) {
	v, err := newView(bigInput(20, 200, 400, 10))
	if err != nil {
		b.Fatal(err)
	}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		_ = v.svg()
	}
}

func BenchmarkPNG(b *testing.B) {
	v, err := newView(bigInput(20, 200, 400, 10))
	if err != nil {
		b.Fatal(err)
	}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := v.png(); err != nil {
			b.Fatal(err)
		}
	}
}
