package partition

import (
	"context"
	"fmt"
	"math"
	"slices"
	"strings"
	"testing"

	"github.com/paulmach/orb"
)

// riverTown writes small fictional towns as OSM XML, drawn in metres on a
// 3 km x 2 km study area whose south-west corner is at 30°W, 40°N.
type riverTown struct {
	b      strings.Builder
	nextID int
	ways   int
}

const (
	riverTownLon, riverTownLat = -30.0, 40.0
	metresPerDegree            = 6371008.8 * math.Pi / 180
)

func (rt *riverTown) at(x, y float64) orb.Point {
	return orb.Point{riverTownLon + x/(metresPerDegree*math.Cos(riverTownLat*math.Pi/180)), riverTownLat + y/metresPerDegree}
}

func newRiverTown() *riverTown {
	rt := &riverTown{}
	lo, hi := rt.at(0, 0), rt.at(3000, 2000)
	fmt.Fprintf(&rt.b, "<?xml version=\"1.0\"?>\n<osm version=\"0.6\">\n<bounds minlat=\"%.7f\" minlon=\"%.7f\" maxlat=\"%.7f\" maxlon=\"%.7f\"/>\n", lo[1], lo[0], hi[1], hi[0])
	return rt
}

// way adds a way through the points (metres) with the tags ("k=v") and
// returns its id.
func (rt *riverTown) way(pts [][2]float64, tags ...string) int {
	var ids []int
	for _, p := range pts {
		rt.nextID++
		q := rt.at(p[0], p[1])
		fmt.Fprintf(&rt.b, "<node id=\"%d\" lat=\"%.7f\" lon=\"%.7f\"/>\n", rt.nextID, q[1], q[0])
		ids = append(ids, rt.nextID)
	}
	if pts[0] == pts[len(pts)-1] {
		ids[len(ids)-1] = ids[0]
	}
	rt.ways++
	fmt.Fprintf(&rt.b, "<way id=\"%d\">", rt.ways)
	for _, id := range ids {
		fmt.Fprintf(&rt.b, "<nd ref=\"%d\"/>", id)
	}
	for _, t := range tags {
		k, v, _ := strings.Cut(t, "=")
		fmt.Fprintf(&rt.b, "<tag k=%q v=%q/>", k, v)
	}
	rt.b.WriteString("</way>\n")
	return rt.ways
}

// relation adds a multipolygon relation of the given outer ways.
func (rt *riverTown) relation(outer []int, tags ...string) {
	rt.b.WriteString("<relation id=\"1\">")
	for _, w := range outer {
		fmt.Fprintf(&rt.b, "<member type=\"way\" ref=\"%d\" role=\"outer\"/>", w)
	}
	for _, t := range append([]string{"type=multipolygon"}, tags...) {
		k, v, _ := strings.Cut(t, "=")
		fmt.Fprintf(&rt.b, "<tag k=%q v=%q/>", k, v)
	}
	rt.b.WriteString("</relation>\n")
}

func (rt *riverTown) build(t *testing.T, o Options) *Partition {
	t.Helper()
	p, err := Build(context.Background(), strings.NewReader(rt.b.String()+"</osm>\n"), "river.osm", o)
	if err != nil {
		t.Fatal(err)
	}
	return p
}

func TestArterialsStopShortOfRiver(t *testing.T) {
	// A river centre line runs east-west at y = 1000 m. Two secondary
	// roads come from the north edge at x = 1000 and 2000 m and stop
	// `gap` metres short of it, as roads stop at a bank. Within the
	// extension distance (default 150 m) each is extended to the river
	// and cuts the strip north of it; beyond it, the strip stays whole.
	tests := []struct {
		name             string
		gap, extend      float64
		wantNorth        int // regions north of the river
		wantExtendedEnds int
	}{
		{"100 m short, default reach", 100, 150, 3, 2},
		{"140 m short, default reach", 140, 150, 3, 2},
		{"200 m short, default reach", 200, 150, 1, 0},
		{"100 m short, extension off", 100, 0, 1, 0},
		{"100 m short, reach 80 m", 100, 80, 1, 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			rt := newRiverTown()
			rt.way([][2]float64{{-50, 1000}, {1500, 1000}, {3050, 1000}}, "waterway=river", "name=Brackwater")
			for _, x := range []float64{1000, 2000} {
				rt.way([][2]float64{{x, 2050}, {x, 1500}, {x, 1000 + tc.gap}}, "highway=secondary", fmt.Sprintf("name=Street %v", x))
			}
			o := DefaultOptions()
			o.ExtendMetres = tc.extend
			p := rt.build(t, o)
			north := 0
			for _, r := range p.Regions {
				if r.Point[1] > rt.at(0, 1000)[1] {
					north++
				}
			}
			if north != tc.wantNorth || len(p.Regions) != tc.wantNorth+1 {
				t.Errorf("%d regions north of the river (%d in all), want %d (and 1 south)", north, len(p.Regions), tc.wantNorth)
			}
			if p.Stats.DanglesExtended != tc.wantExtendedEnds {
				t.Errorf("%d road ends extended, want %d", p.Stats.DanglesExtended, tc.wantExtendedEnds)
			}
			// Just north of the river, either side of each arterial: the
			// strip is cut at each arterial, or not at all.
			a := regionAt(t, p, rt.at(500, 1020))
			b := regionAt(t, p, rt.at(1500, 1020))
			c := regionAt(t, p, rt.at(2500, 1020))
			if cut := a.ID != b.ID && b.ID != c.ID; cut != (tc.wantNorth == 3) {
				t.Errorf("strip along the river: regions %d, %d, %d west to east", a.ID, b.ID, c.ID)
			}
			checkTiles(t, p)
		})
	}
}

