package report

import (
	"bytes"
	"fmt"
	"io"
	"testing"
	"time"

	"github.com/paulmach/orb"

	"narrows/partition"
	"narrows/patterns"
	"narrows/regiongraph"
)

// Fixture: a fictional town, "Lowmere", of 3 x 3 rectangular regions
// numbered row by row from the south-west:
//
//	7 8 9
//	4 5 6
//	1 2 3
//
// Each cell is 0.01 degree of longitude by 0.01 degree of latitude.
const (
	fxLon0, fxLat0, fxStep = 10.0, 50.0, 0.01
	// evilRoad is a border road name that a spreadsheet would take for a
	// formula if it were written as one.
	evilRoad = `=HYPERLINK("http://example.invalid/","click")`
	// suppressedSpeed is the median speed (m/s) of an edge with too few
	// trips; its km/h value must not appear anywhere in the workbook.
	suppressedSpeed = 7.77 // 27.972 km/h
)

func fxRegions() *partition.Partition {
	p := &partition.Partition{
		Source: "lowmere.osm.pbf",
		Bound:  orb.Bound{Min: orb.Point{fxLon0, fxLat0}, Max: orb.Point{fxLon0 + 3*fxStep, fxLat0 + 3*fxStep}},
	}
	for row := 0; row < 3; row++ {
		for col := 0; col < 3; col++ {
			id := row*3 + col + 1
			x0, y0 := fxLon0+float64(col)*fxStep, fxLat0+float64(row)*fxStep
			x1, y1 := x0+fxStep, y0+fxStep
			r := partition.Region{
				ID:          id,
				Polygon:     orb.Polygon{{{x0, y0}, {x1, y0}, {x1, y1}, {x0, y1}, {x0, y0}}}, // counter-clockwise
				AreaKM2:     0.7155 * 1.1119,
				PerimeterKM: 2 * (0.7155 + 1.1119),
				Point:       orb.Point{x0 + fxStep/2, y0 + fxStep/2},
				BorderRoads: []partition.BorderRoad{{Name: fmt.Sprintf("Ring Road %d", id), LengthKM: 1.1}, {Name: "Mill Lane", LengthKM: 0.4}},
			}
			if id == 5 {
				r.BorderRoads = []partition.BorderRoad{{Name: evilRoad, LengthKM: 0.9}}
			}
			for _, n := range [][2]int{{row - 1, col}, {row, col - 1}, {row, col + 1}, {row + 1, col}} {
				if n[0] >= 0 && n[0] < 3 && n[1] >= 0 && n[1] < 3 {
					r.Neighbours = append(r.Neighbours, partition.Neighbour{ID: n[0]*3 + n[1] + 1, SharedKM: 0.7})
				}
			}
			sortNeighbours(r.Neighbours)
			p.Regions = append(p.Regions, r)
		}
	}
	return p
}

func sortNeighbours(n []partition.Neighbour) {
	for i := 1; i < len(n); i++ {
		for j := i; j > 0 && n[j].ID < n[j-1].ID; j-- {
			n[j], n[j-1] = n[j-1], n[j]
		}
	}
}

// fxDays returns n consecutive days from start.
func fxDays(start string, n int) []string {
	t, err := time.Parse("2006-01-02", start)
	if err != nil {
		panic(err)
	}
	out := make([]string, n)
	for i := range out {
		out[i] = t.AddDate(0, 0, i).Format("2006-01-02")
	}
	return out
}

// fxEdge builds a finding edge with daily values of constant trips and
// speed on the given days (candidate on all of them).
func fxEdge(from, to int, trips int, speed, detour float64, days []string) patterns.FindingEdge {
	e := patterns.FindingEdge{From: from, To: to, TripsMedian: float64(trips), SpeedMedian: speed, DetourMedian: detour,
		ExtraKMPerDay: float64(trips) * 1.5, ExtraHoursPerDay: float64(trips) * 0.05}
	for _, d := range days {
		e.Daily = append(e.Daily, patterns.DailyValue{Day: d, Trips: trips, Speed: speed, Detour: detour, Candidate: true,
			DistanceSum: float64(trips) * 4000, StraightSum: float64(trips) * 2500, DurationSum: float64(trips) * 4000 / speed})
	}
	return e
}

