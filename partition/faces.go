package partition

import (
	"context"
	"math/bits"
	"slices"
)

// face is a bounded face of an arrangement.
type face struct {
	// rings[0] is the outer boundary, counter-clockwise; the rest are
	// holes, clockwise. Rings hold vertex ids and are not closed.
	rings     [][]int32
	area      float64 // square metres, holes subtracted
	perimeter float64 // metres, holes included
	shellArea float64 // square metres inside the outer boundary
}

// faceSet is the face structure of an arrangement.
type faceSet struct {
	faces []face
	// left[h] is the face to the left of half-edge h, where half-edge 2e
	// runs u→v along edge e and 2e+1 runs v→u; -1 is the unbounded face,
	// -2 marks an edge that bounds no face (a dangle or a cut edge).
	left []int32
	// Counts on the arrangement as given, before pruning: vertices and
	// edges, connected components, bounded faces.
	vertices, edges, components, bounded int
	dangles, cutEdges                    int // edges pruned
}

const (
	outside = -1
	pruned  = -2
)

func (x i128) add(y i128) i128 {
	lo, carry := bits.Add64(x.lo, y.lo, 0)
	return i128{x.hi + y.hi + int64(carry), lo}
}

// exactArea2 returns twice the signed area of a ring, exactly.
func exactArea2(pts []ipt, ring []int32) i128 {
	var s i128
	o := pts[ring[0]]
	for i := 1; i+1 < len(ring); i++ {
		a, b := pts[ring[i]], pts[ring[i+1]]
		s = s.add(cross(a.X-o.X, a.Y-o.Y, b.X-o.X, b.Y-o.Y))
	}
	return s
}

// rotation is the cyclic order of half-edges leaving each vertex.
type rotation struct {
	start []int32 // half-edges leaving v are out[start[v]:start[v+1]], counter-clockwise
	out   []int32
	pos   []int32 // pos[h] is the index of h in out
}

func (a *arrangement) tail(h int32) int32 {
	if h&1 == 0 {
		return a.edges[h>>1].u
	}
	return a.edges[h>>1].v
}

func (a *arrangement) head(h int32) int32 { return a.tail(h ^ 1) }

// halfPlane is 0 for directions in [0°, 180°), 1 for [180°, 360°).
func halfPlane(dx, dy int64) int {
	if dy > 0 || (dy == 0 && dx > 0) {
		return 0
	}
	return 1
}

func (a *arrangement) rotation(alive []bool) *rotation {
	n := len(a.pts)
	r := &rotation{start: make([]int32, n+1), pos: make([]int32, 2*len(a.edges))}
	for e, ed := range a.edges {
		if alive[e] {
			r.start[ed.u+1]++
			r.start[ed.v+1]++
		}
	}
	for v := 1; v <= n; v++ {
		r.start[v] += r.start[v-1]
	}
	r.out = make([]int32, r.start[n])
	fill := slices.Clone(r.start[:n])
	for e, ed := range a.edges {
		if alive[e] {
			r.out[fill[ed.u]] = int32(2 * e)
			fill[ed.u]++
			r.out[fill[ed.v]] = int32(2*e + 1)
			fill[ed.v]++
		}
	}
	for v := range n {
		hs := r.out[r.start[v]:r.start[v+1]]
		if len(hs) > 1 {
			p := a.pts[v]
			slices.SortFunc(hs, func(h, k int32) int {
				q1, q2 := a.pts[a.head(h)], a.pts[a.head(k)]
				d1x, d1y, d2x, d2y := q1.X-p.X, q1.Y-p.Y, q2.X-p.X, q2.Y-p.Y
				if h1, h2 := halfPlane(d1x, d1y), halfPlane(d2x, d2y); h1 != h2 {
					return h1 - h2
				}
				return -cross(d1x, d1y, d2x, d2y).sign()
			})
		}
		for i, h := range hs {
			r.pos[h] = int32(i)
		}
	}
	return r
}

