package partition

import (
	"fmt"
	"math"
	"slices"
	"testing"

	"github.com/paulmach/orb/planar"
)

func TestCoastlineSea(t *testing.T) {
	// A coast runs straight across the 3 km x 2 km study area at
	// y = 1200 m, with an island of 400 m x 300 m in the sea. Secondary
	// roads come from the north edge at x = 1000 m (ending at the shore)
	// and x = 2000 m (on to the south edge, a bridge over the sea).
	// Drawn the OSM way (land on the left: the shore heading east, the
	// island anticlockwise), the land north of the coast is three regions,
	// the island a fourth, and the sea on both sides of the bridge is
	// water. Drawn the other way round, land and water change places: the
	// rule reads the direction, not where the land happens to be.
	shore := [][2]float64{{-100, 1200}, {3100, 1200}}
	island := [][2]float64{{1000, 400}, {1400, 400}, {1400, 700}, {1000, 700}, {1000, 400}}
	tests := []struct {
		name      string
		reversed  bool
		barriers  []string
		wantLand  int
		wantWater float64 // km²
	}{
		{"land on the left", false, nil, 4, 3.6 - 0.12},
		{"drawn backwards", true, nil, 2, 2.4 + 0.12},
		{"coastline not a barrier", false, []string{"rail", "river", "canal", "water"}, 2, 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			rt := newRiverTown()
			for _, line := range [][][2]float64{shore, island} {
				l := slices.Clone(line)
				if tc.reversed {
					slices.Reverse(l)
				}
				rt.way(l, "natural=coastline")
			}
			rt.way([][2]float64{{1000, 2050}, {1000, 1200}}, "highway=secondary", "name=Harbour Road")
			rt.way([][2]float64{{2000, 2050}, {2000, -50}}, "highway=secondary", "name=Long Bridge")
			o := DefaultOptions()
			if tc.barriers != nil {
				o.Barriers = tc.barriers
			}
			p := rt.build(t, o)
			if len(p.Regions) != tc.wantLand {
				t.Errorf("%d regions, want %d", len(p.Regions), tc.wantLand)
			}
			if math.Abs(p.WaterKM2-tc.wantWater) > 1e-3 {
				t.Errorf("water %.4f km², want %.4f", p.WaterKM2, tc.wantWater)
			}
			var land float64
			for _, r := range p.Regions {
				land += r.AreaKM2
			}
			if rect := rectangleKM2(p.Bound); math.Abs(land+p.WaterKM2-rect)/rect > 1e-6 {
				t.Errorf("regions %.4f + water %.4f km² != rectangle %.4f", land, p.WaterKM2, rect)
			}
			checkSamples(t, p)
			// A point in the sea west of the bridge, one on the island.
			sea, isle := rt.at(500, 300), rt.at(1200, 550)
			for _, c := range []struct {
				what string
				pt   [2]float64
				wet  bool
			}{
				{"the sea west of the bridge", sea, !tc.reversed && tc.wantWater > 0},
				{"the sea east of the bridge", rt.at(2500, 300), !tc.reversed && tc.wantWater > 0},
				{"the island", isle, tc.reversed},
				{"the land north of the shore", rt.at(500, 1600), tc.reversed},
			} {
				in := slices.ContainsFunc(p.Regions, func(r Region) bool { return planar.PolygonContains(r.Polygon, c.pt) })
				if in == c.wet {
					t.Errorf("%s: in a region %v, want water %v", c.what, in, c.wet)
				}
			}
		})
	}
}

func TestSeaSide(t *testing.T) {
	// A coast heading north along x = 0: land west (left), sea east.
	c := coastline{segs: []seg{{ipt{0, -100}, ipt{0, 100}, 0}}}
	tests := []struct {
		x, y    float64
		sea, ok bool
	}{
		{-5, 0.5, false, true},
		{5, 0.5, true, true},
		{5, 200.5, false, false}, // no ray meets the coast
		{0, 150.5, false, false},
		{0, 50.5, true, true}, // on the line: moved a quarter step east
	}
	for _, tc := range tests {
		t.Run(fmt.Sprint(tc.x, tc.y), func(t *testing.T) {
			sea, ok := c.seaSide(tc.x, tc.y)
			if sea != tc.sea || ok != tc.ok {
				t.Errorf("seaSide(%v, %v) = %v, %v; want %v, %v", tc.x, tc.y, sea, ok, tc.sea, tc.ok)
			}
		})
	}
}
