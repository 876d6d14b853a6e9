package skyline

import (
	"cmp"
	"math"
	"slices"

	"narrows/regiongraph"
)

// selectMaxK is the largest skyband depth Select answers with its own
// sweep. Its Fenwick tree keeps K detour keys per node, so memory and time
// grow with K; deeper skybands go to the full analysis, whose cost does not
// depend on K.
const selectMaxK = 16

// Selection is the part of a Result that a scan needs: the candidates and
// the day's median speed, without each edge's dominator count and layer.
type Selection struct {
	// Indices are the candidate edges' indices into the input, ascending;
	// the same as Candidates' Result.Indices.
	Indices []int
	// MedianSpeed is the same as Candidates' Result.MedianSpeed.
	MedianSpeed float64
}

// Select returns the same candidates and median speed as Candidates, at
// less cost: it only decides, for each edge that passes the gates, whether
// fewer than K eligible edges dominate it. See the package documentation for
// the method.
func Select(edges []regiongraph.Edge, opts Options) Selection {
	k := max(opts.K, 1)
	if k > selectMaxK {
		res := Candidates(edges, opts)
		return Selection{Indices: res.Indices, MedianSpeed: res.MedianSpeed}
	}
	minTrips := max(opts.MinTrips, 1)
	eligible := make([]int, 0, len(edges))
	points := make([]Point, 0, len(edges))
	for i := range edges {
		e := &edges[i]
		if e.Trips < minTrips || !finite(e.SpeedMedian) || !finite(e.DetourMedian) {
			continue
		}
		eligible = append(eligible, i)
		points = append(points, Point{Trips: e.Trips, Speed: e.SpeedMedian, Detour: e.DetourMedian})
	}
	var sel Selection
	n := len(points)
	if n == 0 {
		return sel
	}
	var srt sorter
	keys := make([]uint64, n)
	for i, p := range points {
		keys[i] = floatKey(p.Speed)
	}
	speedRank, speedOrder := denseRanks(keys, &srt)
	sel.MedianSpeed = weightedMedianSpeed(points, speedOrder)

	// The gates depend on the point alone; identical points share them.
	pass := make([]bool, n)
	anyPass := false
	for i, p := range points {
		pass[i] = (opts.NoDetourGate || p.Detour >= opts.DetourFloor) &&
			(opts.NoSpeedGate || p.Speed < sel.MedianSpeed)
		anyPass = anyPass || pass[i]
	}
	if !anyPass {
		return sel
	}

	// Order by trips descending, speed ascending and detour descending. The
	// detours are not ranked (that would be a third full sort): one radix
	// sort on trips and speed ranks, then each run of equal trips and speed,
	// usually short, is sorted on its detour keys.
	detour := make([]uint64, n) // lower is longer
	for i, p := range points {
		detour[i] = floatKey(-p.Detour)
		keys[i] = ^intKey(p.Trips)
	}
	tripsRank, _ := denseRanks(keys, &srt)
	sb := bitLen(speedRank)
	order := make([]int32, n)
	for i := range order {
		order[i] = int32(i)
		keys[i] = uint64(tripsRank[i])<<sb | uint64(speedRank[i])
	}
	srt.sortIndices(order, keys)
	// Gather the points in that order so that the rest reads memory in
	// sequence.
	sorted := make([]sweepPoint, n)
	for pos, i := range order {
		sorted[pos] = sweepPoint{key: keys[i], detour: detour[i], speed: speedRank[i], index: i}
	}
	byDetour := func(a, b sweepPoint) int { return cmp.Compare(a.detour, b.detour) }
	for lo := 0; lo < n; {
		hi := lo + 1
		for hi < n && sorted[hi].key == sorted[lo].key {
			hi++
		}
		if hi-lo > 1 {
			slices.SortFunc(sorted[lo:hi], byDetour)
		}
		lo = hi
	}

	// Sweep in that order. A point's dominators are exactly the earlier
	// points, other than its identical copies, that are no worse on speed
	// and detour: they have at least as many trips, and a point that ties on
	// all three is identical. So each run of identical points first asks the
	// tree how many inserted points lie at a speed rank <= its own with a
	// detour key <= its own, then is inserted. Gated-out points are inserted
	// too: they can dominate.
	speeds := int(speedRank[speedOrder[n-1]]) + 1
	var tree staircase
	if k == 1 {
		tree = newMinTree(speeds)
	} else {
		tree = newBandTree(speeds, k)
	}
	for lo := 0; lo < n; {
		p := sorted[lo]
		hi := lo + 1
		for hi < n && sorted[hi].key == p.key && sorted[hi].detour == p.detour {
			hi++
		}
		if pass[p.index] && tree.below(p.speed, p.detour) {
			for _, q := range sorted[lo:hi] {
				sel.Indices = append(sel.Indices, eligible[q.index])
			}
		}
		tree.insert(p.speed, p.detour, hi-lo)
		lo = hi
	}
	slices.Sort(sel.Indices)
	return sel
}

