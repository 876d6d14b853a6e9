package patterns

import (
	"cmp"
	"math"
	"slices"
	"sort"
)

// ComparisonGroup is the set of region pairs a finding is judged against.
type ComparisonGroup struct {
	// Edges are the matched directed pairs, nearest first.
	Edges []EdgeKey
	// Band is the factor within which the pairs' straight-line distance
	// per trip lies of the finding's (1.5 unless it had to widen); 0 when
	// there is no group.
	Band float64
}

// poolEdge is a directed pair eligible for comparison groups, with its
// before-period features on a log scale where the scale is a ratio.
type poolEdge struct {
	key                           EdgeKey
	logStraight, detour, logSpeed float64
}

// matchPool lists the pairs eligible for a comparison group: outside every
// finding of either period (exclude), with no region in the focus area,
// and with at least opts.GroupMinDays of the analysed days of each period
// carrying trips. It is sorted by straight-line distance.
func matchPool(pd *periodData, exclude map[EdgeKey]bool, focusRegions map[int]bool, opts CompareOptions) []poolEdge {
	need := [2]int{}
	for p := range need {
		need[p] = int(math.Ceil(opts.GroupMinDays*float64(len(pd.days[p])) - 1e-9))
		need[p] = max(need[p], 1)
	}
	var pool []poolEdge
	for i, k := range pd.summary.keys {
		s := &pd.summary.rows[i]
		if exclude[k] || focusRegions[k.From] || focusRegions[k.To] || k.From == k.To {
			continue
		}
		if s.days[0] < need[0] || s.days[1] < need[1] {
			continue
		}
		straight, detour, speed := s.features(0)
		if !(straight > 0 && speed > 0) || math.IsNaN(detour) || math.IsInf(detour, 0) {
			continue
		}
		pool = append(pool, poolEdge{key: k, logStraight: math.Log(straight), detour: detour, logSpeed: math.Log(speed)})
	}
	slices.SortFunc(pool, func(a, b poolEdge) int {
		if c := cmp.Compare(a.logStraight, b.logStraight); c != 0 {
			return c
		}
		if c := cmp.Compare(a.key.From, b.key.From); c != 0 {
			return c
		}
		return cmp.Compare(a.key.To, b.key.To)
	})
	return pool
}

// groupBands are the straight-line distance bands tried in turn, as
// factors either side of the finding's distance, until one holds
// GroupMinSize pairs; the last takes the whole pool.
var groupBands = [...]float64{1.5, 2, 3, math.Inf(1)}

// matchGroup picks a finding's comparison group: within the narrowest
// band of straight-line distance that holds at least opts.GroupMinSize
// pairs, the opts.GroupSize pairs nearest in before-period detour and
// speed (Euclidean distance over the detour ratio and the log of the speed,
// each divided by its spread over the pool, the median absolute deviation).
// Ties are broken by pair. A pool smaller than GroupMinSize gives no group.
func matchGroup(pool []poolEdge, spread [2]float64, straight, detour, speed float64, opts CompareOptions) ComparisonGroup {
	if len(pool) < opts.GroupMinSize || !(straight > 0 && speed > 0) || math.IsNaN(detour) {
		return ComparisonGroup{}
	}
	ls, lv := math.Log(straight), math.Log(speed)
	var lo, hi int
	var band float64
	for _, band = range groupBands {
		lo = sort.Search(len(pool), func(i int) bool { return pool[i].logStraight >= ls-math.Log(band) })
		hi = sort.Search(len(pool), func(i int) bool { return pool[i].logStraight > ls+math.Log(band) })
		if hi-lo >= opts.GroupMinSize {
			break
		}
	}
	type scored struct {
		d float64
		k EdgeKey
	}
	cand := make([]scored, 0, hi-lo)
	for _, e := range pool[lo:hi] {
		a, b := (e.detour-detour)/spread[0], (e.logSpeed-lv)/spread[1]
		cand = append(cand, scored{a*a + b*b, e.key})
	}
	slices.SortFunc(cand, func(x, y scored) int {
		if c := cmp.Compare(x.d, y.d); c != 0 {
			return c
		}
		if c := cmp.Compare(x.k.From, y.k.From); c != 0 {
			return c
		}
		return cmp.Compare(x.k.To, y.k.To)
	})
	g := ComparisonGroup{Band: band}
	for _, c := range cand[:min(len(cand), opts.GroupSize)] {
		g.Edges = append(g.Edges, c.k)
	}
	return g
}

// poolSpread returns the median absolute deviations of the pool's detour
// and log speed (1 where a spread is 0, so that the distance stays
// defined).
func poolSpread(pool []poolEdge) [2]float64 {
	var out [2]float64
	for j, get := range []func(poolEdge) float64{
		func(e poolEdge) float64 { return e.detour },
		func(e poolEdge) float64 { return e.logSpeed },
	} {
		v := make([]float64, len(pool))
		for i, e := range pool {
			v[i] = get(e)
		}
		out[j] = mad(v)
		if !(out[j] > 0) {
			out[j] = 1
		}
	}
	return out
}

// mad is the median absolute deviation from the median.
func mad(v []float64) float64 {
	if len(v) == 0 {
		return math.NaN()
	}
	s := slices.Clone(v)
	slices.Sort(s)
	m := s[len(s)/2]
	for i := range s {
		s[i] = math.Abs(s[i] - m)
	}
	slices.Sort(s)
	return s[len(s)/2]
}
