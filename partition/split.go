package partition

import (
	"container/heap"
	"context"
	"slices"
)

// split cuts land regions larger than Options.MaxRegionKM2 with the
// SplitRoads inside them, one class at a time in the order given: the
// segments of the class with an end inside a region still oversized are
// added (a piece poking into a neighbour is a dangle and is dropped),
// roads of the class that end short of a border are extended to it, and
// the pieces are cleaned like the rest; the next class is tried only on
// the regions still oversized. Regions of normal size are not touched.
func (c *cleaner) split(ctx context.Context, arr *arrangement, fs *faceSet, water []bool) (*arrangement, *faceSet, []bool, error) {
	limit := c.o.MaxRegionKM2 * 1e6
	big := oversized(arr, fs, water, limit)
	c.st.Oversized = len(big)
	if len(big) == 0 {
		return arr, fs, water, nil
	}
	lines := clipLines(c.ex.splitLines, c.pr, c.rc)
	cur := big
	var err error
	for _, class := range c.o.SplitRoads {
		if len(cur) == 0 {
			break
		}
		var cut []seg
		for _, s := range lines {
			if c.ex.ways[s.way].class == class && (insideAny(cur, s.a) || insideAny(cur, s.b)) {
				cut = append(cut, s)
			}
		}
		if len(cut) == 0 {
			continue
		}
		// Start from the current regions' borders, so that what earlier
		// classes merged stays merged.
		segs := slices.Concat(segsOf(arr, fs), cut)
		if arr, err = node(ctx, segs); err != nil {
			return nil, nil, nil, err
		}
		if c.o.ExtendMetres > 0 {
			ways := c.ex.ways
			ofClass := func(w int32) bool { return !ways[w].major && ways[w].class == class }
			if ext := extendDangles(arr, ofClass, c.o.ExtendMetres); len(ext) > 0 {
				c.st.DanglesExtended += len(ext)
				segs = slices.Concat(segs, ext)
				if arr, err = node(ctx, segs); err != nil {
					return nil, nil, nil, err
				}
			}
		}
		if fs, err = arr.faces(ctx); err != nil {
			return nil, nil, nil, err
		}
		if arr, fs, water, err = c.merge(ctx, arr, fs); err != nil {
			return nil, nil, nil, err
		}
		if arr, fs, water, err = c.coarsen(ctx, arr, fs, water, cur, limit*splitPieceShare, limit); err != nil {
			return nil, nil, nil, err
		}
		c.st.SplitClasses = append(c.st.SplitClasses, class)
		cur = oversized(arr, fs, water, limit)
	}
	c.countSplits(arr, fs, water, big)
	for i := range cur {
		c.st.StillOversized++
		// By the middle of a segment: an end may lie on the border.
		mid := func(s seg) bool {
			return cur[i].contains(float64(s.a.X+s.b.X)/2+0.25, float64(s.a.Y+s.b.Y)/2+0.25)
		}
		if !slices.ContainsFunc(lines, mid) {
			c.st.StillOversizedNoRoads++
		}
	}
	return arr, fs, water, nil
}

// segsOf returns the edges of arr that bound a face, as segments.
func segsOf(arr *arrangement, fs *faceSet) []seg {
	out := make([]seg, 0, len(arr.edges))
	for e, ed := range arr.edges {
		if fs.left[2*e] != pruned {
			out = append(out, seg{arr.pts[ed.u], arr.pts[ed.v], ed.way})
		}
	}
	return out
}

// oversized returns the land faces larger than limit m² as polygons.
func oversized(arr *arrangement, fs *faceSet, water []bool, limit float64) []waterPolygon {
	var big []waterPolygon
	for f := range fs.faces {
		if (water == nil || !water[f]) && fs.faces[f].area > limit {
			big = append(big, facePolygon(arr, &fs.faces[f]))
		}
	}
	return big
}

// inside reports whether the grid point p, moved half a step off the grid,
// lies inside the polygon.
func (w *waterPolygon) inside(p ipt) bool {
	return w.contains(float64(p.X)+0.5, float64(p.Y)+0.5)
}

func insideAny(polys []waterPolygon, p ipt) bool {
	for i := range polys {
		if polys[i].inside(p) {
			return true
		}
	}
	return false
}

