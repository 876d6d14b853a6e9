package partition

import (
	"cmp"
	"context"
	"math"
	"slices"
)

// seg is an input segment on the grid. way indexes extract.ways; -1 marks
// the study rectangle's boundary.
type seg struct {
	a, b ipt
	way  int32
}

// edge is an edge of the noded arrangement between vertices u < v.
type edge struct {
	u, v int32
	way  int32
}

// arrangement is planar linework: no two edges cross or overlap, and they
// meet only at shared vertices.
type arrangement struct {
	pts   []ipt  // vertices, sorted by X then Y
	edges []edge // sorted by (u, v)
}

// node splits segs at every crossing, T-junction and overlap and returns
// the resulting arrangement, with duplicate edges dissolved. Where edges
// coincide the edge keeps the way with the lowest index (the highest
// class), the rectangle boundary only where no way runs.
func node(ctx context.Context, segs []seg) (*arrangement, error) {
	segs = slices.DeleteFunc(segs, func(s seg) bool { return s.a == s.b })
	splits := make([][]ipt, len(segs))
	if err := findIntersections(ctx, segs, func(i int, p ipt) {
		if p != segs[i].a && p != segs[i].b {
			splits[i] = append(splits[i], p)
		}
	}); err != nil {
		return nil, err
	}

	type piece struct {
		a, b ipt
		way  int32
	}
	var pieces []piece
	var pts []ipt
	for i, s := range segs {
		sp := append(splits[i], s.a, s.b)
		// Order along the segment by its dominant axis, which is monotone
		// along the segment even after rounding.
		dx, dy := s.b.X-s.a.X, s.b.Y-s.a.Y
		if abs64(dx) >= abs64(dy) {
			slices.SortFunc(sp, func(p, q ipt) int { return cmp.Or(cmp.Compare(p.X, q.X), cmp.Compare(p.Y, q.Y)) })
		} else {
			slices.SortFunc(sp, func(p, q ipt) int { return cmp.Or(cmp.Compare(p.Y, q.Y), cmp.Compare(p.X, q.X)) })
		}
		sp = slices.Compact(sp)
		for j := 0; j+1 < len(sp); j++ {
			pieces = append(pieces, piece{sp[j], sp[j+1], s.way})
		}
		pts = append(pts, sp...)
	}
	slices.SortFunc(pts, func(p, q ipt) int { return cmp.Or(cmp.Compare(p.X, q.X), cmp.Compare(p.Y, q.Y)) })
	pts = slices.Compact(pts)
	id := make(map[ipt]int32, len(pts))
	for i, p := range pts {
		id[p] = int32(i)
	}
	byEnds := make(map[[2]int32]int32, len(pieces))
	for _, pc := range pieces {
		u, v := id[pc.a], id[pc.b]
		if u > v {
			u, v = v, u
		}
		k := [2]int32{u, v}
		if w, ok := byEnds[k]; !ok || w < 0 || (pc.way >= 0 && pc.way < w) {
			byEnds[k] = pc.way
		}
	}
	edges := make([]edge, 0, len(byEnds))
	for k, w := range byEnds {
		edges = append(edges, edge{k[0], k[1], w})
	}
	slices.SortFunc(edges, func(a, b edge) int { return cmp.Or(cmp.Compare(a.u, b.u), cmp.Compare(a.v, b.v)) })
	return &arrangement{pts: pts, edges: edges}, nil
}

func abs64(x int64) int64 {
	if x < 0 {
		return -x
	}
	return x
}

// gridIndex buckets segment bounding boxes into square cells.
type gridIndex struct {
	minX, minY int64
	cell       int64
	nx, ny     int
	start      []int32 // CSR: items of cell c are items[start[c]:start[c+1]]
	items      []int32
}

// newGridIndex indexes n boxes given by box(i) = (min, max), aiming at a
// few boxes per cell.
func newGridIndex(n int, box func(i int) (ipt, ipt)) *gridIndex {
	g := &gridIndex{minX: math.MaxInt64, minY: math.MaxInt64}
	maxX, maxY := int64(math.MinInt64), int64(math.MinInt64)
	var sumExt float64
	for i := range n {
		lo, hi := box(i)
		g.minX, g.minY = min(g.minX, lo.X), min(g.minY, lo.Y)
		maxX, maxY = max(maxX, hi.X), max(maxY, hi.Y)
		sumExt += float64(max(hi.X-lo.X, hi.Y-lo.Y))
	}
	if n == 0 {
		g.minX, g.minY, g.cell, g.nx, g.ny = 0, 0, 1, 1, 1
		g.start = make([]int32, 2)
		return g
	}
	w, h := float64(maxX-g.minX+1), float64(maxY-g.minY+1)
	// Cells about as large as the typical box, but no more than ~4n cells.
	c := max(sumExt/float64(n), math.Sqrt(w*h/float64(4*n)), 1)
	g.cell = int64(math.Ceil(c))
	g.nx = int(math.Min(float64((maxX-g.minX)/g.cell+1), 1<<15))
	g.ny = int(math.Min(float64((maxY-g.minY)/g.cell+1), 1<<15))
	for g.nx*g.ny > 4*n+16 {
		g.cell *= 2
		g.nx = int((maxX-g.minX)/g.cell + 1)
		g.ny = int((maxY-g.minY)/g.cell + 1)
	}
	counts := make([]int32, g.nx*g.ny+1)
	for i := range n {
		lo, hi := box(i)
		x0, y0, x1, y1 := g.cellRange(lo, hi)
		for y := y0; y <= y1; y++ {
			for x := x0; x <= x1; x++ {
				counts[y*g.nx+x+1]++
			}
		}
	}
	for c := 1; c < len(counts); c++ {
		counts[c] += counts[c-1]
	}
	g.start = slices.Clone(counts)
	g.items = make([]int32, counts[len(counts)-1])
	for i := range n {
		lo, hi := box(i)
		x0, y0, x1, y1 := g.cellRange(lo, hi)
		for y := y0; y <= y1; y++ {
			for x := x0; x <= x1; x++ {
				c := y*g.nx + x
				g.items[counts[c]] = int32(i)
				counts[c]++
			}
		}
	}
	return g
}

