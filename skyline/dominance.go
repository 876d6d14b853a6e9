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
	order := lexOrder(tripsRank, speedRank, detourRank, keys, &srt)
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
	d.tmp = make([]entry, m)
	d.tree = make([]fenwickCell, m/2+2)
	d.local = make([]int32, 2*m+64) // sizes along a path: m, ⌈m/2⌉, ...

	order = order[:m]
	for i := range order {
		order[i] = int32(i)
		keys[i] = uint64(d.speed[i])
	}
	srt.sortIndices(order, keys[:m])
	bySpeed := make([]entry, m)
	for i, id := range order {
		bySpeed[i] = entry{id, d.speed[id]}
	}
	for i := range order {
		order[i] = int32(i)
		keys[i] = uint64(d.detour[i])
	}
	srt.sortIndices(order, keys[:m])
	byDetour := make([]entry, m)
	for i, id := range order {
		byDetour[i] = entry{id, d.detour[id]}
	}
	d.solve(0, int32(m), bySpeed, byDetour, d.local)

	for i := range n {
		u := unique[i]
		res.dominators[i] = int(d.count[u])
		res.layers[i] = int(d.layer[u])
	}
	return res
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
	tmp           []entry
	// local is a stack of the blocks' local detour ranks, about 2m long: a
	// block's ranks stay in use while its left half is solved.
	local []int32
}

// fenwickCell accumulates, over a range of detour ranks, the number of
// inserted points and their highest layer.
type fenwickCell struct {
	count, layer int32
}

// entry is one unique point in a list ordered by one axis, with its rank
// on that axis carried along so that sweeps read the list in order.
type entry struct {
	id, rank int32
}

// split partitions the entries stably into those with ids below mid (nl
// of them) and the rest.
func (d *divideConquer) split(list []entry, mid int32, nl int) (left, right []entry) {
	tmp := d.tmp[:len(list)]
	l, r := 0, nl
	for _, e := range list {
		if e.id < mid {
			tmp[l] = e
			l++
		} else {
			tmp[r] = e
			r++
		}
	}
	copy(list, tmp)
	return list[:nl], list[nl:]
}

// solve finishes the unique points lo..hi-1. On entry every contribution
// from points before lo has been added, and bySpeed and byDetour list
// lo..hi-1 by speed and by detour rank. On return the points are solved and
// bySpeed is again ordered by speed rank (ties in any order); byDetour is
// left in any order. local is free stack space for the local ranks.
func (d *divideConquer) solve(lo, hi int32, bySpeed, byDetour []entry, local []int32) {
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
	for i, e := range leftD {
		if i == 0 || e.rank != leftD[i-1].rank {
			k++
		}
		ranks[e.id-lo] = k
	}
	p, last := 0, int32(0)
	for _, e := range rightD {
		for p < len(leftD) && leftD[p].rank <= e.rank {
			last = ranks[leftD[p].id-lo]
			p++
		}
		ranks[e.id-lo] = last
	}

	d.solve(lo, mid, left, leftD, rest)
	d.cross(lo, left, right, ranks, int(k))
	d.solve(mid, hi, right, rightD, rest)

	// Merge the halves back into speed order.
	tmp := d.tmp[:len(bySpeed)]
	i, j, n := 0, 0, 0
	for i < len(left) && j < len(right) {
		if right[j].rank < left[i].rank {
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
func (d *divideConquer) cross(lo int32, left, right []entry, ranks []int32, size int) {
	tree := d.tree[:size+1]
	i := 0
	for _, r := range right {
		for i < len(left) && left[i].rank <= r.rank {
			p := left[i].id
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
		for x := int(ranks[r.id-lo]); x > 0; x -= x & -x {
			c += tree[x].count
			l = max(l, tree[x].layer)
		}
		d.count[r.id] += c
		d.best[r.id] = max(d.best[r.id], l)
	}
	clear(tree)
}
