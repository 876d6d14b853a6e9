package regiongraph

import (
	"cmp"
	"fmt"
	"math"
	"slices"

	"github.com/paulmach/orb"
	"github.com/tidwall/rtree"

	"narrows/partition"
)

// EarthRadiusMetres is the mean Earth radius (IUGG R1) used for great-circle
// distances.
const EarthRadiusMetres = 6371008.8

// GreatCircleMetres returns the great-circle (haversine) distance between two
// WGS84 longitude/latitude points on a sphere of radius EarthRadiusMetres.
// It is within 0.5 % of the ellipsoidal geodesic distance.
func GreatCircleMetres(a, b orb.Point) float64 {
	const rad = math.Pi / 180
	lat1, lat2 := a[1]*rad, b[1]*rad
	sdLat := math.Sin((lat2 - lat1) / 2)
	sdLon := math.Sin((b[0] - a[0]) * rad / 2)
	h := sdLat*sdLat + math.Cos(lat1)*math.Cos(lat2)*sdLon*sdLon
	if h > 1 {
		h = 1
	}
	return 2 * EarthRadiusMetres * math.Asin(math.Sqrt(h))
}

// locator finds the region holding a point: an R-tree over the region bounds
// narrows the candidates, an exact crossing-number test with holes decides.
// Points on a border shared by two regions belong to exactly one of them: the
// test is half-open (a region holds its lower and left borders, not its upper
// and right ones), and when regions overlap the lowest id wins.
// A locator is read-only after construction and safe for concurrent use.
type locator struct {
	tree    rtree.RTreeG[int32] // index into regions
	regions []locRegion
}

type locRegion struct {
	id    int
	bound orb.Bound
	rings []orb.Ring // exterior first, then holes
}

// maxRegions is the most regions a locator indexes: aggregation packs a
// region pair into 32 bits.
const maxRegions = 1<<16 - 1

func newLocator(p *partition.Partition) (*locator, error) {
	l := &locator{}
	for _, r := range p.Regions {
		if len(r.Polygon) == 0 || len(r.Polygon[0]) < 3 {
			continue
		}
		l.regions = append(l.regions, locRegion{id: r.ID, bound: r.Polygon.Bound(), rings: r.Polygon})
	}
	slices.SortStableFunc(l.regions, func(a, b locRegion) int { return cmp.Compare(a.id, b.id) })
	if len(l.regions) > maxRegions {
		return nil, fmt.Errorf("regiongraph: %d regions; at most %d are supported", len(l.regions), maxRegions)
	}
	for i := range l.regions {
		if i > 0 && l.regions[i].id == l.regions[i-1].id {
			return nil, fmt.Errorf("regiongraph: region id %d is used twice", l.regions[i].id)
		}
		b := l.regions[i].bound
		l.tree.Insert(b.Min, b.Max, int32(i))
	}
	return l, nil
}

// locate returns 1 + the index (in id order) of the region holding p, or 0
// when none does. When several hold it, the lowest id wins.
func (l *locator) locate(p orb.Point) int {
	best := 0
	l.tree.Search(p, p, func(_, _ [2]float64, i int32) bool {
		if (best == 0 || int(i)+1 < best) && l.regions[i].contains(p) {
			best = int(i) + 1
		}
		return true
	})
	return best
}

// id returns the region id of a locate result.
func (l *locator) id(index int) int {
	if index == 0 {
		return 0
	}
	return l.regions[index-1].id
}

func (r *locRegion) contains(p orb.Point) bool {
	if !ringContains(r.rings[0], p) {
		return false
	}
	for _, hole := range r.rings[1:] {
		if ringContains(hole, p) {
			return false
		}
	}
	return true
}

// ringContains is the crossing-number test with a half-open rule: an edge
// counts when it straddles the horizontal line through p (one end strictly
// above, the other not) and crosses it strictly right of p.
func ringContains(ring orb.Ring, p orb.Point) bool {
	n := len(ring)
	if n < 3 {
		return false
	}
	x, y := p[0], p[1]
	in := false
	j := n - 1
	for i := 0; i < n; i++ {
		a, b := ring[i], ring[j]
		if (a[1] > y) != (b[1] > y) {
			// The same edge is walked in opposite directions by the two
			// regions it separates; ordering its ends makes both compute
			// the very same crossing, so a border point is in exactly one.
			if a[1] > b[1] {
				a, b = b, a
			}
			if x < (b[0]-a[0])*(y-a[1])/(b[1]-a[1])+a[0] {
				in = !in
			}
		}
		j = i
	}
	return in
}
