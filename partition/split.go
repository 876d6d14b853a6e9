package partition

import (
	"context"
	"slices"
)

// split cuts land regions larger than Options.MaxRegionKM2 with the
// SplitRoads inside them: their segments with an end inside such a region
// are added (a piece poking into a neighbour is a dangle and is dropped),
// split roads that end short of a border are extended to it, and the
// pieces are cleaned like the rest. Regions of normal size are not
// touched.
func (c *cleaner) split(ctx context.Context, arr *arrangement, fs *faceSet, water []bool, segs []seg) (*arrangement, *faceSet, []bool, error) {
	var big []waterPolygon
	for f := range fs.faces {
		if (water == nil || !water[f]) && fs.faces[f].area > c.o.MaxRegionKM2*1e6 {
			big = append(big, facePolygon(arr, &fs.faces[f]))
		}
	}
	if len(big) == 0 {
		return arr, fs, water, nil
	}
	inBig := func(p ipt) bool {
		for i := range big {
			if big[i].contains(float64(p.X)+0.5, float64(p.Y)+0.5) {
				return true
			}
		}
		return false
	}
	var cut []seg
	for _, s := range clipLines(c.ex.splitLines, c.pr, c.rc) {
		if inBig(s.a) || inBig(s.b) {
			cut = append(cut, s)
		}
	}
	if len(cut) == 0 {
		return arr, fs, water, nil
	}
	segs = slices.Concat(segs, cut)
	arr, err := node(ctx, segs)
	if err != nil {
		return nil, nil, nil, err
	}
	if c.o.ExtendMetres > 0 {
		ways := c.ex.ways
		splitRoad := func(w int32) bool { return !ways[w].major && slices.Contains(c.o.SplitRoads, ways[w].class) }
		if ext := extendDangles(arr, splitRoad, c.o.ExtendMetres); len(ext) > 0 {
			c.st.DanglesExtended += len(ext)
			if arr, err = node(ctx, slices.Concat(segs, ext)); err != nil {
				return nil, nil, nil, err
			}
		}
	}
	if fs, err = arr.faces(ctx); err != nil {
		return nil, nil, nil, err
	}
	arr, fs, water, err = c.merge(ctx, arr, fs)
	if err != nil {
		return nil, nil, nil, err
	}
	c.countSplits(arr, fs, water, big)
	return arr, fs, water, nil
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
