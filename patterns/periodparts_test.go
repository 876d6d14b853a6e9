package patterns

import (
	"cmp"
	"context"
	"fmt"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"

	"narrows/regiongraph"
)

// sortedLowerMedian is the brute-force oracle of weightedLowerMedian: sort
// by speed and walk the running total of trips to half of all.
func sortedLowerMedian(v []speedTrips) float64 {
	v = slices.Clone(v)
	slices.SortFunc(v, func(a, b speedTrips) int { return cmp.Compare(a.speed, b.speed) })
	var total, run float64
	for _, x := range v {
		total += x.trips
	}
	for _, x := range v {
		if run += x.trips; run >= total/2 {
			return x.speed
		}
	}
	return v[len(v)-1].speed
}

func TestWeightedLowerMedianMatchesSorting(t *testing.T) {
	for _, tc := range []struct {
		name string
		v    []speedTrips
		want float64
	}{
		{"one", []speedTrips{{5, 3}}, 5},
		{"even split takes the lower", []speedTrips{{9, 2}, {4, 2}}, 4},
		{"heavy fast edge", []speedTrips{{3, 1}, {4, 1}, {10, 9}}, 10},
		{"ties", []speedTrips{{6, 2}, {6, 1}, {2, 1}, {6, 1}, {8, 3}}, 6},
	} {
		if got := weightedLowerMedian(slices.Clone(tc.v)); got != tc.want {
			t.Errorf("%s: %v, want %v", tc.name, got, tc.want)
		}
	}
	rng := rand.New(rand.NewPCG(11, 7))
	for trial := range 2000 {
		n := 1 + rng.IntN(60)
		v := make([]speedTrips, n)
		for i := range v {
			// Few distinct speeds, so that ties are common.
			v[i] = speedTrips{speed: float64(rng.IntN(8)) + 0.5, trips: float64(1 + rng.IntN(30))}
		}
		if got, want := weightedLowerMedian(slices.Clone(v)), sortedLowerMedian(v); got != want {
			t.Fatalf("trial %d: %v, want %v (sorting) for %v", trial, got, want, v)
		}
	}
}

func TestPeriodPartsCutsTheStoreByDay(t *testing.T) {
	days := []string{"2026-01-01", "2026-01-02", "2026-01-03", "2026-01-05", "2026-01-06"}
	var edges []regiongraph.Edge
	for _, d := range days {
		for to := range 3 {
			edges = append(edges, regiongraph.Edge{Day: testDay(d), Window: testWindowIndex("am"), From: 0, To: to, Trips: 5})
		}
	}
	store := &regiongraph.Store{Meta: regiongraph.Meta{Windows: []regiongraph.Window{{Name: "am"}}}, Edges: edges}
	period := func(from, to string) ScanOptions { return ScanOptions{From: from, To: to} }
	for _, tc := range []struct {
		name          string
		before, after ScanOptions
		ok            bool
		lo, hi        [2]int // expected runs, as edge indices
	}{
		{"two runs", period("2026-01-01", "2026-01-02"), period("2026-01-04", "2026-01-06"), true, [2]int{0, 9}, [2]int{6, 15}},
		{"open ends", period("", "2026-01-01"), period("2026-01-03", ""), true, [2]int{0, 6}, [2]int{3, 15}},
		{"after first", period("2026-01-05", "2026-01-06"), period("2026-01-01", "2026-01-03"), true, [2]int{9, 0}, [2]int{15, 9}},
		{"overlap", period("2026-01-01", "2026-01-03"), period("2026-01-03", "2026-01-06"), false, [2]int{}, [2]int{}},
		{"no edge in a period", period("2026-01-01", "2026-01-02"), period("2026-01-04", "2026-01-04"), false, [2]int{}, [2]int{}},
		{"not a day", period("2026-1-1", "2026-01-02"), period("2026-01-04", "2026-01-06"), false, [2]int{}, [2]int{}},
	} {
		parts, ok := periodParts(store, [2]ScanOptions{tc.before, tc.after})
		if ok != tc.ok {
			t.Errorf("%s: ok %v, want %v", tc.name, ok, tc.ok)
			continue
		}
		for p := range 2 {
			if want := edges[tc.lo[p]:tc.hi[p]]; ok && (len(parts[p]) != len(want) || &parts[p][0] != &want[0]) {
				t.Errorf("%s: period %d has %d edges from %s, want %d from %s", tc.name, p, len(parts[p]), parts[p][0].Day, len(want), want[0].Day)
			}
		}
	}
	unsorted := &regiongraph.Store{Meta: store.Meta, Edges: slices.Clone(edges)}
	unsorted.Edges[0], unsorted.Edges[14] = unsorted.Edges[14], unsorted.Edges[0]
	if _, ok := periodParts(unsorted, [2]ScanOptions{period("2026-01-01", "2026-01-02"), period("2026-01-05", "2026-01-06")}); ok {
		t.Error("a store not sorted by day was cut")
	}
	// Out of order only where the two halves of the check meet.
	boundary := &regiongraph.Store{Meta: store.Meta, Edges: slices.Clone(edges)}
	boundary.Edges[len(edges)/2-1].Day = testDay("2026-01-04")
	if !daysAscend(boundary.Edges[:len(edges)/2]) || !daysAscend(boundary.Edges[len(edges)/2:]) {
		t.Fatal("the disorder is not only across the halves")
	}
	if _, ok := periodParts(boundary, [2]ScanOptions{period("2026-01-01", "2026-01-02"), period("2026-01-05", "2026-01-06")}); ok {
		t.Error("a store out of order between its halves was cut")
	}
	noWindows := &regiongraph.Store{Edges: edges}
	if _, ok := periodParts(noWindows, [2]ScanOptions{period("2026-01-01", "2026-01-02"), period("2026-01-05", "2026-01-06")}); ok {
		t.Error("a store without windows was cut")
	}
}

