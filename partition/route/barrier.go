package route

import (
	"math"

	"github.com/paulmach/orb"

	"narrows/partition"
	"narrows/partition/geodesy"
)

// barrierCell is the side of the barrier index's grid cells in metres.
const barrierCell = 250.0

// barrierSeg is one segment of a barrier line in projected metres.
type barrierSeg struct {
	ax, ay, bx, by float64
	na, nb         int64 // OSM node ids of its ends
	way            int64
	kind           string
}

// barrierIndex finds the barrier segments a road segment crosses.
type barrierIndex struct {
	proj  geodesy.Projection
	cells map[[2]int32][]int32
	segs  []barrierSeg
}

func newBarrierIndex(ws []partition.BarrierWay, proj geodesy.Projection) *barrierIndex {
	bi := &barrierIndex{proj: proj, cells: map[[2]int32][]int32{}}
	for _, w := range ws {
		if w.Crossing {
			continue
		}
		for i := 1; i < len(w.Line); i++ {
			ax, ay := proj.Forward(w.Line[i-1])
			bx, by := proj.Forward(w.Line[i])
			s := int32(len(bi.segs))
			bi.segs = append(bi.segs, barrierSeg{ax, ay, bx, by, w.Nodes[i-1], w.Nodes[i], w.WayID, w.Kind})
			forCells(ax, ay, bx, by, func(c [2]int32) { bi.cells[c] = append(bi.cells[c], s) })
		}
	}
	return bi
}

// forCells calls f for each grid cell of the segment's bounding box.
func forCells(ax, ay, bx, by float64, f func([2]int32)) {
	x0, x1 := cellOf(min(ax, bx)), cellOf(max(ax, bx))
	y0, y1 := cellOf(min(ay, by)), cellOf(max(ay, by))
	if int64(x1-x0+1)*int64(y1-y0+1) > 1<<16 {
		return // a segment tens of km long: not a street's; left unchecked
	}
	for x := x0; x <= x1; x++ {
		for y := y0; y <= y1; y++ {
			f([2]int32{x, y})
		}
	}
}

func cellOf(v float64) int32 { return int32(math.Floor(v / barrierCell)) }

// crossed reports the first barrier segment that the segment a-b (OSM
// nodes ida, idb; 0 for none) crosses properly, away from a shared node.
func (bi *barrierIndex) crossed(a, b orb.Point, ida, idb int64) (way int64, kind string, at orb.Point, ok bool) {
	if bi == nil || len(bi.segs) == 0 {
		return 0, "", orb.Point{}, false
	}
	ax, ay := bi.proj.Forward(a)
	bx, by := bi.proj.Forward(b)
	found := false
	forCells(ax, ay, bx, by, func(c [2]int32) {
		if found {
			return
		}
		for _, s := range bi.cells[c] {
			g := &bi.segs[s]
			if ida != 0 && (g.na == ida || g.nb == ida || g.na == idb || g.nb == idb) {
				continue
			}
			if x, y, hit := properCross(ax, ay, bx, by, g.ax, g.ay, g.bx, g.by); hit {
				way, kind, at, found = g.way, g.kind, bi.proj.Inverse(x, y), true
				return
			}
		}
	})
	return way, kind, at, found
}

// properCross reports whether segments p1-p2 and q1-q2 cross at a single
// point inside both (touching at an end or running along each other is
// not a crossing), and where.
func properCross(p1x, p1y, p2x, p2y, q1x, q1y, q2x, q2y float64) (x, y float64, ok bool) {
	d1 := orient(q1x, q1y, q2x, q2y, p1x, p1y)
	d2 := orient(q1x, q1y, q2x, q2y, p2x, p2y)
	d3 := orient(p1x, p1y, p2x, p2y, q1x, q1y)
	d4 := orient(p1x, p1y, p2x, p2y, q2x, q2y)
	if d1*d2 >= 0 || d3*d4 >= 0 {
		return 0, 0, false
	}
	t := d1 / (d1 - d2)
	return p1x + t*(p2x-p1x), p1y + t*(p2y-p1y), true
}

func orient(ax, ay, bx, by, cx, cy float64) float64 {
	return (bx-ax)*(cy-ay) - (by-ay)*(cx-ax)
}
