package partition

import "math"

// coastline is the chosen coastline's segments on the grid, each in the
// direction of its way. OSM draws natural=coastline with the land on the
// left and the water on the right (common practice, checked by the
// coastline processing every OSM map relies on), so the side of a point is
// read from the direction of the coastline it first meets.
type coastline struct {
	segs []seg
}

// coastlineOf projects every line of the ways of class "coastline", whole
// (not clipped: a ray from inside the study area may meet the coast just
// outside it).
func coastlineOf(ex *extract, pr projection) coastline {
	var c coastline
	for _, l := range ex.lines {
		if ex.ways[l.way].class != "coastline" {
			continue
		}
		var prev ipt
		for k, q := range l.pts {
			x, y := pr.forward(q)
			cur := ipt{toGrid(x), toGrid(y)}
			if k > 0 && cur != prev {
				c.segs = append(c.segs, seg{prev, cur, l.way})
			}
			prev = cur
		}
	}
	return c
}

// seaSide reports whether the grid point (x, y) lies on the water side of
// the coastline, by the direction of the nearest coastline segment met by
// a ray east, west, north or south of it; ok is false when no ray meets
// the coastline. y must not be a grid value (representative points sit
// half a grid step off), so no east-west ray passes through a vertex; x is
// moved off the grid for the same reason.
func (c *coastline) seaSide(x, y float64) (sea, ok bool) {
	if x == math.Trunc(x) {
		x += 0.25
	}
	best := math.Inf(1)
	for _, s := range c.segs {
		ax, ay, bx, by := float64(s.a.X), float64(s.a.Y), float64(s.b.X), float64(s.b.Y)
		if (ay > y) != (by > y) {
			xi := ax + (y-ay)*(bx-ax)/(by-ay)
			if d := math.Abs(xi - x); d < best {
				// A segment heading north has the land (its left) to the
				// west: a point west of it is land, east of it water.
				best, ok, sea = d, true, (by > ay) != (xi > x)
			}
		}
		if (ax > x) != (bx > x) {
			yi := ay + (x-ax)*(by-ay)/(bx-ax)
			if d := math.Abs(yi - y); d < best {
				// A segment heading east has the land to the north.
				best, ok, sea = d, true, (bx > ax) == (yi > y)
			}
		}
	}
	return sea, ok
}
