package patterns

import (
	"context"
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"
	"time"

	"narrows/patterns/groups"
	"narrows/regiongraph"
)

// scanPlant is a recurring weak group put into a synthetic store: every edge
// of it has the same trips and per-trip straight-line distance, detour and
// speed on the days it is present.
type scanPlant struct {
	edges    []EdgeKey
	trips    int
	straight float64 // metres per trip
	detour   float64
	speed    float64 // m/s
	present  func(day int) bool
}

// testDay returns the day written s (YYYY-MM-DD), which must be one.
func testDay(s string) regiongraph.Day {
	d, err := regiongraph.ParseDay(s)
	if err != nil {
		panic(err)
	}
	return d
}

// testWindowIndex returns the index of window "am" or "pm" in the test
// stores' windows, which list am first and pm second.
func testWindowIndex(name string) regiongraph.WindowIndex {
	i := slices.Index([]string{"am", "pm"}, name)
	if i < 0 {
		panic("no test window " + name)
	}
	return regiongraph.WindowIndex(i)
}

func scanEdge(day, window string, key EdgeKey, trips int, straight, detour, speed float64) regiongraph.Edge {
	distance := straight * detour
	return regiongraph.Edge{
		Day: testDay(day), Window: testWindowIndex(window), From: key.From, To: key.To, Trips: trips,
		SpeedP25: speed, SpeedMedian: speed, SpeedP75: speed,
		DetourP25: detour, DetourMedian: detour, DetourP75: detour,
		DistanceMedian: distance, DurationMedian: distance / speed,
		DistanceSum: float64(trips) * distance, StraightSum: float64(trips) * straight,
		DurationSum: float64(trips) * distance / speed,
	}
}

// scanTestStore builds a store of nDays days from Monday 2025-01-06 with
// one window "am" over a side x side grid of regions: perDay random edges
// a day between nearby regions (heavy-tailed trips, ordinary speeds and
// detours) plus the plants, and one edge a day in window "pm".
func scanTestStore(seed uint64, side, nDays, perDay int, plants []scanPlant) *regiongraph.Store {
	rng := rand.New(rand.NewPCG(seed, 3))
	store := &regiongraph.Store{Meta: regiongraph.Meta{
		TimeZone: "UTC",
		Windows:  []regiongraph.Window{{Name: "am", StartMinute: 420, EndMinute: 600}, {Name: "pm", StartMinute: 960, EndMinute: 1140}},
	}}
	planted := map[EdgeKey]bool{}
	for _, p := range plants {
		for _, e := range p.edges {
			planted[e] = true
		}
	}
	start := time.Date(2025, 1, 6, 0, 0, 0, 0, time.UTC)
	for d := range nDays {
		day := start.AddDate(0, 0, d).Format(dayLayout)
		seen := map[EdgeKey]bool{}
		var edges []regiongraph.Edge
		for _, p := range plants {
			if p.present(d) {
				for _, e := range p.edges {
					edges = append(edges, scanEdge(day, "am", e, p.trips, p.straight, p.detour, p.speed))
					seen[e] = true
				}
			}
		}
		for range perDay {
			from := rng.IntN(side * side)
			x, y := from%side+rng.IntN(5)-2, from/side+rng.IntN(5)-2
			if x < 0 || y < 0 || x >= side || y >= side {
				continue
			}
			key := EdgeKey{From: from, To: y*side + x}
			if key.From == key.To || seen[key] || planted[key] {
				continue
			}
			seen[key] = true
			trips := 1 + int(math.Exp(rng.ExpFloat64()*1.3))
			edges = append(edges, scanEdge(day, "am", key, trips,
				500+4500*rng.Float64(), 1.05+0.15*rng.ExpFloat64(), 7+7*rng.Float64()))
		}
		slices.SortFunc(edges, compareEdgePairs)
		store.Edges = append(store.Edges, edges...)
		// Every day has data in the other window, so no day is missing
		// (with enough trips not to be left out by the scan's minimum).
		store.Edges = append(store.Edges, scanEdge(day, "pm", EdgeKey{From: 0, To: 1}, 20, 1000, 1.2, 10))
	}
	return store
}

