package explore

import (
	"fmt"
	"slices"
	"sort"
	"strings"

	"narrows/patterns"
	"narrows/regiongraph"
)

// cache keeps what the analysis derives from the study's day graphs and
// what most changes leave as it was, so that a change of a threshold does
// not pass over every edge of a year again:
//   - the day graphs without the excluded pairs (rebuilt when they change);
//   - those edges with at least the minimum of trips, which a scan reads
//     (rebuilt when the pairs or the minimum change);
//   - per window and day, the network's extra vehicle-hours over the pairs
//     with at least t trips for every t, which the day strip reads.
//
// The server's mutex guards it, as it guards the state.
type cache struct {
	days []string // every day of the store, ascending

	pairsKey string
	kept     *regiongraph.Store // st.Store without the excluded pairs
	strip    map[string]map[string]*tripCosts

	minKey  string
	atLeast *regiongraph.Store // kept, edges with >= the minimum of trips
}

// tripCosts is a day's extra vehicle-hours by trips: cost[i] is the sum
// over the edges with at least trips[i] trips (trips ascending).
type tripCosts struct {
	trips []int
	cost  []float64
}

// over returns the extra vehicle-hours of the edges with at least min trips.
func (t *tripCosts) over(min int) float64 {
	i := sort.SearchInts(t.trips, min)
	if i == len(t.trips) {
		return 0
	}
	return t.cost[i]
}

func newCache(store *regiongraph.Store) *cache {
	seen := map[regiongraph.Day]bool{}
	var values []regiongraph.Day
	for i := range store.Edges {
		if d := store.Edges[i].Day; !seen[d] {
			seen[d] = true
			values = append(values, d)
		}
	}
	slices.Sort(values)
	days := make([]string, len(values))
	for i, d := range values {
		days[i] = d.String()
	}
	return &cache{days: days}
}

// pairsKeyOf names the excluded pairs, in order.
func pairsKeyOf(x patterns.Exclusions) string {
	var b strings.Builder
	for _, p := range x.Pairs {
		fmt.Fprintf(&b, "%d-%d;", p.A, p.B)
	}
	return b.String()
}

// without returns the store without the excluded pairs and opts with the
// excluded days, as patterns.Exclusions.Apply does, reusing the store of
// the previous call when the pairs are the same.
func (c *cache) without(st *Study, x patterns.Exclusions, opts patterns.ScanOptions) (*regiongraph.Store, patterns.ScanOptions, error) {
	key := fmt.Sprintf("%s|%g", pairsKeyOf(x), opts.ReferenceSpeed)
	if c.kept == nil || key != c.pairsKey {
		kept, _, err := patterns.Exclusions{Pairs: x.Pairs}.Apply(st.Store, opts)
		if err != nil {
			return nil, opts, err
		}
		c.pairsKey, c.kept, c.strip = key, kept, stripCosts(kept, opts.ReferenceSpeed)
		c.minKey, c.atLeast = "", nil
	}
	_, opts, err := patterns.Exclusions{Days: x.Days}.Apply(nil, opts)
	return c.kept, opts, err
}

// atLeastTrips returns the kept store's edges with at least min trips
// (the edges a scan with that minimum reads), reusing the last ones.
func (c *cache) atLeastTrips(min int) *regiongraph.Store {
	key := c.pairsKey + fmt.Sprintf("|%d", min)
	if c.atLeast == nil || key != c.minKey {
		n := 0
		for i := range c.kept.Edges {
			if c.kept.Edges[i].Trips >= min {
				n++
			}
		}
		out := c.kept // no edge to drop: no copy
		if n < len(c.kept.Edges) {
			out = &regiongraph.Store{Meta: c.kept.Meta, Edges: make([]regiongraph.Edge, 0, n)}
			for i := range c.kept.Edges {
				if c.kept.Edges[i].Trips >= min {
					out.Edges = append(out.Edges, c.kept.Edges[i])
				}
			}
		}
		c.minKey, c.atLeast = key, out
	}
	return c.atLeast
}

// stripCosts sums each window's and day's extra vehicle-hours by trips,
// at the reference speed ref (m/s).
func stripCosts(store *regiongraph.Store, ref float64) map[string]map[string]*tripCosts {
	type key struct {
		window regiongraph.WindowIndex
		day    regiongraph.Day
	}
	byTrips := map[key]map[int]float64{}
	for i := range store.Edges {
		e := &store.Edges[i]
		k := key{e.Window, e.Day}
		m := byTrips[k]
		if m == nil {
			m = map[int]float64{}
			byTrips[k] = m
		}
		m[e.Trips] += max(0, e.DurationSum-e.StraightSum/ref) / 3600
	}
	out := map[string]map[string]*tripCosts{}
	for k, m := range byTrips {
		t := &tripCosts{}
		for n := range m {
			t.trips = append(t.trips, n)
		}
		slices.Sort(t.trips)
		t.cost = make([]float64, len(t.trips))
		sum := 0.0
		for i := len(t.trips) - 1; i >= 0; i-- {
			sum += m[t.trips[i]]
			t.cost[i] = sum
		}
		name := store.Meta.WindowName(k.window)
		if out[name] == nil {
			out[name] = map[string]*tripCosts{}
		}
		out[name][k.day.String()] = t
	}
	return out
}
