package regiongraph

import (
	"math/rand/v2"
	"slices"
	"testing"
)

// TestDayFileRows checks the day file's order against the standard
// library's sort with compareDayFileRows (the oracle), for edges in store
// order (the counting sort), shuffled, with a pair twice and with trips
// past the counting bound (the index sort).
func TestDayFileRows(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	// Windows given out of name order: the day file orders them by name.
	order := edgeOrderOf([]Window{{Name: "pm"}, {Name: "am"}, {Name: "day"}})
	storeOrdered := func(n, maxTrips int) []Edge {
		var es []Edge
		for _, w := range []WindowIndex{1, 2, 0} { // am, day, pm
			from, to := 1, 1
			for range n {
				to += 1 + rng.IntN(3)
				if to > 40 {
					from, to = from+1+rng.IntN(2), 1+rng.IntN(3)
				}
				// Trips mostly 1 or 2, a few large.
				trips := 1 + int(rng.ExpFloat64()*1.5)
				if rng.IntN(50) == 0 {
					trips = 1 + rng.IntN(maxTrips)
				}
				es = append(es, Edge{Day: testDay("2024-05-06"), Window: w, From: from, To: to, Trips: trips, SpeedMedian: rng.Float64()})
			}
		}
		return es
	}
	for _, tc := range []struct {
		name  string
		edges func() []Edge
	}{
		{"empty", func() []Edge { return nil }},
		{"one", func() []Edge { return storeOrdered(1, 5)[:1] }},
		{"store order", func() []Edge { return storeOrdered(3000, 400) }},
		{"store order, trips past the bound", func() []Edge { return storeOrdered(3000, 4*maxCountedTrips) }},
		{"shuffled", func() []Edge {
			es := storeOrdered(2000, 100)
			rng.Shuffle(len(es), func(i, j int) { es[i], es[j] = es[j], es[i] })
			return es
		}},
		{"a pair twice", func() []Edge {
			es := storeOrdered(500, 100)
			return slices.Insert(es, 100, es[100])
		}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			es := tc.edges()
			before := slices.Clone(es)
			want := slices.Clone(es)
			slices.SortStableFunc(want, func(a, b Edge) int { return compareDayFileRows(order, a, b) })
			got := dayFileRows(order, es)
			if !slices.Equal(got, want) {
				t.Fatalf("%d edges: the day file's order differs from the sort's", len(es))
			}
			if !slices.Equal(es, before) {
				t.Error("the edges were modified")
			}
		})
	}
}
