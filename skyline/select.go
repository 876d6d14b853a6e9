package skyline

import (
	"math"
	"slices"

	"narrows/regiongraph"
)

// selectMaxK is the largest skyband depth Select answers with its own
// sweep. Its Fenwick tree keeps K detour ranks per node, so memory and time
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

	for i, p := range points {
		keys[i] = floatKey(-p.Detour)
	}
	detourRank, _ := denseRanks(keys, &srt)
	for i, p := range points {
		keys[i] = ^intKey(p.Trips)
	}
	tripsRank, _ := denseRanks(keys, &srt)
	order := lexOrder(tripsRank, speedRank, detourRank, keys, &srt)

	// Sweep in lexicographic order. A point's dominators are exactly the
	// earlier points, other than its identical copies, that are no worse on
	// speed and detour: they have at least as many trips, and a point that
	// ties on all three ranks is identical. So each run of identical points
	// first asks the tree how many inserted points lie at a speed rank <= its
	// own with a detour rank <= its own, then is inserted. Gated-out points
	// are inserted too: they can dominate.
	speeds := int(speedRank[speedOrder[n-1]]) + 1
	var tree staircase
	if k == 1 {
		tree = newMinTree(speeds)
	} else {
		tree = newBandTree(speeds, k)
	}
	for lo := 0; lo < n; {
		p := order[lo]
		hi := lo + 1
		for hi < n && samePoint(order[hi], p, tripsRank, speedRank, detourRank) {
			hi++
		}
		s, d := speedRank[p], detourRank[p]
		if pass[p] && tree.below(s, d) {
			for _, q := range order[lo:hi] {
				sel.Indices = append(sel.Indices, eligible[q])
			}
		}
		tree.insert(s, d, hi-lo)
		lo = hi
	}
	slices.Sort(sel.Indices)
	return sel
}

// lexOrder returns the point indices sorted by trips rank, then speed rank,
// then detour rank, all ascending (best first), as analyse orders them.
// keys is scratch space of the points' length.
func lexOrder(tripsRank, speedRank, detourRank []int32, keys []uint64, srt *sorter) []int32 {
	order := make([]int32, len(tripsRank))
	for i := range order {
		order[i] = int32(i)
	}
	tb, sb, db := bitLen(tripsRank), bitLen(speedRank), bitLen(detourRank)
	if tb+sb+db <= 64 {
		for i := range keys {
			keys[i] = uint64(tripsRank[i])<<(sb+db) | uint64(speedRank[i])<<db | uint64(detourRank[i])
		}
		srt.sortIndices(order, keys)
		return order
	}
	for _, rank := range [][]int32{detourRank, speedRank, tripsRank} {
		for i, r := range rank {
			keys[i] = uint64(r)
		}
		srt.sortIndices(order, keys)
	}
	return order
}

// staircase is the sweep's record of the points inserted so far.
type staircase interface {
	// below reports whether fewer than k inserted points have a speed rank
	// <= s and a detour rank <= d.
	below(s, d int32) bool
	// insert adds mult identical points at speed rank s, detour rank d.
	insert(s, d int32, mult int)
}

// minTree is a Fenwick tree over speed ranks holding the best (lowest)
// detour rank inserted at or below each prefix: the staircase of the plain
// skyline (k = 1).
type minTree []int32

func newMinTree(speeds int) minTree {
	t := make(minTree, speeds+1)
	for i := range t {
		t[i] = math.MaxInt32
	}
	return t
}

func (t minTree) below(s, d int32) bool {
	for x := int(s) + 1; x > 0; x -= x & -x {
		if t[x] <= d {
			return false
		}
	}
	return true
}

func (t minTree) insert(s, d int32, _ int) {
	// A node covers a superset of its child's range, so once a node already
	// holds a detour rank <= d, every node above it does too.
	for x := int(s) + 1; x < len(t) && t[x] > d; x += x & -x {
		t[x] = d
	}
}

// bandTree is a Fenwick tree over speed ranks whose nodes each hold the k
// lowest detour ranks (with multiplicity, ascending) inserted in their
// range: enough to tell whether a point has fewer than k dominators.
type bandTree struct {
	k     int
	ranks []int32 // node x holds ranks[x*k : x*k+k]
}

func newBandTree(speeds, k int) *bandTree {
	t := &bandTree{k: k, ranks: make([]int32, (speeds+1)*k)}
	for i := range t.ranks {
		t.ranks[i] = math.MaxInt32
	}
	return t
}

func (t *bandTree) below(s, d int32) bool {
	found := 0
	for x := int(s) + 1; x > 0; x -= x & -x {
		// A node keeps its k lowest ranks: if all are <= d the count is
		// reached; otherwise it keeps every rank <= d it has.
		for _, r := range t.ranks[x*t.k : x*t.k+t.k] {
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

func (t *bandTree) insert(s, d int32, mult int) {
	mult = min(mult, t.k)
	for x := int(s) + 1; x*t.k < len(t.ranks); x += x & -x {
		node := t.ranks[x*t.k : x*t.k+t.k]
		if node[t.k-1] <= d {
			break // as in minTree: the nodes above are full at or below d
		}
		for range mult {
			if node[t.k-1] <= d {
				break // the node is full at or below d
			}
			// Insert d into the sorted node, dropping the highest rank.
			j := t.k - 1
			for j > 0 && node[j-1] > d {
				node[j] = node[j-1]
				j--
			}
			node[j] = d
		}
	}
}
