package route

import (
	"math"
	"slices"

	"github.com/paulmach/orb"

	"narrows/partition/geodesy"
)

func sortIntsStd(a []int, less func(x, y int) bool) {
	slices.SortFunc(a, func(x, y int) int {
		switch {
		case less(x, y):
			return -1
		case less(y, x):
			return 1
		}
		return 0
	})
}

// snapCell is the side of the snapping grid's cells in metres.
const snapCell = 200.0

// Snapper finds the nearest node among a chosen set.
type Snapper struct {
	net   *Network
	cells map[[2]int32][]int32
}

// NewSnapper indexes the nodes for which keep is true (all when nil).
func (n *Network) NewSnapper(keep func(v int) bool) *Snapper {
	s := &Snapper{net: n, cells: map[[2]int32][]int32{}}
	for v, p := range n.Points {
		if keep != nil && !keep(v) {
			continue
		}
		x, y := n.proj.Forward(p)
		c := [2]int32{int32(math.Floor(x / snapCell)), int32(math.Floor(y / snapCell))}
		s.cells[c] = append(s.cells[c], int32(v))
	}
	return s
}

// Nearest returns the indexed node nearest to p within maxMetres, and
// its distance; ok is false when there is none.
func (s *Snapper) Nearest(p orb.Point, maxMetres float64) (v int, metres float64, ok bool) {
	x, y := s.net.proj.Forward(p)
	cx, cy := int32(math.Floor(x/snapCell)), int32(math.Floor(y/snapCell))
	best, bestD := -1, math.Inf(1)
	r := int32(math.Ceil(maxMetres/snapCell)) + 1
	for ring := int32(0); ring <= r; ring++ {
		// Once a node is found, one more ring is enough: any node farther
		// out is at least ring-1 cells away.
		if best >= 0 && float64(ring-1)*snapCell > bestD {
			break
		}
		for dx := -ring; dx <= ring; dx++ {
			for dy := -ring; dy <= ring; dy++ {
				if max(abs32(dx), abs32(dy)) != ring {
					continue
				}
				for _, u := range s.cells[[2]int32{cx + dx, cy + dy}] {
					ux, uy := s.net.proj.Forward(s.net.Points[u])
					d := math.Hypot(ux-x, uy-y)
					if d < bestD || (d == bestD && int(u) < best) {
						best, bestD = int(u), d
					}
				}
			}
		}
	}
	if best < 0 {
		return 0, 0, false
	}
	d := geodesy.GreatCircleMetres(p, s.net.Points[best])
	if d > maxMetres {
		return 0, 0, false
	}
	return best, d, true
}

func abs32(v int32) int32 {
	if v < 0 {
		return -v
	}
	return v
}