// Two planted weaknesses: A, a connected pair of busy, very slow and
// roundabout edges on 80 % of days, and B, a single edge, slower still but
// with fewer trips and shorter trips, on half of the days.
var (
	scanPlantA = scanPlant{edges: []EdgeKey{{From: 10, To: 11}, {From: 11, To: 12}}, trips: 80, straight: 2000, detour: 2.2, speed: 3,
		present: func(d int) bool { return d%5 != 4 }}
	scanPlantB = scanPlant{edges: []EdgeKey{{From: 300, To: 301}}, trips: 40, straight: 1000, detour: 1.6, speed: 2.5,
		present: func(d int) bool { return d%2 == 0 }}
)

func TestScanStorePlanted(t *testing.T) {
	store := scanTestStore(1, 25, 30, 600, []scanPlant{scanPlantA, scanPlantB})
	opts := DefaultScanOptions()
	scan, err := ScanStore(context.Background(), store, opts)
	if err != nil {
		t.Fatal(err)
	}
	if len(scan.Days) != 30 || scan.Days[0] != "2025-01-06" || scan.Days[29] != "2025-02-04" {
		t.Fatalf("analysed days = %d, %v..%v; want 30 from 2025-01-06 to 2025-02-04", len(scan.Days), scan.Days[0], scan.Days[len(scan.Days)-1])
	}
	if scan.Window != "am" || scan.Options.From != "2025-01-06" || scan.Options.To != "2025-02-04" {
		t.Errorf("resolved window %q, from %q, to %q", scan.Window, scan.Options.From, scan.Options.To)
	}
	if len(scan.Findings) < 2 {
		t.Fatalf("%d findings, want at least the two planted", len(scan.Findings))
	}
	// Expected costs by hand, per edge and day: extra km = trips x
	// straight x (detour - 1); extra hours = trips x (straight x detour /
	// speed - straight / (30 km/h)).
	ref := 30 / 3.6
	cases := []struct {
		rank  int
		id    string
		p     scanPlant
		share float64
	}{
		{1, "10>11+11>12", scanPlantA, 24.0 / 30},
		{2, "300>301", scanPlantB, 15.0 / 30},
	}
	for _, c := range cases {
		f := scan.Findings[c.rank-1]
		if f.ID != c.id || f.Rank != c.rank {
			t.Errorf("rank %d: finding %s (rank %d), want %s", c.rank, f.ID, f.Rank, c.id)
			continue
		}
		if f.Share != c.share {
			t.Errorf("%s: share %v, want %v", f.ID, f.Share, c.share)
		}
		for i, day := range f.Days {
			if want := scan.Days[slices.Index(scan.Days, day)]; want != day || !c.p.present(slices.Index(scan.Days, day)) {
				t.Errorf("%s: day %d %s is not a planted day", f.ID, i, day)
			}
		}
		tr := float64(c.p.trips)
		km := tr * c.p.straight * (c.p.detour - 1) / 1000
		hours := tr * (c.p.straight*c.p.detour/c.p.speed - c.p.straight/ref) / 3600
		// Per day of the period: each edge's weak-day cost x its share.
		n := float64(len(c.p.edges)) * c.share
		if math.Abs(f.ExtraKMPerDay-n*km) > 1e-9*km || math.Abs(f.ExtraHoursPerDay-n*hours) > 1e-9*hours {
			t.Errorf("%s: extra %v km, %v h a day; want %v km, %v h", f.ID, f.ExtraKMPerDay, f.ExtraHoursPerDay, n*km, n*hours)
		}
		for _, e := range f.Edges {
			if e.TripsMedian != tr || e.SpeedMedian != c.p.speed || e.DetourMedian != c.p.detour {
				t.Errorf("%s: edge %d>%d medians trips %v speed %v detour %v", f.ID, e.From, e.To, e.TripsMedian, e.SpeedMedian, e.DetourMedian)
			}
			if len(e.Daily) != len(f.Days) { // planted edges have trips only on their days
				t.Errorf("%s: edge %d>%d has %d daily values, want %d", f.ID, e.From, e.To, len(e.Daily), len(f.Days))
			}
		}
	}
	for d, keys := range scan.DayCandidates {
		if len(keys) != scan.CandidatesPerDay[d] || !slices.IsSortedFunc(keys, groups.CompareEdges) {
			t.Errorf("day %d: %d candidates, CandidatesPerDay %d, sorted %v", d, len(keys), scan.CandidatesPerDay[d], slices.IsSortedFunc(keys, groups.CompareEdges))
		}
	}
	for key, daily := range scan.EdgeDaily {
		candidate := false
		for i, v := range daily {
			candidate = candidate || v.Candidate
			if i > 0 && daily[i-1].Day >= v.Day {
				t.Fatalf("EdgeDaily[%v] not ordered by day", key)
			}
		}
		if !candidate {
			t.Errorf("EdgeDaily[%v] holds an edge never a candidate", key)
		}
	}
}

