package skyline

import (
	"math"

	"narrows/regiongraph"
)

// Options sets the candidate rules. The zero value is not the default; use
// DefaultOptions. The toml tags are the keys of a study file's [scan] table.
type Options struct {
	// MinTrips excludes edges with fewer trips (default 10). Edges with
	// fewer than one trip are always excluded.
	MinTrips int `toml:"min_trips"`
	// DetourFloor: candidates need a median detour ratio at least this
	// (default 1.3). NoDetourGate switches the gate off.
	DetourFloor  float64 `toml:"detour_floor"`
	NoDetourGate bool    `toml:"no_detour_gate"`
	// NoSpeedGate switches off the gate "median speed below the day's
	// trip-weighted median speed".
	NoSpeedGate bool `toml:"no_speed_gate"`
	// K widens the skyline to the k-skyband: edges dominated by fewer than
	// K others (default 1, the plain skyline). K below 1 is taken as 1.
	K int `toml:"k"`
}

// DefaultOptions returns the default candidate rules:
//
//   - MinTrips 10: the median speed and detour of fewer trips swing with one
//     or two odd trips, and counts under about ten are commonly suppressed
//     before publishing anyway (common practice in disclosure control).
//   - DetourFloor 1.3: the circuity of urban road networks (travel distance
//     over straight-line distance) is commonly about 1.2 to 1.4 (from
//     memory), so a pair at or above 1.3 is at least as roundabout as a
//     typical urban trip; below that a detour is not the problem.
//   - K 1: the plain skyline, the strict reading of "nothing beats it";
//     raise K to see the near misses.
//
// Both gates are on.
func DefaultOptions() Options {
	return Options{MinTrips: 10, DetourFloor: 1.3, K: 1}
}

// Result holds the candidates of one day and context for every edge.
type Result struct {
	// Indices are the candidate edges' indices into the input, ascending.
	Indices []int
	// Layer holds, per input edge, its skyline layer among the eligible
	// edges (1 = skyline), or 0 when the edge is not eligible (fewer than
	// MinTrips trips, or a speed or detour that is not a finite number).
	Layer []int
	// Dominators holds, per input edge, the number of eligible edges that
	// dominate it (0 for edges that are not eligible).
	Dominators []int
	// MedianSpeed is the day's trip-weighted median of the eligible edges'
	// median speeds, m/s; 0 when no edge is eligible.
	MedianSpeed float64
}

// Point is one item for the generic skyline functions: more trips, lower
// speed and longer detour are "better" (worse for the network).
type Point struct {
	Trips  int
	Speed  float64
	Detour float64
}

// Candidates returns the candidates of one day's edges under opts. The
// edges are normally those of one day and time window; Candidates does not
// check that.
func Candidates(edges []regiongraph.Edge, opts Options) Result {
	n := len(edges)
	res := Result{Layer: make([]int, n), Dominators: make([]int, n)}
	minTrips := max(opts.MinTrips, 1)
	eligible := make([]int, 0, n)
	points := make([]Point, 0, n)
	for i := range edges {
		e := &edges[i]
		if e.Trips < minTrips || !finite(e.SpeedMedian) || !finite(e.DetourMedian) {
			continue
		}
		eligible = append(eligible, i)
		points = append(points, Point{Trips: e.Trips, Speed: e.SpeedMedian, Detour: e.DetourMedian})
	}
	if len(points) == 0 {
		return res
	}
	a := analyse(points)
	dominators, layers := a.dominators, a.layers
	res.MedianSpeed = weightedMedianSpeed(points, a.speedOrder)
	k := max(opts.K, 1)
	for j, i := range eligible {
		res.Layer[i] = layers[j]
		res.Dominators[i] = dominators[j]
		p := points[j]
		switch {
		case dominators[j] >= k:
		case !opts.NoDetourGate && !(p.Detour >= opts.DetourFloor):
		case !opts.NoSpeedGate && !(p.Speed < res.MedianSpeed):
		default:
			res.Indices = append(res.Indices, i)
		}
	}
	return res
}

// Skyband returns the indices, ascending, of the points dominated by fewer
// than k other points (k = 1 gives the skyline). It returns nil when k < 1.
// A NaN speed or detour counts as the worst value on its axis and as equal
// to another NaN.
func Skyband(points []Point, k int) []int {
	if k < 1 || len(points) == 0 {
		return nil
	}
	dominators := analyse(points).dominators
	var out []int
	for i, d := range dominators {
		if d < k {
			out = append(out, i)
		}
	}
	return out
}

// Layers returns each point's skyline layer: 1 for the skyline, L+1 for
// the skyline of the points left after removing layers 1..L. NaN is treated
// as in Skyband.
func Layers(points []Point) []int {
	if len(points) == 0 {
		return []int{}
	}
	return analyse(points).layers
}

// Dominators returns, per point, the number of other points that dominate
// it. NaN is treated as in Skyband.
func Dominators(points []Point) []int {
	if len(points) == 0 {
		return []int{}
	}
	return analyse(points).dominators
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// weightedMedianSpeed returns the trip-weighted median of the points'
// speeds: the speed below and above which half of the trips lie. When the
// cumulative weight hits exactly one half at a speed, the midpoint between
// it and the next speed is taken, so with equal weights this is the
// ordinary median. order lists the points by speed ascending; all points
// have at least one trip and finite values.
func weightedMedianSpeed(points []Point, order []int32) float64 {
	var total int64
	for _, p := range points {
		total += int64(p.Trips)
	}
	var cum int64
	for pos, i := range order {
		cum += int64(points[i].Trips)
		if 2*cum < total {
			continue
		}
		if 2*cum == total && pos+1 < len(order) {
			return (points[i].Speed + points[order[pos+1]].Speed) / 2
		}
		return points[i].Speed
	}
	return points[order[len(order)-1]].Speed
}