func fxFinding(rank int, edges ...patterns.FindingEdge) patterns.Finding {
	f := patterns.Finding{Rank: rank, Edges: edges}
	seen := map[int]bool{}
	for i, e := range edges {
		if i > 0 {
			f.ID += "+"
		}
		f.ID += fmt.Sprintf("%d>%d", e.From, e.To)
		for _, id := range []int{e.From, e.To} {
			if !seen[id] {
				seen[id] = true
				f.Regions = append(f.Regions, id)
			}
		}
		f.ExtraKMPerDay += e.ExtraKMPerDay
		f.ExtraHoursPerDay += e.ExtraHoursPerDay
	}
	for i := 1; i < len(f.Regions); i++ {
		for j := i; j > 0 && f.Regions[j] < f.Regions[j-1]; j-- {
			f.Regions[j], f.Regions[j-1] = f.Regions[j-1], f.Regions[j]
		}
	}
	if len(edges) > 0 {
		for _, d := range edges[0].Daily {
			f.Days = append(f.Days, d.Day)
		}
	}
	return f
}

// fxScan builds a scan over days with the findings, their edges' daily
// values in EdgeDaily, one non-candidate edge 3>1 and a candidate count of
// 2 + day index mod 3 per day.
func fxScan(days []string, findings ...patterns.Finding) *patterns.Scan {
	s := &patterns.Scan{Options: patterns.ScanOptions{Support: 0.2}, Window: "am-peak", Days: days, EdgeDaily: map[patterns.EdgeKey][]patterns.DailyValue{}}
	for i := range days {
		s.CandidatesPerDay = append(s.CandidatesPerDay, 2+i%3)
	}
	for i := range findings {
		f := &findings[i]
		f.Share = float64(len(f.Days)) / float64(len(days))
		for _, e := range f.Edges {
			s.EdgeDaily[patterns.EdgeKey{From: e.From, To: e.To}] = e.Daily
		}
	}
	for _, d := range days {
		s.EdgeDaily[patterns.EdgeKey{From: 3, To: 1}] = append(s.EdgeDaily[patterns.EdgeKey{From: 3, To: 1}],
			patterns.DailyValue{Day: d, Trips: 30, Speed: 11, Detour: 1.2, DistanceSum: 30 * 3000, StraightSum: 30 * 2500, DurationSum: 30 * 3000 / 11.0})
	}
	s.Findings = findings
	return s
}

// Fixture figures the tests check against.
const (
	fxBeforeDays = 14
	fxAfterDays  = 14
)

