package partition

import (
	"math"
	"math/bits"

	"github.com/paulmach/orb"

	"narrows/partition/geodesy"
)

// gridMetres is the spacing of the integer grid on which the noded
// arrangement lives: 1 µm, far below the 1 cm resolution of OSM
// coordinates (1e-7°), so snapping to it changes no real geometry, while
// integer coordinates make every orientation test exact.
const gridMetres = 1e-6

// projection is the local equirectangular projection about the study
// area's centre, with the micrometre grid on top.
type projection struct{ geodesy.Projection }

func newProjection(b orb.Bound) projection {
	return projection{geodesy.NewProjection(b.Center())}
}

// forward returns the planar position of a WGS84 point, in metres.
func (pr projection) forward(p orb.Point) (x, y float64) { return pr.Forward(p) }

// inverse returns the WGS84 point of a grid position.
func (pr projection) inverse(p ipt) orb.Point {
	return pr.Inverse(float64(p.X)*gridMetres, float64(p.Y)*gridMetres)
}

// ipt is a point on the micrometre grid.
type ipt struct{ X, Y int64 }

func toGrid(v float64) int64 { return int64(math.Round(v / gridMetres)) }

// dist returns the distance between two grid points in metres.
func dist(p, q ipt) float64 {
	return math.Hypot(float64(p.X-q.X), float64(p.Y-q.Y)) * gridMetres
}

// i128 is a signed 128-bit integer, enough for exact cross products of
// grid coordinates.
type i128 struct {
	hi int64
	lo uint64
}

func mul64(a, b int64) i128 {
	neg := (a < 0) != (b < 0)
	ua, ub := uint64(a), uint64(b)
	if a < 0 {
		ua = uint64(-a)
	}
	if b < 0 {
		ub = uint64(-b)
	}
	hi, lo := bits.Mul64(ua, ub)
	r := i128{int64(hi), lo}
	if neg {
		r = r.neg()
	}
	return r
}

func (x i128) neg() i128 {
	lo := ^x.lo + 1
	hi := ^x.hi
	if lo == 0 {
		hi++
	}
	return i128{hi, lo}
}

func (x i128) sub(y i128) i128 {
	lo, borrow := bits.Sub64(x.lo, y.lo, 0)
	return i128{x.hi - y.hi - int64(borrow), lo}
}

func (x i128) sign() int {
	switch {
	case x.hi < 0:
		return -1
	case x.hi == 0 && x.lo == 0:
		return 0
	}
	return 1
}

func (x i128) float() float64 {
	if x.hi < 0 {
		return -x.neg().float()
	}
	return float64(x.hi)*(1<<64) + float64(x.lo)
}

// cross returns the exact cross product a×b.
func cross(ax, ay, bx, by int64) i128 { return mul64(ax, by).sub(mul64(ay, bx)) }

// orient returns the exact orientation of c relative to the line a→b:
// positive to the left, negative to the right, zero on it.
func orient(a, b, c ipt) i128 { return cross(b.X-a.X, b.Y-a.Y, c.X-a.X, c.Y-a.Y) }

// rect is the study rectangle on the grid.
type rect struct{ minX, minY, maxX, maxY int64 }

// clipSegment clips p→q (metres) to r. It returns the clipped end points
// on the grid; a point where the segment crosses the rectangle's side lies
// exactly on that side.
func (r rect) clipSegment(px, py, qx, qy float64) (a, b ipt, ok bool) {
	minX, minY := float64(r.minX)*gridMetres, float64(r.minY)*gridMetres
	maxX, maxY := float64(r.maxX)*gridMetres, float64(r.maxY)*gridMetres
	dx, dy := qx-px, qy-py
	t0, t1 := 0.0, 1.0
	side0, side1 := -1, -1 // which side set t0, t1: 0 left, 1 right, 2 bottom, 3 top
	clip := func(p, q float64, side int) bool {
		if p == 0 {
			return q >= 0
		}
		t := q / p
		if p < 0 {
			if t > t1 {
				return false
			}
			if t > t0 {
				t0, side0 = t, side
			}
		} else {
			if t < t0 {
				return false
			}
			if t < t1 {
				t1, side1 = t, side
			}
		}
		return true
	}
	if !clip(-dx, px-minX, 0) || !clip(dx, maxX-px, 1) || !clip(-dy, py-minY, 2) || !clip(dy, maxY-py, 3) {
		return a, b, false
	}
	point := func(t float64, side int, ex, ey float64) ipt {
		var p ipt
		if side < 0 {
			p = ipt{toGrid(ex), toGrid(ey)}
		} else {
			p = ipt{toGrid(px + t*dx), toGrid(py + t*dy)}
		}
		switch side {
		case 0:
			p.X = r.minX
		case 1:
			p.X = r.maxX
		case 2:
			p.Y = r.minY
		case 3:
			p.Y = r.maxY
		}
		p.X = min(max(p.X, r.minX), r.maxX)
		p.Y = min(max(p.Y, r.minY), r.maxY)
		return p
	}
	a = point(t0, side0, px, py)
	b = point(t1, side1, qx, qy)
	return a, b, a != b
}
