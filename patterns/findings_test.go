package patterns

import (
	"math"
	"testing"

	"narrows/patterns/groups"
)

func TestFindingsCostsAndRanking(t *testing.T) {
	ref := 10.0 // m/s, so a straight kilometre takes 100 s
	day := func(d string, trips int, distance, straight, duration float64) DailyValue {
		return DailyValue{Day: d, Trips: trips, Speed: distance / duration, Detour: distance / straight, Candidate: true,
			DistanceSum: distance, StraightSum: straight, DurationSum: duration}
	}
	a, b, c, fast := EdgeKey{From: 1, To: 2}, EdgeKey{From: 2, To: 3}, EdgeKey{From: 5, To: 6}, EdgeKey{From: 7, To: 8}
	scan := &Scan{
		Options: ScanOptions{ReferenceSpeed: ref},
		Days:    []string{"2025-03-03", "2025-03-04", "2025-03-05", "2025-03-06"},
		EdgeDaily: map[EdgeKey][]DailyValue{
			// Extra km per day 1, 2, 6 (median of the finding's days 0, 1, 3
			// is 2); extra hours (3600, 7200, 0 floored from -100) / 3600.
			a: {day("2025-03-03", 10, 2000, 1000, 3700), day("2025-03-04", 20, 4000, 2000, 7400),
				day("2025-03-05", 99, 9000, 1000, 9000), day("2025-03-06", 30, 7000, 1000, 0)},
			// Extra km 0.5 every day, 1 h every day.
			b: {day("2025-03-03", 5, 1500, 1000, 3700), day("2025-03-04", 5, 1500, 1000, 3700),
				day("2025-03-06", 5, 1500, 1000, 3700)},
			// Same hours and days as b but more km: ranks before b.
			c: {day("2025-03-03", 5, 3000, 1000, 3700), day("2025-03-04", 5, 3000, 1000, 3700),
				day("2025-03-06", 5, 3000, 1000, 3700)},
			// Trips faster than the reference along the straight line, and
			// (noise) shorter than the straight line: both floored at 0.
			fast: {day("2025-03-03", 5, 900, 1000, 50), day("2025-03-04", 5, 900, 1000, 50)},
		},
	}
	found := []groups.Group{
		{Edges: []EdgeKey{fast}, Days: []int{0, 1}},
		{Edges: []EdgeKey{b}, Days: []int{0, 1, 3}},
		{Edges: []EdgeKey{a, b}, Days: []int{0, 1, 3}},
		{Edges: []EdgeKey{c}, Days: []int{0, 1, 3}},
	}
	got := findings(scan, found)
	want := []struct {
		id        string
		km, hours float64
		regions   int
	}{
		{"1>2+2>3", 2 + 0.5, 1 + 1, 3},
		{"5>6", 2, 1, 2},
		{"2>3", 0.5, 1, 2},
		{"7>8", 0, 0, 2},
	}
	if len(got) != len(want) {
		t.Fatalf("%d findings, want %d", len(got), len(want))
	}
	for i, w := range want {
		f := got[i]
		if f.Rank != i+1 || f.ID != w.id || math.Abs(f.ExtraKMPerDay-w.km) > 1e-12 ||
			math.Abs(f.ExtraHoursPerDay-w.hours) > 1e-12 || len(f.Regions) != w.regions {
			t.Errorf("finding %d: rank %d %s, %v km, %v h, regions %v; want %s, %v km, %v h, %d regions",
				i, f.Rank, f.ID, f.ExtraKMPerDay, f.ExtraHoursPerDay, f.Regions, w.id, w.km, w.hours, w.regions)
		}
	}
	top := got[0]
	if top.Share != 0.75 || len(top.Days) != 3 || top.Days[2] != "2025-03-06" {
		t.Errorf("top finding share %v days %v", top.Share, top.Days)
	}
	// Medians over the finding's days 0, 1 and 3 only: trips 10, 20, 30.
	if e := top.Edges[0]; e.TripsMedian != 20 || len(e.Daily) != 4 {
		t.Errorf("edge 1>2: trips median %v, %d daily values; want 20 and all 4 days", e.TripsMedian, len(e.Daily))
	}
}

// Ranking spreads a finding's cost over the period: a group that costs
// twice as much on the days it recurs but recurs on a third of the days
// ranks below the pair that recurs on most days.
func TestFindingsRankByCostOverThePeriod(t *testing.T) {
	day := func(d string) DailyValue {
		return DailyValue{Day: d, Trips: 10, Speed: 5, Detour: 2, Candidate: true,
			DistanceSum: 2000, StraightSum: 1000, DurationSum: 3600 + 100}
	}
	core, extra := EdgeKey{From: 1, To: 2}, EdgeKey{From: 2, To: 3}
	days := []string{"2025-03-03", "2025-03-04", "2025-03-05", "2025-03-06"}
	scan := &Scan{
		Options:   ScanOptions{ReferenceSpeed: 10},
		Days:      days,
		EdgeDaily: map[EdgeKey][]DailyValue{core: {day(days[0]), day(days[1]), day(days[2])}, extra: {day(days[0])}},
	}
	got := findings(scan, []groups.Group{
		{Edges: []EdgeKey{core, extra}, Days: []int{0}}, // 2 h on 1 of 4 days
		{Edges: []EdgeKey{core}, Days: []int{0, 1, 2}},  // 1 h on 3 of 4 days
	})
	if got[0].ID != "1>2" || got[0].ExtraHoursPerDay >= got[1].ExtraHoursPerDay {
		t.Errorf("ranking: %s (%.2f h on %.0f %% of days) first, then %s (%.2f h on %.0f %%); want the core pair first",
			got[0].ID, got[0].ExtraHoursPerDay, 100*got[0].Share, got[1].ID, got[1].ExtraHoursPerDay, 100*got[1].Share)
	}
}