func TestScanStoreDaySelection(t *testing.T) {
	// 14 days from Monday 2025-01-06; day 3 (Thursday 2025-01-09) has no
	// data at all, day 4 (Friday 2025-01-10) has pm edges only.
	store := scanTestStore(2, 20, 14, 200, []scanPlant{scanPlantA})
	var kept []regiongraph.Edge
	for _, e := range store.Edges {
		switch e.Day.String() {
		case "2025-01-09":
			continue
		case "2025-01-10":
			e.Window = testWindowIndex("pm")
		}
		kept = append(kept, e)
	}
	store.Edges = kept
	dayList := func(s *Scan) string { return strings.Join(s.Days, " ") }
	cases := []struct {
		name string
		opts func(*ScanOptions)
		days string
	}{
		{"range", func(o *ScanOptions) { o.From, o.To = "2025-01-08", "2025-01-11" },
			"2025-01-08 2025-01-10 2025-01-11"},
		{"weekends", func(o *ScanOptions) { o.Days = Weekends },
			"2025-01-11 2025-01-12 2025-01-18 2025-01-19"},
		{"weekdays with exclusions", func(o *ScanOptions) {
			o.Days, o.To, o.Exclude = Weekdays, "2025-01-13", []string{"2025-01-07", "2025-01-12", "2025-01-13"}
		}, "2025-01-06 2025-01-08 2025-01-10"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			opts := DefaultScanOptions()
			c.opts(&opts)
			scan, err := ScanStore(context.Background(), store, opts)
			if err != nil {
				t.Fatal(err)
			}
			if got := dayList(scan); got != c.days {
				t.Errorf("days %s, want %s", got, c.days)
			}
			// The pm-only Friday is analysed but has no am candidates.
			if i := slices.Index(scan.Days, "2025-01-10"); i >= 0 && scan.CandidatesPerDay[i] != 0 {
				t.Errorf("2025-01-10 has %d am candidates, want 0", scan.CandidatesPerDay[i])
			}
		})
	}
	// Share counts the pm-only day: scanPlant A is present on days 0-3 and 5-8
	// of the range (day 4 emptied), 2025-01-06..2025-01-10 has 4 analysed
	// days (no data on the 9th), of which A shows on 3.
	opts := DefaultScanOptions()
	opts.From, opts.To = "2025-01-06", "2025-01-10"
	scan, err := ScanStore(context.Background(), store, opts)
	if err != nil {
		t.Fatal(err)
	}
	if len(scan.Findings) == 0 || scan.Findings[0].ID != "10>11+11>12" || scan.Findings[0].Share != 0.75 {
		t.Errorf("findings %v, want 10>11+11>12 first with share 0.75", scan.Findings)
	}
}

