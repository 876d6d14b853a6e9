package skyline

import "math/bits"

// baseBlock is the size under which a block of the divide and conquer is
// finished by comparing all pairs: below it the pairwise loop is cheaper
// than the sweeps and the Fenwick tree.
const baseBlock = 32

// analysis is the outcome of analyse.
type analysis struct {
	dominators, layers []int
	// speedOrder lists the points by speed, slowest first.
	speedOrder []int32
}

// analyse returns each point's number of dominators and its skyline layer.
// See the package documentation for the method.
func analyse(points []Point) analysis {
	n := len(points)
	res := analysis{dominators: make([]int, n), layers: make([]int, n)}
	if n == 0 {
		return res
	}
	var srt sorter
	// Rank 0 is the best (worst for the network) value on each axis.
	keys := make([]uint64, n)
	for i, p := range points {
		keys[i] = floatKey(p.Speed)
	}
	speedRank, speedOrder := denseRanks(keys, &srt)
	res.speedOrder = speedOrder
	for i, p := range points {
		keys[i] = floatKey(-p.Detour)
	}
	detourRank, _ := denseRanks(keys, &srt)
	for i, p := range points {
		keys[i] = ^intKey(p.Trips) // most trips first
	}
	tripsRank, _ := denseRanks(keys, &srt)

	// Merge identical points; order by trips descending, then speed and
	// detour from best to worst, so that every dominator comes first.
	order := make([]int32, n)
	for i := range order {
		order[i] = int32(i)
	}
	// One radix sort on the three ranks packed into one key when they fit
	// (always below two million points), else one stable sort per rank.
	tb, sb, db := bitLen(tripsRank), bitLen(speedRank), bitLen(detourRank)
	if tb+sb+db <= 64 {
		for i := range keys {
			keys[i] = uint64(tripsRank[i])<<(sb+db) | uint64(speedRank[i])<<db | uint64(detourRank[i])
		}
		srt.sortIndices(order, keys)
	} else {
		for _, rank := range [][]int32{detourRank, speedRank, tripsRank} {
			for i, r := range rank {
				keys[i] = uint64(r)
			}
			srt.sortIndices(order, keys)
		}
	}
	unique := make([]int32, n) // point -> unique id
	d := &divideConquer{
		speed:  make([]int32, 0, n),
		detour: make([]int32, 0, n),
		mult:   make([]int32, 0, n),
	}
	for pos, p := range order {
		if pos == 0 || !samePoint(order[pos-1], p, tripsRank, speedRank, detourRank) {
			d.speed = append(d.speed, speedRank[p])
			d.detour = append(d.detour, detourRank[p])
			d.mult = append(d.mult, 0)
		}
		u := int32(len(d.mult) - 1)
		d.mult[u]++
		unique[p] = u
	}
	m := len(d.mult)
	d.count = make([]int32, m)
	d.best = make([]int32, m)
	d.layer = make([]int32, m)
	d.tmp = make([]int32, m)
	d.tree = make([]fenwickCell, m/2+2)
	d.local = make([]int32, 2*m+64) // sizes along a path: m, ⌈m/2⌉, ...

	bySpeed := make([]int32, m)
	byDetour := make([]int32, m)
	for i := range bySpeed {
		bySpeed[i] = int32(i)
		keys[i] = uint64(d.speed[i])
	}
	srt.sortIndices(bySpeed, keys[:m])
	for i := range byDetour {
		byDetour[i] = int32(i)
		keys[i] = uint64(d.detour[i])
	}
	srt.sortIndices(byDetour, keys[:m])
	d.solve(0, int32(m), bySpeed, byDetour, d.local)

	for i := range n {
		u := unique[i]
		res.dominators[i] = int(d.count[u])
		res.layers[i] = int(d.layer[u])
	}
	return res
}

// bitLen returns the number of bits needed for the largest rank.
func bitLen(ranks []int32) uint {
	m := int32(0)
	for _, r := range ranks {
		m = max(m, r)
	}
	return uint(bits.Len32(uint32(m)))
}

// samePoint reports whether points p and q have the same ranks.
func samePoint(p, q int32, trips, speed, detour []int32) bool {
	return trips[p] == trips[q] && speed[p] == speed[q] && detour[p] == detour[q]
}

// denseRanks returns, for each key, its rank among the distinct keys
// (from 0, without gaps), and the indices in key order.
func denseRanks(keys []uint64, srt *sorter) (ranks, order []int32) {
	n := len(keys)
	order = make([]int32, n)
	for i := range order {
		order[i] = int32(i)
	}
	srt.sortIndices(order, keys)
	ranks = make([]int32, n)
	r := int32(0)
	for pos, i := range order {
		if pos > 0 && keys[order[pos-1]] != keys[i] {
			r++
		}
		ranks[i] = r
	}
	return ranks, order
}