func TestWaterArea(t *testing.T) {
	// A river 200 m wide drawn as a water area (y = 900..1100 m, reaching
	// past the study area), its centre line inside it, and a pond of
	// 50 m x 50 m north of it. Secondary roads at x = 1000 and 2000 m come
	// from the north edge and stop 60 m short of the north bank, and from
	// the south edge and stop 5 m short of the south bank. The banks bound
	// the regions: three north, three south; the water is no region; the
	// pond is too small to count as water.
	shapes := []struct {
		name string
		draw func(rt *riverTown)
	}{
		{"closed way", func(rt *riverTown) {
			rt.way([][2]float64{{-100, 900}, {3100, 900}, {3100, 1100}, {-100, 1100}, {-100, 900}}, "natural=water", "water=river", "name=Brackwater")
		}},
		{"multipolygon", func(rt *riverTown) {
			south := rt.way([][2]float64{{-100, 1100}, {-100, 900}, {3100, 900}})
			north := rt.way([][2]float64{{3100, 900}, {3100, 1100}, {-100, 1100}})
			rt.relation([]int{north, south}, "natural=water", "water=river", "name=Brackwater")
		}},
	}
	for _, sh := range shapes {
		t.Run(sh.name, func(t *testing.T) {
			rt := newRiverTown()
			sh.draw(rt)
			rt.way([][2]float64{{-50, 1000}, {3050, 1000}}, "waterway=river", "name=Brackwater")
			rt.way([][2]float64{{500, 1500}, {550, 1500}, {550, 1550}, {500, 1550}, {500, 1500}}, "natural=water", "water=pond")
			for _, x := range []float64{1000, 2000} {
				rt.way([][2]float64{{x, 2050}, {x, 1160}}, "highway=secondary", fmt.Sprintf("name=North %v", x))
				rt.way([][2]float64{{x, -50}, {x, 895}}, "highway=secondary", fmt.Sprintf("name=South %v", x))
			}
			p := rt.build(t, DefaultOptions())
			checkWaterArea(t, rt, p)
		})
	}
}

func checkWaterArea(t *testing.T, rt *riverTown, p *Partition) {
	t.Helper()
	if len(p.Regions) != 6 {
		t.Fatalf("%d regions, want 3 north and 3 south of the river", len(p.Regions))
	}
	// 3 km of river 200 m wide inside the study area.
	if math.Abs(p.WaterKM2-0.6)/0.6 > 0.001 {
		t.Errorf("water %.4f km², want 0.6", p.WaterKM2)
	}
	var land float64
	for _, r := range p.Regions {
		land += r.AreaKM2
	}
	if rect := rectangleKM2(p.Bound); math.Abs(land+p.WaterKM2-rect)/rect > 1e-6 {
		t.Errorf("regions %.4f + water %.4f km² != rectangle %.4f", land, p.WaterKM2, rect)
	}
	checkSamples(t, p)
	northBank, southBank := rt.at(0, 1100)[1], rt.at(0, 900)[1]
	for _, r := range p.Regions {
		b := r.Polygon.Bound()
		north := r.Point[1] > northBank
		if north && math.Abs(b.Min[1]-northBank) > 1e-6 || !north && math.Abs(b.Max[1]-southBank) > 1e-6 {
			t.Errorf("region %d spans latitudes %.6f..%.6f: not bounded by its bank", r.ID, b.Min[1], b.Max[1])
		}
		if !slices.ContainsFunc(r.BorderRoads, func(br BorderRoad) bool { return br.Name == "Brackwater" }) {
			t.Errorf("region %d: border %v lacks the river", r.ID, roadNamesOf(&r))
		}
		for _, n := range r.Neighbours {
			if other := p.Regions[n.ID-1]; (other.Point[1] > northBank) != north {
				t.Errorf("regions %d and %d are neighbours across the river", r.ID, n.ID)
			}
		}
	}
	if p.Stats.DanglesExtended != 2 || p.Stats.GapsClosed != 2 {
		t.Errorf("%d road ends extended and %d gaps closed, want 2 each", p.Stats.DanglesExtended, p.Stats.GapsClosed)
	}
}
