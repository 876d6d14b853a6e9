package patterns

import (
	"math"
	"testing"

	"github.com/paulmach/orb"

	"narrows/partition/geodesy"
)

func TestFocusGeometry(t *testing.T) {
	grid := gridPartition()
	centre12 := orb.Point{originLon + 3.5*cellDeg, originLat + 2.5*cellDeg}
	cellMetres := cellDeg * math.Pi / 180 * geodesy.EarthRadiusMetres // north-south size of a cell
	// A point half a cell east of region 12's east edge, at its middle.
	east := orb.Point{originLon + 4.5*cellDeg, originLat + 2.5*cellDeg}
	eastMetres := 0.5 * cellMetres * math.Cos(centre12.Lat()*math.Pi/180)
	tests := []struct {
		name   string
		focus  *Focus
		finder Finding
		want   bool
	}{
		{"no focus", nil, Finding{Regions: []int{11, 12}}, false},
		{"by region id", &Focus{Regions: []int{12}}, Finding{Regions: []int{11, 12}}, true},
		{"other region id", &Focus{Regions: []int{5}}, Finding{Regions: []int{11, 12}}, false},
		{"point inside, radius 0", &Focus{Point: &centre12}, Finding{Regions: []int{12}}, true},
		{"point inside the neighbour, radius 0", &Focus{Point: &centre12}, Finding{Regions: []int{1, 2}}, false},
		{"point outside, radius reaches", &Focus{Point: &east, RadiusMetres: eastMetres * 1.01}, Finding{Regions: []int{12}}, true},
		{"point outside, radius short", &Focus{Point: &east, RadiusMetres: eastMetres * 0.99}, Finding{Regions: []int{12}}, false},
		{"region 11 one cell further", &Focus{Point: &east, RadiusMetres: eastMetres * 1.01}, Finding{Regions: []int{11}}, false},
	}
	for _, tc := range tests {
		if got := inFocus(tc.finder, tc.focus, grid); got != tc.want {
			t.Errorf("%s: %v, want %v", tc.name, got, tc.want)
		}
	}
	// The projected distance agrees with the haversine distance across a
	// parallel of the grid to well under 1 %.
	d := regionDistance(&grid.Regions[11], east)
	h := haversine(east, orb.Point{originLon + 4*cellDeg, east.Lat()})
	if math.Abs(d-h)/h > 0.001 {
		t.Errorf("distance %v m, haversine %v m", d, h)
	}
}

func haversine(a, b orb.Point) float64 {
	rad := math.Pi / 180
	dlat, dlon := (b.Lat()-a.Lat())*rad, (b.Lon()-a.Lon())*rad
	h := math.Sin(dlat/2)*math.Sin(dlat/2) + math.Cos(a.Lat()*rad)*math.Cos(b.Lat()*rad)*math.Sin(dlon/2)*math.Sin(dlon/2)
	return 2 * geodesy.EarthRadiusMetres * math.Asin(math.Sqrt(h))
}