func TestScanStoreErrors(t *testing.T) {
	store := scanTestStore(3, 10, 5, 50, nil)
	windowless := *store // edges name their windows by index in the store's
	windowless.Meta.Windows = nil
	dup := *store
	dup.Edges = append(slices.Clone(store.Edges), store.Edges[0]) // out of order too
	cases := []struct {
		name  string
		store *regiongraph.Store
		opts  func(*ScanOptions)
		want  string // part of the error
	}{
		{"nil store", nil, func(*ScanOptions) {}, "no store"},
		{"empty store", &regiongraph.Store{}, func(*ScanOptions) {}, "no time windows"},
		{"unknown window", store, func(o *ScanOptions) { o.Window = "night" }, `window "night" is not in the store (windows: am, pm)`},
		{"from after to", store, func(o *ScanOptions) { o.From, o.To = "2025-01-08", "2025-01-07" }, "is after"},
		{"bad from", store, func(o *ScanOptions) { o.From = "8 Jan" }, `from "8 Jan"`},
		{"bad exclude", store, func(o *ScanOptions) { o.Exclude = []string{"2025-01-07", "x"} }, `excluded day 2, "x"`},
		{"no days", store, func(o *ScanOptions) { o.From, o.To = "2026-01-01", "2026-01-31" }, "no days to analyse"},
		{"all excluded", store, func(o *ScanOptions) { o.Days = Weekends }, "no days to analyse"},
		{"bad selector", store, func(o *ScanOptions) { o.Days = "mondays" }, `days "mondays"`},
		{"zero support", store, func(o *ScanOptions) { o.Support = 0 }, "support 0"},
		{"support above 1", store, func(o *ScanOptions) { o.Support = 1.5 }, "support 1.5"},
		{"negative group cap", store, func(o *ScanOptions) { o.MaxGroupEdges = -1 }, "max group edges -1"},
		{"no reference speed", store, func(o *ScanOptions) { o.ReferenceSpeed = 0 }, "reference speed"},
		{"store without windows", &windowless, func(*ScanOptions) {}, "no time windows"},
		{"duplicate edge", &dup, func(*ScanOptions) {}, "two edges"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			opts := DefaultScanOptions()
			c.opts(&opts)
			_, err := ScanStore(context.Background(), c.store, opts)
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Errorf("err = %v, want it to contain %q", err, c.want)
			}
		})
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := ScanStore(ctx, store, DefaultScanOptions()); err == nil {
		t.Error("cancelled scan returned no error")
	}
}

func TestScanStoreEdgeCases(t *testing.T) {
	cases := []struct {
		name     string
		days     int
		opts     func(*ScanOptions)
		findings int // planted A alone: 1 finding whenever present often enough
	}{
		// A weak every analysed day gives no evidence that its two pairs
		// share a cause (see places): two findings.
		{"one day", 1, func(*ScanOptions) {}, 2},
		{"support 1.0 with A missing every fifth day", 10, func(o *ScanOptions) { o.Support = 1 }, 0},
		{"support 1.0 over A's first four days", 4, func(o *ScanOptions) { o.Support = 1 }, 2},
		{"A missing every fifth day", 10, func(*ScanOptions) {}, 1},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			store := scanTestStore(4, 12, c.days, 0, []scanPlant{scanPlantA})
			opts := DefaultScanOptions()
			c.opts(&opts)
			opts.Skyline.NoSpeedGate = true // A is alone: no slower half to be in
			scan, err := ScanStore(context.Background(), store, opts)
			if err != nil {
				t.Fatal(err)
			}
			if len(scan.Findings) != c.findings {
				t.Errorf("%d findings, want %d: %v", len(scan.Findings), c.findings, scan.Findings)
			}
		})
	}
}

func TestMinSupport(t *testing.T) {
	cases := []struct {
		share float64
		days  int
		want  int
	}{
		{0.2, 10, 2},
		{0.1, 30, 3}, // 0.1 x 30 is 3.0000000000000004 in floating point
		{0.1, 365, 37},
		{1, 7, 7},
		{0.01, 5, 1},
		{0.5, 0, 1},
	}
	for _, c := range cases {
		if got := MinSupport(c.share, c.days); got != c.want {
			t.Errorf("MinSupport(%v, %d) = %d, want %d", c.share, c.days, got, c.want)
		}
	}
}

// BenchmarkScanStoreYear scans a year of one window over a 45 x 45 grid
// (2,025 regions) with about 4,000 edges a day (1.4 million edges).
func BenchmarkScanStoreYear(b *testing.B) {
	store := scanTestStore(6, 45, 365, 4200, []scanPlant{scanPlantA, scanPlantB})
	b.Logf("%d edges", len(store.Edges))
	opts := DefaultScanOptions()
	var scan *Scan
	b.ResetTimer()
	for b.Loop() {
		var err error
		if scan, err = ScanStore(context.Background(), store, opts); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(len(scan.Findings)), "findings")
}
