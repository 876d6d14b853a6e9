// Package geodesy holds the few facts of the Earth's shape that narrows
// needs, written once: the Earth radius, great-circle distances, the local
// projection used for metric work on a city, and the conversion between the
// metres per second used inside and the kilometres per hour reported.
//
// In: WGS84 longitude/latitude points (orb.Point). Out: metres, planar
// coordinates in metres, and speeds.
package geodesy

import (
	"math"

	"github.com/paulmach/orb"
)

// EarthRadiusMetres is the mean Earth radius (IUGG R1), the radius of the
// sphere behind every distance and projection in narrows.
const EarthRadiusMetres = 6371008.8

// metresPerDegree is the length of one degree of a great circle.
const metresPerDegree = EarthRadiusMetres * math.Pi / 180

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
