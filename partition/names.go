package partition

import (
	"fmt"
	"math"
	"strings"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/planar"
)

// nameRegions gives every region a Name, unique within the partition: the
// broadest place node inside it, else the smallest place outline around
// its point, else its two longest named border roads or barriers.
func nameRegions(regs []Region, ex *extract) {
	for i := range regs {
		r := &regs[i]
		if name, ok := placeInside(r, ex.places); ok {
			r.Name = name
		} else if name, ok := placeAround(r, ex.placeAreas); ok {
			r.Name = name
		} else {
			r.Name = borderName(r)
		}
	}
	disambiguate(regs)
}

// placeInside returns the place node inside r of the broadest kind, the
// nearest to r's point among equals.
func placeInside(r *Region, places []placeRec) (string, bool) {
	b := r.Polygon.Bound()
	var best *placeRec
	var bestD float64
	for i := range places {
		pl := &places[i]
		if !b.Contains(pl.pt) || !planar.PolygonContains(r.Polygon, pl.pt) {
			continue
		}
		d := planar.DistanceSquared(pl.pt, r.Point)
		if best == nil || pl.rank < best.rank || (pl.rank == best.rank && d < bestD) {
			best, bestD = pl, d
		}
	}
	if best == nil {
		return "", false
	}
	return best.name, true
}

// placeAround returns the smallest place outline that holds r's point.
func placeAround(r *Region, areas []placeArea) (string, bool) {
	name, bestArea := "", math.Inf(1)
	for _, pa := range areas {
		ring := orb.Ring(pa.ring)
		if !ring.Bound().Contains(r.Point) || !planar.RingContains(ring, r.Point) {
			continue
		}
		if a := math.Abs(planar.Area(ring)); a < bestArea {
			name, bestArea = pa.name, a
		}
	}
	return name, name != ""
}

// borderName joins the two longest named roads or barriers on r's border
// (unnamed ones only when none has a name).
func borderName(r *Region) string {
	var named, unnamed []string
	for _, b := range r.BorderRoads {
		if strings.HasPrefix(b.Name, "(unnamed ") {
			unnamed = append(unnamed, b.Name)
		} else {
			named = append(named, b.Name)
		}
	}
	if len(named) == 0 {
		named = unnamed
	}
	switch len(named) {
	case 0:
		return "no named border"
	case 1:
		return named[0]
	}
	return named[0] + " / " + named[1]
}

// disambiguate makes names unique: two regions of one name get the
// compass word of their relative position, more get a number in id order,
// and any clash that remains gets the region's id.
func disambiguate(regs []Region) {
	byName := map[string][]int{}
	for i := range regs {
		byName[regs[i].Name] = append(byName[regs[i].Name], i)
	}
	for name, idx := range byName {
		switch {
		case len(idx) == 2:
			a, b := &regs[idx[0]], &regs[idx[1]]
			wa, wb := compass(a.Point, b.Point)
			a.Name, b.Name = name+" ("+wa+")", name+" ("+wb+")"
		case len(idx) > 2:
			for k, i := range idx {
				regs[i].Name = fmt.Sprintf("%s (%d)", name, k+1)
			}
		}
	}
	seen := map[string]bool{}
	for i := range regs {
		if seen[regs[i].Name] {
			regs[i].Name = fmt.Sprintf("%s #%d", regs[i].Name, regs[i].ID)
		}
		seen[regs[i].Name] = true
	}
}

// compass says where p and q lie relative to each other, along the axis
// on which they are further apart.
func compass(p, q orb.Point) (string, string) {
	dx := (q[0] - p[0]) * math.Cos(p[1]*math.Pi/180)
	dy := q[1] - p[1]
	switch {
	case math.Abs(dy) >= math.Abs(dx) && dy > 0:
		return "south", "north"
	case math.Abs(dy) >= math.Abs(dx):
		return "north", "south"
	case dx > 0:
		return "west", "east"
	}
	return "east", "west"
}
