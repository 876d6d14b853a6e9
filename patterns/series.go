package patterns

import (
	"math"
	"sort"

	"narrows/regiongraph"
)

// findingKeys lists the edges of f, in its order (sorted by From, To).
func findingKeys(f Finding) []EdgeKey {
	keys := make([]EdgeKey, len(f.Edges))
	for i, e := range f.Edges {
		keys[i] = EdgeKey{From: e.From, To: e.To}
	}
	return keys
}

// recurrenceDays counts the analysed days of s on which at least one key
// was a candidate: the days the place was weak, as Finding.Days counts
// them. An empty key set recurs on no day.
func recurrenceDays(s *Scan, keys []EdgeKey) int {
	n := 0
	for _, cands := range s.DayCandidates {
		for _, k := range keys {
			if containsKey(cands, k) {
				n++
				break
			}
		}
	}
	return n
}

// containsKey reports whether k is in cands, which is sorted by From, To.
func containsKey(cands []EdgeKey, k EdgeKey) bool {
	i := sort.Search(len(cands), func(i int) bool {
		c := cands[i]
		return c.From > k.From || (c.From == k.From && c.To >= k.To)
	})
	return i < len(cands) && cands[i] == k
}

// edgeValue is one edge's trips and medians on one day.
type edgeValue struct {
	trips         int
	speed, detour float64
}

// edgeDayValues reads from the store the values of the given edges on the
// analysed days of s, in its time window: result[key][dayIndex]. Like the
// scan, it leaves out the edges with fewer trips than the scan's
// Skyline.MinTrips.
func edgeDayValues(store *regiongraph.Store, s *Scan, keys []EdgeKey) map[EdgeKey]map[int]edgeValue {
	minTrips := s.Options.Skyline.MinTrips
	dayIndex := make(map[string]int, len(s.Days))
	for i, d := range s.Days {
		dayIndex[d] = i
	}
	wanted := make(map[EdgeKey]bool, len(keys))
	for _, k := range keys {
		wanted[k] = true
	}
	out := make(map[EdgeKey]map[int]edgeValue, len(keys))
	for _, e := range store.Edges {
		if e.Window != s.Window || e.Trips <= 0 || e.Trips < minTrips {
			continue
		}
		k := EdgeKey{From: e.From, To: e.To}
		if !wanted[k] {
			continue
		}
		d, ok := dayIndex[e.Day]
		if !ok {
			continue
		}
		if math.IsNaN(e.SpeedMedian) || math.IsNaN(e.DetourMedian) {
			continue
		}
		m := out[k]
		if m == nil {
			m = make(map[int]edgeValue)
			out[k] = m
		}
		m[d] = edgeValue{trips: e.Trips, speed: e.SpeedMedian, detour: e.DetourMedian}
	}
	return out
}

// dailySeries returns, for each day (in order) on which keys carried at
// least minTrips trips together, the trip-weighted means of the edges'
// median speeds and median detours.
func dailySeries(values map[EdgeKey]map[int]edgeValue, days []string, keys []EdgeKey, minTrips int) (speed, detour []float64) {
	for d := range days {
		var trips, speedSum, detourSum float64
		for _, k := range keys {
			v, ok := values[k][d]
			if !ok {
				continue
			}
			w := float64(v.trips)
			trips += w
			speedSum += w * v.speed
			detourSum += w * v.detour
		}
		if trips == 0 || trips < float64(minTrips) {
			continue
		}
		speed = append(speed, speedSum/trips)
		detour = append(detour, detourSum/trips)
	}
	return speed, detour
}