// TestCompareSameWhetherCut compares the periods of a store that can be
// cut into their parts (read at once) and of the same store with the
// edges of a day outside both periods moved to its front, which cannot be
// cut, as its days do not ascend (read in one pass, the way before the
// cut): every figure must agree, with the periods in either order.
func TestCompareSameWhetherCut(t *testing.T) {
	dayList := append(days("2026-03-02", 28), days("2026-05-04", 28)...)
	march, may := scanPeriod("2026-03-02", "2026-03-29", nil), scanPeriod("2026-05-04", "2026-05-31", nil)
	for _, order := range [][2]ScanOptions{{march, may}, {may, march}} {
		run := func(sorted bool) string {
			store := syntheticStore(rand.New(rand.NewPCG(3, 3)), dayList, plantedChange(28), realistic)
			// April 15th, a copy of the first day, in neither period.
			var april []regiongraph.Edge
			for _, e := range store.Edges {
				if e.Day == store.Edges[0].Day {
					e.Day = testDay("2026-04-15")
					april = append(april, e)
				}
			}
			at := 0
			if sorted {
				at = slices.IndexFunc(store.Edges, func(e regiongraph.Edge) bool { return e.Day > testDay("2026-04-15") })
			}
			store.Edges = slices.Insert(store.Edges, at, april...)
			if _, cut := periodParts(store, order); cut != sorted {
				t.Fatalf("store sorted %v: cut %v", sorted, cut)
			}
			c, err := Compare(context.Background(), store, gridPartition(), order[0], order[1], DefaultCompareOptions())
			if err != nil {
				t.Fatal(err)
			}
			var b strings.Builder
			fmt.Fprintf(&b, "days %v %v\nbar %v pool %d network %+v\n", c.Before.Days, c.After.Days, c.BarSpeed, c.PoolSize, c.Network)
			for _, a := range c.Assessments {
				fmt.Fprintf(&b, "%s %s %v %v %v %v %s\n", a.Finding.ID, a.Verdict, a.Effects, a.Group, a.DailyCost, a.BarDays, why(&a))
			}
			return b.String()
		}
		if cut, whole := run(true), run(false); cut != whole {
			t.Errorf("periods %s and %s: the cut store's comparison differs from the whole store's:\n%s\n---\n%s", order[0].From, order[1].From, cut, whole)
		} else if !strings.Contains(cut, " cleared ") && !strings.Contains(cut, " new ") {
			t.Errorf("periods %s and %s: no finding changed, so the check shows little:\n%s", order[0].From, order[1].From, cut)
		}
	}
}