// divideConquer holds the unique points, in lexicographic order, and their
// running results.
type divideConquer struct {
	speed, detour []int32 // ranks, 0 = best
	mult          []int32 // number of identical input points
	count         []int32 // dominators found so far (final after solve)
	best          []int32 // highest layer among dominators found so far
	layer         []int32 // final layer, set when the point is solved
	tree          []fenwickCell
	tmp           []int32
	// local is a stack of the blocks' local detour ranks, about 2m long: a
	// block's ranks stay in use while its left half is solved.
	local []int32
}

// fenwickCell accumulates, over a range of detour ranks, the number of
// inserted points and their highest layer.
type fenwickCell struct {
	count, layer int32
}

// split partitions the ids in order stably into those below mid and the
// rest.
func (d *divideConquer) split(order []int32, mid int32, nl int) (left, right []int32) {
	tmp := d.tmp[:len(order)]
	l, r := 0, nl
	for _, id := range order {
		if id < mid {
			tmp[l] = id
			l++
		} else {
			tmp[r] = id
			r++
		}
	}
	copy(order, tmp)
	return order[:nl], order[nl:]
}

// solve finishes the unique points lo..hi-1. On entry every contribution
// from points before lo has been added, and bySpeed and byDetour list
// lo..hi-1 by speed and by detour rank. On return the points are solved and
// bySpeed is again ordered by speed rank (ties in any order); byDetour is
// left in any order. local is free stack space for the local ranks.
func (d *divideConquer) solve(lo, hi int32, bySpeed, byDetour, local []int32) {
	if hi-lo <= baseBlock {
		for i := lo; i < hi; i++ {
			for j := lo; j < i; j++ {
				if d.speed[j] <= d.speed[i] && d.detour[j] <= d.detour[i] {
					d.count[i] += d.mult[j]
					d.best[i] = max(d.best[i], d.layer[j])
				}
			}
			d.layer[i] = d.best[i] + 1
		}
		return
	}
	mid := lo + (hi-lo)/2
	nl := int(mid - lo)
	left, right := d.split(bySpeed, mid, nl)
	leftD, rightD := d.split(byDetour, mid, nl)

	// Local detour ranks: a left point gets the 1-based rank of its detour
	// among the left detours, a right point the rank of the last left
	// detour no worse than its own (0 if none), so the Fenwick tree of the
	// cross step spans the left half only and stays in cache.
	ranks, rest := local[:hi-lo], local[hi-lo:]
	k := int32(0)
	for i, id := range leftD {
		if i == 0 || d.detour[id] != d.detour[leftD[i-1]] {
			k++
		}
		ranks[id-lo] = k
	}
	p, last := 0, int32(0)
	for _, id := range rightD {
		for p < len(leftD) && d.detour[leftD[p]] <= d.detour[id] {
			last = ranks[leftD[p]-lo]
			p++
		}
		ranks[id-lo] = last
	}

	d.solve(lo, mid, left, leftD, rest)
	d.cross(lo, left, right, ranks, int(k))
	d.solve(mid, hi, right, rightD, rest)

	// Merge the halves back into speed order.
	tmp := d.tmp[:len(bySpeed)]
	i, j, n := 0, 0, 0
	for i < len(left) && j < len(right) {
		if d.speed[right[j]] < d.speed[left[i]] {
			tmp[n] = right[j]
			j++
		} else {
			tmp[n] = left[i]
			i++
		}
		n++
	}
	n += copy(tmp[n:], left[i:])
	copy(tmp[n:], right[j:])
	copy(bySpeed, tmp)
}

// cross adds the contributions of the solved left points to the right
// points. Every left point precedes every right point lexicographically, so
// a left point dominates a right one exactly when it is no worse on speed
// and on detour. ranks holds the block's local detour ranks by id - lo,
// from 1 to size for the left points.
func (d *divideConquer) cross(lo int32, left, right, ranks []int32, size int) {
	tree := d.tree[:size+1]
	i := 0
	for _, r := range right {
		for i < len(left) && d.speed[left[i]] <= d.speed[r] {
			p := left[i]
			c, l := d.mult[p], d.layer[p]
			for x := int(ranks[p-lo]); x < len(tree); x += x & -x {
				tree[x].count += c
				tree[x].layer = max(tree[x].layer, l)
			}
			i++
		}
		if i == 0 {
			continue
		}
		var c, l int32
		for x := int(ranks[r-lo]); x > 0; x -= x & -x {
			c += tree[x].count
			l = max(l, tree[x].layer)
		}
		d.count[r] += c
		d.best[r] = max(d.best[r], l)
	}
	clear(tree)
}
