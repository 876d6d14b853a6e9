package geodesy

import (
	"math"

	"github.com/paulmach/orb"
)

// Projection is a local equirectangular projection about an origin:
// x = R·cos φ0·Δλ, y = R·Δφ, in metres. Over the tens of kilometres of a city
// it distorts distances by well under 1 % (common practice for city-scale
// work), and it keeps straight lines nearly straight, which is all the
// planar steps (noding, faces, distances to a focus point) need.
type Projection struct {
	Origin orb.Point // longitude, latitude of (0, 0)
	// MetresPerDegreeLon and MetresPerDegreeLat scale degrees to metres.
	MetresPerDegreeLon, MetresPerDegreeLat float64
}

// NewProjection returns the local projection about origin.
func NewProjection(origin orb.Point) Projection {
	return Projection{
		Origin:             origin,
		MetresPerDegreeLon: metresPerDegree * math.Cos(origin[1]*math.Pi/180),
		MetresPerDegreeLat: metresPerDegree,
	}
}

// Forward returns the planar position of a WGS84 point, in metres east and
// north of the origin.
func (p Projection) Forward(q orb.Point) (x, y float64) {
	return p.MetresPerDegreeLon * (q[0] - p.Origin[0]), p.MetresPerDegreeLat * (q[1] - p.Origin[1])
}

// Inverse returns the WGS84 point at x metres east and y metres north of
// the origin.
func (p Projection) Inverse(x, y float64) orb.Point {
	return orb.Point{p.Origin[0] + x/p.MetresPerDegreeLon, p.Origin[1] + y/p.MetresPerDegreeLat}
}