// countSplits records how many oversized regions were split and into how
// many regions.
func (c *cleaner) countSplits(arr *arrangement, fs *faceSet, water []bool, big []waterPolygon) {
	pieces := make([]int, len(big))
	for f := range fs.faces {
		if water != nil && water[f] {
			continue
		}
		x, y := representativePoint(arr.pts, fs.faces[f].rings)
		for i := range big {
			if big[i].contains(x, y) {
				pieces[i]++
				break
			}
		}
	}
	for _, n := range pieces {
		if n > 1 {
			c.st.RegionsSplit++
			c.st.SplitInto += n
		}
	}
}

// facePolygon returns a face's rings as a polygon for point tests.
func facePolygon(a *arrangement, f *face) waterPolygon {
	var wp waterPolygon
	for _, ring := range f.rings {
		for i := range ring {
			wp.segs = append(wp.segs, seg{a.pts[ring[i]], a.pts[ring[(i+1)%len(ring)]], 0})
		}
	}
	wp.lo, wp.hi = segBox(wp.segs[0])
	for _, s := range wp.segs {
		lo, hi := segBox(s)
		wp.lo = ipt{min(wp.lo.X, lo.X), min(wp.lo.Y, lo.Y)}
		wp.hi = ipt{max(wp.hi.X, hi.X), max(wp.hi.Y, hi.Y)}
	}
	return wp
}

// splitPieceShare sets the smallest piece an oversized region is cut into,
// as a share of Options.MaxRegionKM2: smaller pieces (the blocks between
// residential streets, the fields between tracks) rejoin a neighbouring
// piece of the same region, so that splitting by minor roads gives
// district-sized regions, not blocks.
const splitPieceShare = 1.0 / 4

// coarsen merges the land faces that lie in one of the polygons parts and
// are smaller than minArea m² into the neighbouring face of the same part
// with the longest shared border (preferring one that stays within limit
// m²), smallest first, until every face of a part is large enough or the
// part is one face.
func (c *cleaner) coarsen(ctx context.Context, arr *arrangement, fs *faceSet, water []bool, parts []waterPolygon, minArea, limit float64) (*arrangement, *faceSet, []bool, error) {
	n := len(fs.faces)
	part := make([]int32, n)
	area := make([]float64, n)
	adj := make([]map[int32]float64, n)
	for f := range fs.faces {
		part[f], area[f] = -1, fs.faces[f].area
		if water != nil && water[f] {
			continue
		}
		x, y := representativePoint(arr.pts, fs.faces[f].rings)
		for i := range parts {
			if parts[i].contains(x, y) {
				part[f] = int32(i)
				adj[f] = map[int32]float64{}
				break
			}
		}
	}
	for e, ed := range arr.edges {
		l, r := fs.left[2*e], fs.left[2*e+1]
		if l < 0 || r < 0 || l == r || part[l] < 0 || part[l] != part[r] {
			continue
		}
		d := dist(arr.pts[ed.u], arr.pts[ed.v])
		adj[l][r] += d
		adj[r][l] += d
	}
	parent := make([]int32, n)
	h := make(areaHeap, 0, n)
	for f := range parent {
		parent[f] = int32(f)
		if part[f] >= 0 {
			h = append(h, areaItem{int32(f), area[f]})
		}
	}
	heap.Init(&h)
	merges := 0
	for h.Len() > 0 {
		it := heap.Pop(&h).(areaItem)
		g := it.f
		if parent[g] != g || it.area != area[g] || area[g] >= minArea {
			continue
		}
		// The neighbour with the longest shared border, among those that
		// stay within the limit if any does.
		t, best, fits := int32(-1), -1.0, false
		for nb, l := range adj[g] {
			f := area[nb]+area[g] <= limit
			if (f && !fits) || (f == fits && (l > best || (l == best && nb < t))) {
				t, best, fits = nb, l, f
			}
		}
		if t < 0 {
			continue
		}
		area[t] += area[g]
		delete(adj[t], g)
		for nb, l := range adj[g] {
			if nb != t {
				adj[t][nb] += l
				adj[nb][t] += l
				delete(adj[nb], g)
			}
		}
		adj[g], parent[g] = nil, t
		merges++
		heap.Push(&h, areaItem{t, area[t]})
	}
	if merges == 0 {
		return arr, fs, water, nil
	}
	group := make([]int32, n)
	for f := range group {
		r := int32(f)
		for parent[r] != r {
			r = parent[r]
		}
		group[f] = r
	}
	arr = dissolve(arr, fs, group)
	fs, err := arr.faces(ctx)
	if err != nil {
		return nil, nil, nil, err
	}
	// The merged pieces change which faces touch water; clean again.
	return c.merge(ctx, arr, fs)
}
