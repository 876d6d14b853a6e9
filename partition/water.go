package partition

import "github.com/paulmach/orb"

// waterPolygon is a water area's boundary on the grid, for point tests.
type waterPolygon struct {
	segs   []seg
	lo, hi ipt
}

// waterPolygons projects the water areas whose lines close up (every line
// end met by another line end; an area cut off at the extract's edge does
// not, and is used as lines only).
func waterPolygons(ex *extract, pr projection) []waterPolygon {
	var out []waterPolygon
	for _, w := range ex.waters {
		ends := map[orb.Point]int{}
		for _, li := range w.lines {
			pts := ex.lines[li].pts
			ends[pts[0]]++
			ends[pts[len(pts)-1]]++
		}
		closed := len(w.lines) > 0
		for _, n := range ends {
			closed = closed && n%2 == 0
		}
		if !closed {
			continue
		}
		var wp waterPolygon
		for _, li := range w.lines {
			var prev ipt
			for k, q := range ex.lines[li].pts {
				x, y := pr.forward(q)
				cur := ipt{toGrid(x), toGrid(y)}
				if k > 0 {
					wp.segs = append(wp.segs, seg{prev, cur, 0})
				}
				prev = cur
			}
		}
		wp.lo, wp.hi = segBox(wp.segs[0])
		for _, s := range wp.segs {
			lo, hi := segBox(s)
			wp.lo = ipt{min(wp.lo.X, lo.X), min(wp.lo.Y, lo.Y)}
			wp.hi = ipt{max(wp.hi.X, hi.X), max(wp.hi.Y, hi.Y)}
		}
		out = append(out, wp)
	}
	return out
}

// contains reports whether the grid point (x, y) lies inside the water,
// by crossing parity over all its boundary segments (so a multipolygon's
// rings need not be assembled). y must not be a grid value.
func (w *waterPolygon) contains(x, y float64) bool {
	if x < float64(w.lo.X) || x > float64(w.hi.X) || y < float64(w.lo.Y) || y > float64(w.hi.Y) {
		return false
	}
	in := false
	for _, s := range w.segs {
		ay, by := float64(s.a.Y), float64(s.b.Y)
		if (ay > y) != (by > y) {
			xi := float64(s.a.X) + (y-ay)*float64(s.b.X-s.a.X)/(by-ay)
			if xi > x {
				in = !in
			}
		}
	}
	return in
}

// waterTest tells water from land at a point: inside a water area, or on
// the water side of the coastline.
type waterTest struct {
	polys []waterPolygon
	coast coastline
}

func (w *waterTest) none() bool { return len(w.polys) == 0 && len(w.coast.segs) == 0 }

// wet reports whether the grid point (x, y) is water; y must not be a
// grid value.
func (w *waterTest) wet(x, y float64) bool {
	for i := range w.polys {
		if w.polys[i].contains(x, y) {
			return true
		}
	}
	sea, _ := w.coast.seaSide(x, y)
	return sea
}

// waterFaces marks the faces that are water: their representative point
// lies inside a water area or on the sea side of the coastline, and the
// connected water they are part of
// (water faces joined across shared edges, such as the stretches of a
// river between bridges) covers at least minArea m². Smaller water
// (ponds, basins) counts as land. It returns nil when no face is water.
func waterFaces(a *arrangement, fs *faceSet, wt *waterTest, minArea float64) []bool {
	if wt.none() {
		return nil
	}
	n := len(fs.faces)
	in := make([]bool, n)
	for f := range fs.faces {
		x, y := representativePoint(a.pts, fs.faces[f].rings)
		in[f] = wt.wet(x, y)
	}
	parent := make([]int32, n)
	for f := range parent {
		parent[f] = int32(f)
	}
	find := func(x int32) int32 {
		for parent[x] != x {
			parent[x] = parent[parent[x]]
			x = parent[x]
		}
		return x
	}
	for e := range a.edges {
		l, r := fs.left[2*e], fs.left[2*e+1]
		if l >= 0 && r >= 0 && in[l] && in[r] {
			if rl, rr := find(l), find(r); rl != rr {
				parent[max(rl, rr)] = min(rl, rr)
			}
		}
	}
	area := make([]float64, n)
	for f := range fs.faces {
		if in[f] {
			area[find(int32(f))] += fs.faces[f].area
		}
	}
	water := make([]bool, n)
	any := false
	for f := range water {
		water[f] = in[f] && area[find(int32(f))] >= minArea
		any = any || water[f]
	}
	if !any {
		return nil
	}
	return water
}
