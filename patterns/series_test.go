package patterns

import (
	"math"
	"testing"

	"narrows/regiongraph"
)

func TestDailyTotalsAndRecurrence(t *testing.T) {
	a, b := EdgeKey{From: 1, To: 2}, EdgeKey{From: 2, To: 3}
	days := map[EdgeKey][]edgeDay{
		a: {{day: 0, trips: 10, speed: 5, detour: 1.5, duration: 600, distanceSum: 30000, straightSum: 20000, durationSum: 6000},
			{day: 1, trips: 2, speed: 8, detour: 1.2, duration: 300}},
		b: {{day: 0, trips: 30, speed: 9, detour: 1.1, duration: 200, distanceSum: 33000, straightSum: 30000, durationSum: 6000},
			{day: 2, trips: 4, speed: 7, detour: 1.4, duration: 400}},
	}
	bar := &fixedBar{detourFloor: 1.3, detourGate: true, speed: 6, speedGate: true}
	// Reference speed 10 m/s: edge a costs 6000 − 20000/10 = 4000 s, edge b
	// 6000 − 3000 = 3000 s on day 0.
	tot := dailyTotals(days, 4, []EdgeKey{a, b}, 10, bar)
	want := []struct {
		trips, speed, detour, time, cost, km float64
		bar                                  bool
	}{
		{40, 8, 1.2, 300, 7000.0 / 3600, 13, true}, // (10·5 + 30·9)/40; a meets the bar (1.5, 5 m/s)
		{2, 8, 1.2, 300, 0, 0, false},
		{4, 7, 1.4, 400, 0, 0, false}, // 7 m/s is not below 6
		{0, math.NaN(), math.NaN(), math.NaN(), 0, 0, false},
	}
	for d, w := range want {
		got := []float64{tot[d].value(Trips), tot[d].value(Speed), tot[d].value(Detour), tot[d].value(TravelTime), tot[d].value(Cost), tot[d].value(ExtraKM)}
		exp := []float64{w.trips, w.speed, w.detour, w.time, w.cost, w.km}
		for i := range got {
			if !(math.Abs(got[i]-exp[i]) < 1e-9 || math.IsNaN(got[i]) && math.IsNaN(exp[i])) {
				t.Errorf("day %d measure %v = %v, want %v", d, Measure(i), got[i], exp[i])
			}
		}
		if tot[d].bar != w.bar {
			t.Errorf("day %d bar %v, want %v", d, tot[d].bar, w.bar)
		}
	}
	// The group's scale of the cost is its vehicle-hours travelled.
	if got := tot[0].scale(Cost); got != 12000 {
		t.Errorf("cost scale %v, want 12000 s", got)
	}
	s := &Scan{Days: []string{"d0", "d1", "d2", "d3"}, DayCandidates: [][]EdgeKey{{a, b}, {a}, {{From: 0, To: 9}, b}, nil}}
	for _, tc := range []struct {
		keys []EdgeKey
		want int
	}{{[]EdgeKey{a, b}, 3}, {[]EdgeKey{a}, 2}, {[]EdgeKey{b}, 2}, {[]EdgeKey{{From: 5, To: 5}}, 0}, {nil, 0}} {
		if got := recurrenceDays(s, tc.keys); got != tc.want {
			t.Errorf("recurrence of %v: %d, want %d", tc.keys, got, tc.want)
		}
	}
}

func TestEdgeDaysReadsOnlyTheWindowDaysAndBusyEdges(t *testing.T) {
	store := &regiongraph.Store{Meta: regiongraph.Meta{Windows: []regiongraph.Window{{Name: "am"}, {Name: "pm"}}}, Edges: []regiongraph.Edge{
		{Day: testDay("2026-01-05"), Window: testWindowIndex("am"), From: 1, To: 2, Trips: 5, SpeedMedian: 4, DetourMedian: 1.4},
		{Day: testDay("2026-01-05"), Window: testWindowIndex("pm"), From: 1, To: 2, Trips: 9, SpeedMedian: 9, DetourMedian: 1.1},
		{Day: testDay("2026-01-06"), Window: testWindowIndex("am"), From: 1, To: 2, Trips: 0, SpeedMedian: 1, DetourMedian: 1},
		{Day: testDay("2026-01-06"), Window: testWindowIndex("am"), From: 2, To: 1, Trips: 2, SpeedMedian: 1, DetourMedian: 1},
		{Day: testDay("2026-01-07"), Window: testWindowIndex("am"), From: 1, To: 2, Trips: 3, SpeedMedian: 6, DetourMedian: 1.2},
		{Day: testDay("2026-01-08"), Window: testWindowIndex("am"), From: 1, To: 2, Trips: 7, SpeedMedian: math.NaN(), DetourMedian: 1.2},
		{Day: testDay("2026-01-09"), Window: testWindowIndex("am"), From: 1, To: 2, Trips: 8, SpeedMedian: 5, DetourMedian: 1.3},
	}}
	pd := &periodData{days: [2][]string{{"2026-01-05", "2026-01-06"}, {"2026-01-08", "2026-01-09"}}, parts: [2][]regiongraph.Edge{store.Edges, store.Edges}, window: testWindowIndex("am")}
	got := pd.edgeDays(3, map[EdgeKey]bool{{From: 1, To: 2}: true, {From: 2, To: 1}: true})
	k := EdgeKey{From: 1, To: 2}
	if len(got[0]) != 1 || len(got[0][k]) != 1 || got[0][k][0].trips != 5 || got[0][k][0].day != 0 {
		t.Errorf("before: %v, want only the am value of 2026-01-05", got[0])
	}
	if len(got[1]) != 1 || len(got[1][k]) != 1 || got[1][k][0].trips != 8 || got[1][k][0].day != 1 {
		t.Errorf("after: %v, want only 2026-01-09 (the NaN median of 2026-01-08 left out)", got[1])
	}
}