// sweepPoint is one eligible point in the sweep's order.
type sweepPoint struct {
	key    uint64 // trips and speed ranks
	detour uint64 // detour key, lower is longer
	speed  int32  // speed rank
	index  int32  // into the eligible points
}

// staircase is the sweep's record of the points inserted so far.
type staircase interface {
	// below reports whether fewer than k inserted points have a speed rank
	// <= s and a detour key <= d.
	below(s int32, d uint64) bool
	// insert adds mult identical points at speed rank s, detour key d.
	insert(s int32, d uint64, mult int)
}

// minTree is a Fenwick tree over speed ranks holding the best (lowest)
// detour key inserted at or below each prefix: the staircase of the plain
// skyline (k = 1).
type minTree []uint64

func newMinTree(speeds int) minTree {
	t := make(minTree, speeds+1)
	for i := range t {
		t[i] = math.MaxUint64
	}
	return t
}

func (t minTree) below(s int32, d uint64) bool {
	for x := int(s) + 1; x > 0; x -= x & -x {
		if t[x] <= d {
			return false
		}
	}
	return true
}

func (t minTree) insert(s int32, d uint64, _ int) {
	// A node covers a superset of its child's range, so once a node already
	// holds a detour key <= d, every node above it does too.
	for x := int(s) + 1; x < len(t) && t[x] > d; x += x & -x {
		t[x] = d
	}
}

// bandTree is a Fenwick tree over speed ranks whose nodes each hold the k
// lowest detour keys (with multiplicity, ascending) inserted in their
// range: enough to tell whether a point has fewer than k dominators.
type bandTree struct {
	k    int
	keys []uint64 // node x holds keys[x*k : x*k+k]
}

func newBandTree(speeds, k int) *bandTree {
	t := &bandTree{k: k, keys: make([]uint64, (speeds+1)*k)}
	for i := range t.keys {
		t.keys[i] = math.MaxUint64
	}
	return t
}

func (t *bandTree) below(s int32, d uint64) bool {
	found := 0
	for x := int(s) + 1; x > 0; x -= x & -x {
		// A node keeps its k lowest keys: if all are <= d the count is
		// reached; otherwise it keeps every key <= d it has.
		for _, r := range t.keys[x*t.k : x*t.k+t.k] {
			if r > d {
				break
			}
			if found++; found >= t.k {
				return false
			}
		}
	}
	return true
}

func (t *bandTree) insert(s int32, d uint64, mult int) {
	mult = min(mult, t.k)
	for x := int(s) + 1; x*t.k < len(t.keys); x += x & -x {
		node := t.keys[x*t.k : x*t.k+t.k]
		if node[t.k-1] <= d {
			break // as in minTree: the nodes above are full at or below d
		}
		for range mult {
			if node[t.k-1] <= d {
				break // the node is full at or below d
			}
			// Insert d into the sorted node, dropping the highest key.
			j := t.k - 1
			for j > 0 && node[j-1] > d {
				node[j] = node[j-1]
				j--
			}
			node[j] = d
		}
	}
}