// next returns the half-edge after h along the face to h's left: the one
// leaving h's head immediately clockwise from h's twin.
func (a *arrangement) next(r *rotation, h int32) int32 {
	v := a.head(h)
	s, deg := r.start[v], r.start[v+1]-r.start[v]
	k := r.pos[h^1]
	return r.out[s+(k-1+deg)%deg]
}

// cycles traces the boundary cycles of the alive edges: cyc[h] is the
// cycle of half-edge h (-1 for dead edges), and each cycle lists its
// half-edges in order.
func (a *arrangement) cycles(alive []bool, r *rotation) (cyc []int32, list [][]int32) {
	cyc = make([]int32, 2*len(a.edges))
	for i := range cyc {
		cyc[i] = -1
	}
	for h0 := range int32(len(cyc)) {
		if !alive[h0>>1] || cyc[h0] >= 0 {
			continue
		}
		id := int32(len(list))
		var hs []int32
		for h := h0; cyc[h] < 0; h = a.next(r, h) {
			cyc[h] = id
			hs = append(hs, h)
		}
		list = append(list, hs)
	}
	return cyc, list
}

// components labels the connected components of the alive edges.
func (a *arrangement) components(alive []bool) (comp []int32, n int) {
	parent := make([]int32, len(a.pts))
	for i := range parent {
		parent[i] = int32(i)
	}
	var find func(int32) int32
	find = func(x int32) int32 {
		for parent[x] != x {
			parent[x] = parent[parent[x]]
			x = parent[x]
		}
		return x
	}
	used := make([]bool, len(a.pts))
	for e, ed := range a.edges {
		if alive[e] {
			used[ed.u], used[ed.v] = true, true
			if ru, rv := find(ed.u), find(ed.v); ru != rv {
				parent[max(ru, rv)] = min(ru, rv)
			}
		}
	}
	comp = make([]int32, len(a.pts))
	for v := range comp {
		comp[v] = -1
		if used[v] {
			comp[v] = find(int32(v))
			if comp[v] == int32(v) {
				n++
			}
		}
	}
	return comp, n
}