// TestReadPeriodsSameWhetherCut reads the two periods' parts at once and
// the whole store in one pass: the summaries (in the same key order), the
// network's daily totals and the bar speed must be identical, to the bit.
func TestReadPeriodsSameWhetherCut(t *testing.T) {
	dayList := append(days("2026-03-02", 28), days("2026-05-04", 28)...)
	store := syntheticStore(rand.New(rand.NewPCG(5, 1)), dayList, plantedChange(28), realistic)
	// The first pair of the store carries trips only from May: a pass over
	// the store sees it after the pairs of March.
	first := EdgeKey{From: store.Edges[0].From, To: store.Edges[0].To}
	store.Edges = slices.DeleteFunc(store.Edges, func(e regiongraph.Edge) bool {
		return e.Day < testDay("2026-05-01") && (EdgeKey{From: e.From, To: e.To}) == first
	})
	march, may := scanPeriod("2026-03-02", "2026-03-29", nil), scanPeriod("2026-05-04", "2026-05-31", nil)
	for _, order := range [][2]ScanOptions{{march, may}, {may, march}} {
		var scans [2]*Scan
		for p := range scans {
			var err error
			if scans[p], err = ScanStore(context.Background(), store, order[p]); err != nil {
				t.Fatal(err)
			}
		}
		parts, cut := periodParts(store, order)
		if !cut {
			t.Fatal("the store was not cut")
		}
		totals, _ := store.DayTotals()
		got := readPeriods(parts, true, totals, windowIndex(store, scans[0].Window), scans[0], scans[1])
		want := readPeriods([2][]regiongraph.Edge{store.Edges, store.Edges}, false, totals, windowIndex(store, scans[0].Window), scans[0], scans[1])
		if len(want.summary.keys) < 20 || want.barSpeed <= 0 {
			t.Fatalf("%d summaries, bar speed %v: the store is too small to show anything", len(want.summary.keys), want.barSpeed)
		}
		if !slices.Equal(got.summary.keys, want.summary.keys) {
			t.Errorf("periods from %s: summaries' keys %v, want %v", order[0].From, got.summary.keys, want.summary.keys)
		}
		if !slices.Equal(got.summary.rows, want.summary.rows) {
			t.Errorf("periods from %s: the summaries differ", order[0].From)
		}
		for p := range 2 {
			if !slices.Equal(got.network[p], want.network[p]) {
				t.Errorf("periods from %s: the network's totals of period %d differ", order[0].From, p)
			}
		}
		if got.barSpeed != want.barSpeed {
			t.Errorf("periods from %s: bar speed %v, want %v", order[0].From, got.barSpeed, want.barSpeed)
		}
	}
}

// TestSharedProgressSumsTheScans checks that the progress of two scans
// run at once is reported as one, each stage's items summed over the
// scans that reached it, to the before period's callback.
func TestSharedProgressSumsTheScans(t *testing.T) {
	type call struct {
		stage       string
		done, total int
	}
	var got []call
	report := func(stage string, done, total int) { got = append(got, call{stage, done, total}) }
	if p := sharedProgress(nil, nil); p[0] != nil || p[1] != nil {
		t.Fatal("callbacks without a period's callback")
	}
	p := sharedProgress(report, nil)
	p[0]("candidates", 1, 10)
	p[1]("candidates", 2, 20)
	p[0]("candidates", 10, 10)
	p[1]("groups", 1, 4)
	want := []call{{"candidates", 1, 10}, {"candidates", 3, 30}, {"candidates", 12, 30}, {"groups", 1, 4}}
	if !slices.Equal(got, want) {
		t.Errorf("reported %v, want %v", got, want)
	}
	var n int
	q := sharedProgress(nil, func(string, int, int) { n++ })
	both(func(p int) {
		for i := range 100 {
			q[p]("candidates", i, 100)
		}
	})
	if n != 200 {
		t.Errorf("the after period's callback was called %d times, want 200", n)
	}
}