func (g *gridIndex) cellOf(p ipt) (int, int) {
	x := int((p.X - g.minX) / g.cell)
	y := int((p.Y - g.minY) / g.cell)
	return min(max(x, 0), g.nx-1), min(max(y, 0), g.ny-1)
}

func (g *gridIndex) cellRange(lo, hi ipt) (x0, y0, x1, y1 int) {
	x0, y0 = g.cellOf(lo)
	x1, y1 = g.cellOf(hi)
	return
}

// query calls fn for each item in the cells overlapping [lo, hi]; an item
// may be reported more than once.
func (g *gridIndex) query(lo, hi ipt, fn func(i int32)) {
	x0, y0, x1, y1 := g.cellRange(lo, hi)
	for y := y0; y <= y1; y++ {
		for x := x0; x <= x1; x++ {
			c := y*g.nx + x
			for _, i := range g.items[g.start[c]:g.start[c+1]] {
				fn(i)
			}
		}
	}
}

func segBox(s seg) (ipt, ipt) {
	return ipt{min(s.a.X, s.b.X), min(s.a.Y, s.b.Y)}, ipt{max(s.a.X, s.b.X), max(s.a.Y, s.b.Y)}
}

// findIntersections reports, for every pair of segments that meet, the
// points where each must be split: an end point of one lying on the other
// (exact test), or the rounded crossing point of a proper crossing.
func findIntersections(ctx context.Context, segs []seg, split func(i int, p ipt)) error {
	g := newGridIndex(len(segs), func(i int) (ipt, ipt) { return segBox(segs[i]) })
	for c := 0; c < g.nx*g.ny; c++ {
		if c%1024 == 0 {
			if err := ctx.Err(); err != nil {
				return err
			}
		}
		cx, cy := c%g.nx, c/g.nx
		items := g.items[g.start[c]:g.start[c+1]]
		for ii, i := range items {
			alo, ahi := segBox(segs[i])
			for _, j := range items[ii+1:] {
				blo, bhi := segBox(segs[j])
				if alo.X > bhi.X || blo.X > ahi.X || alo.Y > bhi.Y || blo.Y > ahi.Y {
					continue
				}
				// Handle each pair once: in the cell holding the lower-left
				// corner of the boxes' overlap.
				if ox, oy := g.cellOf(ipt{max(alo.X, blo.X), max(alo.Y, blo.Y)}); ox != cx || oy != cy {
					continue
				}
				intersect(segs, int(i), int(j), split)
			}
		}
	}
	return nil
}

// within reports whether p lies in the bounding box of s (used after an
// exact collinearity test).
func within(s seg, p ipt) bool {
	return p.X >= min(s.a.X, s.b.X) && p.X <= max(s.a.X, s.b.X) && p.Y >= min(s.a.Y, s.b.Y) && p.Y <= max(s.a.Y, s.b.Y)
}

func intersect(segs []seg, i, j int, split func(i int, p ipt)) {
	s, t := segs[i], segs[j]
	o1, o2 := orient(s.a, s.b, t.a), orient(s.a, s.b, t.b)
	o3, o4 := orient(t.a, t.b, s.a), orient(t.a, t.b, s.b)
	s1, s2, s3, s4 := o1.sign(), o2.sign(), o3.sign(), o4.sign()
	touch := false
	if s1 == 0 && within(s, t.a) {
		split(i, t.a)
		touch = true
	}
	if s2 == 0 && within(s, t.b) {
		split(i, t.b)
		touch = true
	}
	if s3 == 0 && within(t, s.a) {
		split(j, s.a)
		touch = true
	}
	if s4 == 0 && within(t, s.b) {
		split(j, s.b)
		touch = true
	}
	if touch || s1*s2 >= 0 || s3*s4 >= 0 {
		return
	}
	// Proper crossing: the point at parameter o3/(o3-o4) along s.
	f3, f4 := o3.float(), o4.float()
	u := f3 / (f3 - f4)
	p := ipt{s.a.X + int64(math.Round(u*float64(s.b.X-s.a.X))), s.a.Y + int64(math.Round(u*float64(s.b.Y-s.a.Y)))}
	split(i, p)
	split(j, p)
}