// faces computes the bounded faces of a, after dropping dangles (edges
// with an end of degree one, repeatedly) and cut edges (edges with the
// same face on both sides), as a polygonizer does. Islands become holes
// of the smallest face that contains them.
func (a *arrangement) faces(ctx context.Context) (*faceSet, error) {
	fs := &faceSet{left: make([]int32, 2*len(a.edges))}
	alive := make([]bool, len(a.edges))
	for i := range alive {
		alive[i] = true
	}
	deg := make([]int32, len(a.pts))
	for _, ed := range a.edges {
		deg[ed.u]++
		deg[ed.v]++
	}
	for _, d := range deg {
		if d > 0 {
			fs.vertices++
		}
	}
	fs.edges = len(a.edges)
	_, fs.components = a.components(alive)
	{
		r := a.rotation(alive)
		_, list := a.cycles(alive, r)
		for _, hs := range list {
			if isShell(a, hs) {
				fs.bounded++
			}
		}
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}

	// Drop dangles, then cut edges, until neither is left.
	incident := make([][]int32, len(a.pts))
	for e, ed := range a.edges {
		incident[ed.u] = append(incident[ed.u], int32(e))
		incident[ed.v] = append(incident[ed.v], int32(e))
	}
	var queue []int32
	for v, d := range deg {
		if d == 1 {
			queue = append(queue, int32(v))
		}
	}
	dropDangles := func() {
		for len(queue) > 0 {
			v := queue[len(queue)-1]
			queue = queue[:len(queue)-1]
			if deg[v] != 1 {
				continue
			}
			for _, e := range incident[v] {
				if !alive[e] {
					continue
				}
				alive[e] = false
				fs.dangles++
				ed := a.edges[e]
				deg[ed.u]--
				deg[ed.v]--
				w := ed.u
				if w == v {
					w = ed.v
				}
				if deg[w] == 1 {
					queue = append(queue, w)
				}
			}
		}
	}
	var (
		r    *rotation
		cyc  []int32
		list [][]int32
	)
	for {
		dropDangles()
		r = a.rotation(alive)
		cyc, list = a.cycles(alive, r)
		cut := false
		for e := range a.edges {
			if alive[e] && cyc[2*e] == cyc[2*e+1] {
				alive[e] = false
				fs.cutEdges++
				cut = true
				ed := a.edges[e]
				deg[ed.u]--
				deg[ed.v]--
				for _, w := range []int32{ed.u, ed.v} {
					if deg[w] == 1 {
						queue = append(queue, w)
					}
				}
			}
		}
		if !cut {
			break
		}
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}

	// Shells are counter-clockwise cycles; clockwise ones are the outer
	// boundaries of connected components.
	comp, _ := a.components(alive)
	type holeRing struct {
		cycle int
		area  float64
	}
	cycFace := make([]int32, len(list))
	var holes []holeRing
	type shellBox struct{ lo, hi ipt }
	var boxes []shellBox
	for c, hs := range list {
		ring := a.ringOf(hs)
		ar := exactArea2(a.pts, ring)
		if ar.sign() > 0 {
			cycFace[c] = int32(len(fs.faces))
			area := ar.float() / 2 * gridMetres * gridMetres
			fs.faces = append(fs.faces, face{rings: [][]int32{ring}, area: area, perimeter: a.length(hs), shellArea: area})
			lo, hi := a.pts[ring[0]], a.pts[ring[0]]
			for _, v := range ring {
				p := a.pts[v]
				lo = ipt{min(lo.X, p.X), min(lo.Y, p.Y)}
				hi = ipt{max(hi.X, p.X), max(hi.Y, p.Y)}
			}
			boxes = append(boxes, shellBox{lo, hi})
		} else {
			cycFace[c] = outside
			holes = append(holes, holeRing{c, ar.float() / 2 * gridMetres * gridMetres})
		}
	}
	for _, h := range holes {
		hs := list[h.cycle]
		v := a.tail(hs[0])
		p := a.pts[v]
		best := int32(outside)
		for f := range fs.faces {
			b := boxes[f]
			if p.X < b.lo.X || p.X > b.hi.X || p.Y < b.lo.Y || p.Y > b.hi.Y {
				continue
			}
			shell := fs.faces[f].rings[0]
			if comp[shell[0]] == comp[v] || !insideRing(a.pts, shell, p) {
				continue
			}
			// The smallest outer boundary around the island is the face
			// it lies in (net areas would mislead once holes are cut).
			if best < 0 || fs.faces[f].shellArea < fs.faces[best].shellArea {
				best = int32(f)
			}
		}
		cycFace[h.cycle] = best
		if best >= 0 {
			f := &fs.faces[best]
			f.rings = append(f.rings, a.ringOf(hs))
			f.area += h.area
			f.perimeter += a.length(hs)
		}
	}
	for h := range fs.left {
		if cyc[h] < 0 {
			fs.left[h] = pruned
		} else {
			fs.left[h] = cycFace[cyc[h]]
		}
	}
	return fs, nil
}

// isShell reports whether a cycle bounds a face from inside: positive
// area, and not a tree traced on both sides (which has area zero).
func isShell(a *arrangement, hs []int32) bool {
	return exactArea2(a.pts, a.ringOf(hs)).sign() > 0
}

func (a *arrangement) ringOf(hs []int32) []int32 {
	ring := make([]int32, len(hs))
	for i, h := range hs {
		ring[i] = a.tail(h)
	}
	return ring
}

func (a *arrangement) length(hs []int32) float64 {
	var s float64
	for _, h := range hs {
		ed := a.edges[h>>1]
		s += dist(a.pts[ed.u], a.pts[ed.v])
	}
	return s
}

// insideRing reports whether p lies strictly inside the ring (p must not
// lie on it), by exact crossing number.
func insideRing(pts []ipt, ring []int32, p ipt) bool {
	in := false
	for i := range ring {
		a, b := pts[ring[i]], pts[ring[(i+1)%len(ring)]]
		if (a.Y > p.Y) != (b.Y > p.Y) {
			o := orient(a, b, p).sign()
			if (b.Y > a.Y) == (o > 0) {
				in = !in
			}
		}
	}
	return in
}