// fxComparison has one assessment of each verdict:
//
//	worse     1>2       (before and after)
//	new       4>5+5>6   (after only)
//	unchanged 7>8       (before and after)
//	eased     2>5       (before and after; 4 trips a day: suppressed)
//	cleared   8>9       (before only; focus)
func fxComparison() *patterns.Comparison {
	before := fxDays("2026-03-02", fxBeforeDays)
	after := fxDays("2026-05-04", fxAfterDays)
	worseB := fxFinding(1, fxEdge(1, 2, 40, 5, 1.8, before[:10]))
	worseA := fxFinding(1, fxEdge(1, 2, 44, 4, 1.9, after[:12]))
	unchB := fxFinding(3, fxEdge(7, 8, 25, 6, 1.6, before[:8]))
	unchA := fxFinding(3, fxEdge(7, 8, 26, 6.1, 1.6, after[:8]))
	easedB := fxFinding(4, fxEdge(2, 5, 4, suppressedSpeed, 1.7, before[:7]))
	easedA := fxFinding(4, fxEdge(2, 5, 4, suppressedSpeed+1, 1.5, after[:6]))
	clearedB := fxFinding(2, fxEdge(8, 9, 30, 4.5, 2.1, before[:9]))
	newA := fxFinding(2, fxEdge(4, 5, 18, 5.5, 1.7, after[:5]), fxEdge(5, 6, 12, 5, 1.9, after[:5]))
	// A day with too few trips on an otherwise published edge.
	worseB.Edges[0].Daily[3].Trips = 3

	c := &patterns.Comparison{
		Before: fxScan(before, worseB, clearedB, unchB, easedB),
		After:  fxScan(after, worseA, newA, unchA, easedA),
		Alpha:  0.05,
		Counts: map[patterns.Verdict]int{},
		Network: patterns.NetworkChange{
			Trips:      patterns.Effect{Before: 4000, After: 3000, Raw: -1000, Relative: -0.25},
			TravelTime: patterns.Effect{Before: 600, After: 546, Raw: -54, Relative: -0.09},
			Speed:      patterns.Effect{Before: 8, After: 8.8, Raw: 0.8, Relative: 0.1},
		},
	}
	shift := func(b, a float64) patterns.Shift {
		return patterns.Shift{Before: []float64{b, b, b + 0.2}, After: []float64{a, a, a + 0.2}, U: 1, P: 0.004, PAdjusted: 0.01, Shift: a - b, Low: a - b - 0.3, High: a - b + 0.3}
	}
	// effects gives cost, travel time (s), speed and detour before and
	// after, with a group change of 2 %; the deciding changes as given.
	effects := func(costB, costA, timeB, timeA, speedB, speedA, detourB, detourA float64, cost, tt patterns.Change) [patterns.NumMeasures]patterns.Effect {
		var e [patterns.NumMeasures]patterns.Effect
		set := func(m patterns.Measure, b, a float64, ch patterns.Change) {
			e[m] = patterns.Effect{Before: b, After: a, Raw: a - b, Group: 0.02, Adjusted: shift(b, a), Relative: (a - b) / b,
				BeforeLow: 0.9 * b, BeforeHigh: 1.1 * b, AfterLow: 0.9 * a, AfterHigh: 1.1 * a}
			e[m].Adjusted.Change = ch
		}
		set(patterns.Cost, costB, costA, cost)
		set(patterns.TravelTime, timeB, timeA, tt)
		set(patterns.Speed, speedB, speedA, patterns.NoChange)
		set(patterns.Detour, detourB, detourA, patterns.NoChange)
		set(patterns.Trips, 40, 41, patterns.NoChange)
		set(patterns.ExtraKM, 30, 28, patterns.NoChange)
		return e
	}
	group := patterns.ComparisonGroup{Edges: []patterns.EdgeKey{{From: 1, To: 3}, {From: 3, To: 1}}, Band: 1.5}
	c.Assessments = []patterns.Assessment{
		{Finding: c.Before.Findings[0], Verdict: patterns.Worse, Basis: patterns.BasisTime, InBefore: true, InAfter: true, DaysBefore: 10, TotalBefore: 14, DaysAfter: 12, TotalAfter: 14,
			FisherP: 0.648, FisherPAdjusted: 0.81, Effects: effects(3, 3.4, 600, 700, 5, 4, 1.8, 1.9, patterns.NoChange, patterns.Up), Group: group, DaysWithTrips: [2]int{14, 14}, BarDays: [2]int{10, 12}},
		{Finding: c.After.Findings[1], Verdict: patterns.New, Basis: patterns.BasisCost, InAfter: true, DaysAfter: 5, TotalBefore: 14, TotalAfter: 14,
			FisherP: 0.041, FisherPAdjusted: 0.1, Effects: effects(1, 2, 500, 520, 6, 5.5, 1.6, 1.7, patterns.Up, patterns.NoChange), Group: group, DaysWithTrips: [2]int{14, 14}, BarDays: [2]int{2, 6}},
		{Finding: c.Before.Findings[2], Verdict: patterns.Unchanged, Basis: patterns.BasisNone, InBefore: true, InAfter: true, DaysBefore: 8, TotalBefore: 14, DaysAfter: 8, TotalAfter: 14,
			FisherP: 1, FisherPAdjusted: 1, Effects: effects(2, 2.1, 550, 540, 6, 6.1, 1.6, 1.6, patterns.NoChange, patterns.NoChange), DaysWithTrips: [2]int{14, 14}, BarDays: [2]int{8, 8}},
		{Finding: c.Before.Findings[3], Verdict: patterns.Eased, Basis: patterns.BasisCost, InBefore: true, InAfter: true, DaysBefore: 7, TotalBefore: 14, DaysAfter: 6, TotalAfter: 14,
			FisherP: 1, FisherPAdjusted: 1, Effects: effects(2, 1.4, 580, 500, suppressedSpeed, suppressedSpeed+1, 1.7, 1.5, patterns.Down, patterns.Down), Group: group, DaysWithTrips: [2]int{14, 14}, BarDays: [2]int{7, 6}},
		{Finding: c.Before.Findings[1], Verdict: patterns.Cleared, Basis: patterns.BasisBar, InBefore: true, DaysBefore: 9, TotalBefore: 14, TotalAfter: 14,
			FisherP: 0.00006, FisherPAdjusted: 0.003, Effects: effects(5, 2, 900, 600, 4.5, 6, 2.1, 1.4, patterns.Down, patterns.Down), Group: group, DaysWithTrips: [2]int{14, 14}, BarDays: [2]int{12, 1}, Focus: true},
	}
	for _, a := range c.Assessments {
		c.Counts[a.Verdict]++
	}
	return c
}

