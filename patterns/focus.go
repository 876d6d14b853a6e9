package patterns

import (
	"github.com/paulmach/orb"
	"github.com/paulmach/orb/planar"

	"narrows/partition"
	"narrows/partition/geodesy"
)

// Focus marks the findings around a scheme (a new link road, a bridge) so
// that a report can give them their own section. A finding is in focus when
// any of its regions is listed in Regions, or when Point is set and any of
// its regions' polygons comes within RadiusMetres of Point (a region
// containing Point is at distance 0, so RadiusMetres 0 selects the region the
// point lies in).
type Focus struct {
	Regions      []int
	Point        *orb.Point // WGS84 longitude, latitude
	RadiusMetres float64
}

func regionIDs(p *partition.Partition) map[int]bool {
	ids := make(map[int]bool, len(p.Regions))
	for _, r := range p.Regions {
		ids[r.ID] = true
	}
	return ids
}

// inFocus reports whether the finding lies in the focus area.
func inFocus(f Finding, focus *Focus, regions *partition.Partition) bool {
	if focus == nil {
		return false
	}
	for _, id := range f.Regions {
		for _, want := range focus.Regions {
			if id == want {
				return true
			}
		}
	}
	if focus.Point == nil || regions == nil {
		return false
	}
	byID := make(map[int]*partition.Region, len(regions.Regions))
	for i := range regions.Regions {
		byID[regions.Regions[i].ID] = &regions.Regions[i]
	}
	for _, id := range f.Regions {
		if r := byID[id]; r != nil && regionDistance(r, *focus.Point) <= focus.RadiusMetres {
			return true
		}
	}
	return false
}

// regionDistance returns the distance in metres from p to the region's
// polygon (0 inside it), measured in the local projection centred on p
// (geodesy.Projection), which over the tens of kilometres a focus radius
// spans distorts distances by well under 1 %. A region without a polygon is
// measured to its representative point.
func regionDistance(r *partition.Region, p orb.Point) float64 {
	proj := geodesy.NewProjection(p)
	project := func(q orb.Point) orb.Point {
		dlon := q.Lon() - p.Lon()
		// Take the short way round the antimeridian.
		if dlon > 180 {
			dlon -= 360
		} else if dlon < -180 {
			dlon += 360
		}
		return orb.Point{proj.MetresPerDegreeLon * dlon, proj.MetresPerDegreeLat * (q.Lat() - p.Lat())}
	}
	origin := orb.Point{0, 0}
	if len(r.Polygon) == 0 || len(r.Polygon[0]) == 0 {
		return planar.Distance(project(r.Point), origin)
	}
	poly := make(orb.Polygon, len(r.Polygon))
	for i, ring := range r.Polygon {
		pr := make(orb.Ring, len(ring))
		for j, q := range ring {
			pr[j] = project(q)
		}
		poly[i] = pr
	}
	if planar.PolygonContains(poly, origin) {
		return 0
	}
	return planar.DistanceFrom(poly, origin)
}