// TestReadPeriodsNegativeRegionIDs reads a store with a negative region
// id: the summaries then go through the edgeTable's map, with the same
// sums as for the ids shifted to be positive.
func TestReadPeriodsNegativeRegionIDs(t *testing.T) {
	dayList := append(days("2026-03-02", 28), days("2026-05-04", 28)...)
	store := syntheticStore(rand.New(rand.NewPCG(5, 1)), dayList, plantedChange(28), realistic)
	march, may := scanPeriod("2026-03-02", "2026-03-29", nil), scanPeriod("2026-05-04", "2026-05-31", nil)
	var scans [2]*Scan
	for p, o := range []ScanOptions{march, may} {
		var err error
		if scans[p], err = ScanStore(context.Background(), store, o); err != nil {
			t.Fatal(err)
		}
	}
	parts, _ := periodParts(store, [2]ScanOptions{march, may})
	totals, _ := store.DayTotals()
	want := readPeriods(parts, true, totals, windowIndex(store, scans[0].Window), scans[0], scans[1])
	shifted := &regiongraph.Store{Meta: store.Meta, Edges: slices.Clone(store.Edges)}
	const by = 100
	for i := range shifted.Edges {
		shifted.Edges[i].From -= by
		shifted.Edges[i].To -= by
	}
	parts, _ = periodParts(shifted, [2]ScanOptions{march, may})
	got := readPeriods(parts, true, totals, windowIndex(store, scans[0].Window), scans[0], scans[1])
	if got.summary.side != 0 {
		t.Fatalf("a square table of side %d for negative ids", got.summary.side)
	}
	for i, k := range want.summary.keys {
		s := got.summary.get(EdgeKey{From: k.From - by, To: k.To - by})
		if s == nil || *s != want.summary.rows[i] {
			t.Fatalf("pair %v: %v, want %v", k, s, want.summary.rows[i])
		}
	}
	k := EdgeKey{From: want.summary.keys[0].From - by, To: want.summary.keys[0].To - by}
	days := got.edgeDays(scans[0].Options.Skyline.MinTrips, map[EdgeKey]bool{k: true})
	for p := range days {
		if n := want.summary.rows[0].days[p]; len(days[p][k]) != n || len(days[p]) != min(n, 1) {
			t.Errorf("period %d: %d edge-days of %d pairs, want %d of the one pair", p, len(days[p][k]), len(days[p]), n)
		}
	}
}

// BenchmarkReadPeriods times the read of the two periods' summaries, a
// year against a year of BenchmarkCompareYearAgainstYear's
// store, the two parts at once.
func BenchmarkReadPeriods(b *testing.B) {
	store := scanTestStore(6, 45, 730, 4200, []scanPlant{scanPlantA, scanPlantB})
	first := store.Edges[0].Day
	before, after := DefaultScanOptions(), DefaultScanOptions()
	before.From, before.To = first.String(), first.AddDays(364).String()
	after.From, after.To = first.AddDays(365).String(), store.Edges[len(store.Edges)-1].Day.String()
	// Every pair with a trip, as the network's totals read them.
	for _, o := range []*ScanOptions{&before, &after} {
		o.Skyline.MinTrips = 1
	}
	var scans [2]*Scan
	for p, o := range []ScanOptions{before, after} {
		var err error
		if scans[p], err = ScanStore(context.Background(), store, o); err != nil {
			b.Fatal(err)
		}
	}
	parts, cut := periodParts(store, [2]ScanOptions{before, after})
	if !cut {
		b.Fatal("the store was not cut")
	}
	totals, _ := store.DayTotals()
	var pd *periodData
	for b.Loop() {
		pd = readPeriods(parts, true, totals, windowIndex(store, scans[0].Window), scans[0], scans[1])
	}
	b.ReportMetric(float64(len(store.Edges)), "edges")
	b.ReportMetric(float64(len(pd.summary.keys)), "pairs")
}