func fxInput() Input {
	return Input{
		Title:    "Lowmere link road: before and after",
		Area:     "Lowmere (fictional)",
		Inputs:   []regiongraph.Source{{Path: "trips-2026.csv", SHA256: "9f2c0c5b0f7e3a64d1a6c8e2b5f4d3c2a1b0f9e8d7c6b5a4f3e2d1c0b9a8f7e6", Rows: 12345}},
		Settings: [][2]string{{"support", "0.2"}, {"min-trips", "5"}, {"note", "+1 and -1 and @x and =2+2"}},
		Regions:  fxRegions(),
		Store: &regiongraph.Meta{RegionsSHA256: "ab12", TimeZone: "Europe/Lowmere", Windows: []regiongraph.Window{{Name: "am-peak", StartMinute: 420, EndMinute: 600}},
			Quality: regiongraph.Quality{Read: 12345, Used: 12000, Rejected: map[string]int64{"zero duration": 300, "outside area": 45}},
			Sources: []regiongraph.Source{{Path: "trips-2026.csv", SHA256: "9f2c", Rows: 12345}}},
		Comparison: fxComparison(),
		Version:    "0.1.0-test",
	}
}

func fxScanInput() Input {
	in := fxInput()
	in.Comparison = nil
	in.Scan = fxComparison().Before
	return in
}

// renderHTML renders v's HTML page.
func renderHTML(t *testing.T, v *view) []byte {
	t.Helper()
	var buf bytes.Buffer
	if err := v.html(&buf); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

// writer is one of the package's writers, by name.
type writer struct {
	name  string
	write func(io.Writer, Input) error
}

// writers are the package's writers, in the order a study writes its files.
func writers() []writer {
	return []writer{
		{"WriteWorkbook", WriteWorkbook},
		{"WriteRegionsGeoJSON", WriteRegionsGeoJSON},
		{"WriteFindingsGeoJSON", WriteFindingsGeoJSON},
		{"WriteHTML", WriteHTML},
	}
}

// writeAll writes every output of in to memory and returns their bytes in
// the order of writers.
func writeAll(in Input) ([][]byte, error) {
	out := make([][]byte, len(writers()))
	for i, w := range writers() {
		var buf bytes.Buffer
		if err := w.write(&buf, in); err != nil {
			return nil, fmt.Errorf("%s: %w", w.name, err)
		}
		out[i] = buf.Bytes()
	}
	return out, nil
}
