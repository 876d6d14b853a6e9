package partition

import "math"

// extendDirectionMetres is how far back along a road its end's direction
// is taken: far enough that the micrometre grid and a short last piece do
// not swing it, short enough to follow the road's last stretch.
const extendDirectionMetres = 10

// overshootArtefactMetres marks the millimetre overshoots of gap-closing
// connectors, which are dangles but no road ends.
const overshootArtefactMetres = 0.01

// extendDangles returns connectors that extend major roads ending in the
// open: from each line end (a vertex of degree one) on an edge whose way
// extendable accepts, straight ahead along the road's last stretch, to
// the first barrier or road met within reach metres. The connector
// overshoots its target by a millimetre so that noding finds the
// crossing; the overshoot is a dangle and is dropped. A road end with
// nothing ahead within reach stays a dangle.
func extendDangles(a *arrangement, extendable func(way int32) bool, reach float64) []seg {
	start, adj := adjacency(a)
	idx := newGridIndex(len(a.edges), func(i int) (ipt, ipt) {
		ed := a.edges[i]
		return segBox(seg{a.pts[ed.u], a.pts[ed.v], 0})
	})
	var out []seg
	for v := range int32(len(a.pts)) {
		if start[v+1]-start[v] != 1 {
			continue
		}
		own := adj[start[v]]
		ed := a.edges[own]
		if ed.way < 0 || !extendable(ed.way) || dist(a.pts[ed.u], a.pts[ed.v]) < overshootArtefactMetres {
			continue
		}
		dx, dy, ok := endDirection(a, start, adj, v)
		if !ok {
			continue
		}
		if q, hit := castRay(a, idx, v, dx, dy, reach); hit {
			out = append(out, seg{a.pts[v], q, ed.way})
		}
	}
	return out
}

// adjacency returns the edges at each vertex in CSR form: the edges at v
// are adj[start[v]:start[v+1]].
func adjacency(a *arrangement) (start, adj []int32) {
	start = make([]int32, len(a.pts)+1)
	for _, ed := range a.edges {
		start[ed.u+1]++
		start[ed.v+1]++
	}
	for v := 1; v <= len(a.pts); v++ {
		start[v] += start[v-1]
	}
	adj = make([]int32, start[len(a.pts)])
	fill := make([]int32, len(a.pts))
	copy(fill, start)
	for e, ed := range a.edges {
		adj[fill[ed.u]] = int32(e)
		fill[ed.u]++
		adj[fill[ed.v]] = int32(e)
		fill[ed.v]++
	}
	return start, adj
}

// endDirection returns the unit direction in which the line ending at v
// points, taken from the point extendDirectionMetres back along it (or
// the line's last vertex before a junction, if nearer).
func endDirection(a *arrangement, start, adj []int32, v int32) (dx, dy float64, ok bool) {
	cur, e := v, adj[start[v]]
	for walked := 0.0; ; {
		ed := a.edges[e]
		next := ed.u
		if next == cur {
			next = ed.v
		}
		walked += dist(a.pts[cur], a.pts[next])
		cur = next
		if walked >= extendDirectionMetres || start[cur+1]-start[cur] != 2 || cur == v {
			break
		}
		for _, f := range adj[start[cur]:start[cur+1]] {
			if f != e {
				e = f
				break
			}
		}
	}
	p, q := a.pts[v], a.pts[cur]
	dx, dy = float64(p.X-q.X), float64(p.Y-q.Y)
	n := math.Hypot(dx, dy)
	if n == 0 {
		return 0, 0, false
	}
	return dx / n, dy / n, true
}

// castRay finds the first edge (not the study rectangle's boundary, not
// an edge at v) that the ray from v along (dx, dy) meets within reach
// metres, and returns the point to join: the edge's vertex if the ray
// meets it there, else the crossing a millimetre further on.
func castRay(a *arrangement, idx *gridIndex, v int32, dx, dy, reach float64) (ipt, bool) {
	p := a.pts[v]
	L := reach / gridMetres
	rx, ry := dx*L, dy*L
	end := ipt{p.X + int64(math.Round(rx)), p.Y + int64(math.Round(ry))}
	lo := ipt{min(p.X, end.X), min(p.Y, end.Y)}
	hi := ipt{max(p.X, end.X), max(p.Y, end.Y)}
	bestT, bestE, bestU := math.Inf(1), int32(-1), 0.0
	idx.query(lo, hi, func(e int32) {
		ed := a.edges[e]
		if ed.way < 0 || ed.u == v || ed.v == v {
			return
		}
		qa, qb := a.pts[ed.u], a.pts[ed.v]
		sx, sy := float64(qb.X-qa.X), float64(qb.Y-qa.Y)
		den := rx*sy - ry*sx
		if den == 0 {
			return
		}
		wx, wy := float64(qa.X-p.X), float64(qa.Y-p.Y)
		t := (wx*sy - wy*sx) / den
		u := (wx*ry - wy*rx) / den
		if t <= 0 || t > 1 || u < 0 || u > 1 || t > bestT || (t == bestT && e > bestE) {
			return
		}
		bestT, bestE, bestU = t, e, u
	})
	if bestE < 0 {
		return ipt{}, false
	}
	ed := a.edges[bestE]
	switch {
	case bestU == 0:
		return a.pts[ed.u], true
	case bestU == 1:
		return a.pts[ed.v], true
	}
	k := bestT + 1e-3/reach
	return ipt{p.X + int64(math.Round(rx*k)), p.Y + int64(math.Round(ry*k))}, true
}
