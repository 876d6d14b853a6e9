package patterns

import (
	"math"
	"testing"

	"narrows/regiongraph"
)

func TestDailySeriesAndRecurrence(t *testing.T) {
	a, b := EdgeKey{From: 1, To: 2}, EdgeKey{From: 2, To: 3}
	values := map[EdgeKey]map[int]edgeValue{
		a: {0: {trips: 10, speed: 5, detour: 1.5}, 1: {trips: 2, speed: 8, detour: 1.2}},
		b: {0: {trips: 30, speed: 9, detour: 1.1}, 2: {trips: 4, speed: 7, detour: 1.4}},
	}
	dayList := []string{"d0", "d1", "d2", "d3"}
	speed, detour := dailySeries(values, dayList, []EdgeKey{a, b}, 1)
	// Day 0: (10·5 + 30·9)/40 = 8, (10·1.5 + 30·1.1)/40 = 1.2; days 1 and 2
	// from one edge each; day 3 has no trips.
	wantSpeed, wantDetour := []float64{8, 8, 7}, []float64{1.2, 1.2, 1.4}
	if !closeSlices(speed, wantSpeed) || !closeSlices(detour, wantDetour) {
		t.Errorf("series %v, %v; want %v, %v", speed, detour, wantSpeed, wantDetour)
	}
	speed, _ = dailySeries(values, dayList, []EdgeKey{a, b}, 3)
	if !closeSlices(speed, []float64{8, 7}) {
		t.Errorf("with at least 3 trips a day: %v, want [8 7]", speed)
	}
	s := &Scan{Days: dayList, DayCandidates: [][]EdgeKey{{a, b}, {a}, {{From: 0, To: 9}, b}, nil}}
	for _, tc := range []struct {
		keys []EdgeKey
		want int
	}{{[]EdgeKey{a, b}, 3}, {[]EdgeKey{a}, 2}, {[]EdgeKey{b}, 2}, {[]EdgeKey{{From: 5, To: 5}}, 0}, {nil, 0}} {
		if got := recurrenceDays(s, tc.keys); got != tc.want {
			t.Errorf("recurrence of %v: %d, want %d", tc.keys, got, tc.want)
		}
	}
}

func closeSlices(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if math.Abs(a[i]-b[i]) > 1e-12 {
			return false
		}
	}
	return true
}

func TestEdgeDayValuesReadsOnlyTheScanWindowAndDays(t *testing.T) {
	store := &regiongraph.Store{Edges: []regiongraph.Edge{
		{Day: "2026-01-05", Window: "am", From: 1, To: 2, Trips: 5, SpeedMedian: 4, DetourMedian: 1.4},
		{Day: "2026-01-05", Window: "pm", From: 1, To: 2, Trips: 9, SpeedMedian: 9, DetourMedian: 1.1},
		{Day: "2026-01-06", Window: "am", From: 1, To: 2, Trips: 0, SpeedMedian: 1, DetourMedian: 1},
		{Day: "2026-01-07", Window: "am", From: 1, To: 2, Trips: 3, SpeedMedian: 6, DetourMedian: 1.2},
		{Day: "2026-01-07", Window: "am", From: 2, To: 1, Trips: 3, SpeedMedian: 6, DetourMedian: 1.2},
	}}
	s := &Scan{Window: "am", Days: []string{"2026-01-05", "2026-01-06"}}
	got := edgeDayValues(store, s, []EdgeKey{{From: 1, To: 2}})
	want := map[int]edgeValue{0: {trips: 5, speed: 4, detour: 1.4}}
	if len(got) != 1 || len(got[EdgeKey{From: 1, To: 2}]) != 1 || got[EdgeKey{From: 1, To: 2}][0] != want[0] {
		t.Errorf("values %v, want only the am value of 2026-01-05: %v", got, want)
	}
}
