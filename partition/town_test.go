package partition

import (
	"bytes"
	"context"
	"math"
	"os"
	"slices"
	"strings"
	"testing"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/planar"

	"narrows/partition/geodesy"
)

// testdata/ashgrove.osm is a fictional town, drawn by hand (bounds
// -30.02,40.00,-29.98,40.02, about 3.4 km x 2.2 km):
//
//   - Harbour Road, primary, two one-way carriageways 17 m apart, east-west
//     across the whole area at 40.010 and 40.01015;
//   - Mill Lane, secondary, north-south at -30.000, crossing both
//     carriageways without shared nodes;
//   - ref S 7 (no name), secondary, from the southern carriageway
//     (a T-junction without a shared node) north out of the area at -30.010;
//   - Ferry Street, secondary, from the north edge south at -29.990,
//     ending 5 m short of the northern carriageway;
//   - Ring Road, primary, a closed loop touching nothing (an island);
//   - Quarry Track, secondary, an isolated line with a repeated node;
//   - Bow Tie Loop, secondary, a closed way that crosses itself once;
//   - Willow Close (residential) and Valley Railway (rail, east-west at
//     40.017).
//
// Counted by hand, exact mode: south of Harbour Road, two faces either
// side of Mill Lane plus the Ring Road island and the two bow-tie
// triangles (5); three strips between the carriageways (3); three faces
// north of them (3): 11. Ferry Street is a dangle and Quarry Track an
// isolated line: neither bounds a face. Default mode: the gap at Ferry
// Street is closed (one more face north), the three strips are slivers
// (0.014 to 0.028 km², Polsby-Popper below 0.04) and are merged: 9 regions.
const (
	townExactFaces     = 11
	townDefaultRegions = 9
)

func readTown(t testing.TB, file string, o Options) *Partition {
	t.Helper()
	p, err := ReadFile(context.Background(), "testdata/"+file, o)
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// handCounted is DefaultOptions as the hand counts above were made: roads
// only (no barriers), no extension of road ends and no splitting, so that
// each count tests the road noding and cleaning alone.
func handCounted() Options {
	o := DefaultOptions()
	o.Barriers, o.ExtendMetres, o.MaxRegionKM2 = nil, 0, 0
	return o
}

func exactOptions() Options {
	o := handCounted()
	o.Exact = true
	return o
}

// regionAt returns the region containing pt.
func regionAt(t *testing.T, p *Partition, pt orb.Point) *Region {
	t.Helper()
	var found *Region
	for i := range p.Regions {
		if planar.PolygonContains(p.Regions[i].Polygon, pt) {
			if found != nil {
				t.Fatalf("%v lies in regions %d and %d", pt, found.ID, p.Regions[i].ID)
			}
			found = &p.Regions[i]
		}
	}
	if found == nil {
		t.Fatalf("%v lies in no region", pt)
	}
	return found
}

func roadNamesOf(r *Region) []string {
	var names []string
	for _, b := range r.BorderRoads {
		names = append(names, b.Name)
	}
	return names
}

func TestTownFormats(t *testing.T) {
	// The same data as XML, gzip and bzip2 give the same partition; the
	// format comes from the bytes, so a misleading name does not matter.
	var want []byte
	for _, file := range []string{"ashgrove.osm", "ashgrove.osm.gz", "ashgrove.osm.bz2"} {
		data, err := os.ReadFile("testdata/" + file)
		if err != nil {
			t.Fatal(err)
		}
		p, err := Build(context.Background(), bytes.NewReader(data), "town.pbf", handCounted())
		if err != nil {
			t.Fatalf("%s: %v", file, err)
		}
		var buf bytes.Buffer
		if err := p.WriteGeoJSON(&buf); err != nil {
			t.Fatal(err)
		}
		if want == nil {
			want = buf.Bytes()
		} else if !bytes.Equal(buf.Bytes(), want) {
			t.Errorf("%s: GeoJSON differs from the plain XML's", file)
		}
	}
}

func TestTownExact(t *testing.T) {
	p := readTown(t, "ashgrove.osm", exactOptions())
	if len(p.Regions) != townExactFaces {
		t.Fatalf("%d faces, counted %d by hand", len(p.Regions), townExactFaces)
	}
	s := p.Stats
	if s.Vertices-s.Edges+s.Faces+1 != 1+s.Components {
		t.Errorf("Euler fails: %+v", s)
	}
	// Components: the connected main network, Ring Road, Quarry Track,
	// Bow Tie Loop.
	if s.Components != 4 {
		t.Errorf("%d components, want 4", s.Components)
	}
	// A strip between the carriageways survives in exact mode: 17 m wide.
	strip := regionAt(t, p, orb.Point{-30.015, 40.01007})
	if strip.AreaKM2 > 0.02 || polsbyPopper(*strip) > 0.1 {
		t.Errorf("strip region %d: %.4f km², Polsby-Popper %.3f; want a sliver", strip.ID, strip.AreaKM2, polsbyPopper(*strip))
	}
	// The bow tie gives two triangles touching at the crossing.
	left := regionAt(t, p, orb.Point{-29.993, 40.005})
	right := regionAt(t, p, orb.Point{-29.987, 40.005})
	if left.ID == right.ID {
		t.Errorf("bow-tie triangles are one region")
	}
	// Each triangle: base 0.006° of latitude, height 0.005° of longitude.
	wantTri := 0.5 * 0.006 * geodesy.EarthRadiusMetres * math.Pi / 180 * 0.005 * geodesy.EarthRadiusMetres * math.Pi / 180 * math.Cos(40.01*math.Pi/180) / 1e6
	for _, r := range []*Region{left, right} {
		if math.Abs(r.AreaKM2-wantTri)/wantTri > 1e-4 {
			t.Errorf("triangle %d: %.6f km², want %.6f", r.ID, r.AreaKM2, wantTri)
		}
	}
}

func TestTownDefault(t *testing.T) {
	p := readTown(t, "ashgrove.osm", handCounted())
	if len(p.Regions) != townDefaultRegions {
		t.Fatalf("%d regions, want %d", len(p.Regions), townDefaultRegions)
	}
	if p.Stats.GapsClosed != 1 {
		t.Errorf("%d gaps closed, want 1 (Ferry Street)", p.Stats.GapsClosed)
	}
	// Ferry Street now divides the north-east.
	west := regionAt(t, p, orb.Point{-29.995, 40.015})
	east := regionAt(t, p, orb.Point{-29.985, 40.015})
	if west.ID == east.ID {
		t.Fatal("Ferry Street does not divide the north-east: the gap was not closed")
	}
	for _, r := range []*Region{west, east} {
		if !slices.Contains(roadNamesOf(r), "Ferry Street") {
			t.Errorf("region %d borders %v, want Ferry Street among them", r.ID, roadNamesOf(r))
		}
	}
	// The strips are merged: the point between the carriageways lies in a
	// region larger than any strip.
	if r := regionAt(t, p, orb.Point{-30.015, 40.01007}); r.AreaKM2 < 0.5 {
		t.Errorf("strip point lies in region %d of %.4f km²: slivers not merged", r.ID, r.AreaKM2)
	}
	// Ring Road is an island: its own region, with a hole cut for it in
	// the region around it, whose only neighbour it is.
	island := regionAt(t, p, orb.Point{-30.010, 40.004})
	around := regionAt(t, p, orb.Point{-30.010, 40.001})
	if island.ID == around.ID || len(around.Polygon) != 2 {
		t.Fatalf("island %d, surrounding region %d with %d rings; want distinct, and a hole", island.ID, around.ID, len(around.Polygon))
	}
	if len(island.Neighbours) != 1 || island.Neighbours[0].ID != around.ID {
		t.Errorf("island neighbours %v, want only region %d", island.Neighbours, around.ID)
	}
	ringKM := 2 * (0.010*geodesy.EarthRadiusMetres*math.Pi/180*math.Cos(40.01*math.Pi/180) + 0.004*geodesy.EarthRadiusMetres*math.Pi/180) / 1e3
	if math.Abs(island.PerimeterKM-ringKM) > 1e-4 || math.Abs(island.Neighbours[0].SharedKM-ringKM) > 1e-4 {
		t.Errorf("island perimeter %.5f km, shared %.5f km; Ring Road is %.5f km", island.PerimeterKM, island.Neighbours[0].SharedKM, ringKM)
	}
	if got := roadNamesOf(island); !slices.Equal(got, []string{"Ring Road"}) {
		t.Errorf("island border roads %v, want [Ring Road]", got)
	}
	// The unnamed road is named by its ref; minor roads and dangles bound
	// nothing.
	var all []string
	for i := range p.Regions {
		all = append(all, roadNamesOf(&p.Regions[i])...)
	}
	if !slices.Contains(all, "S 7") {
		t.Errorf("ref S 7 not among border roads %v", all)
	}
	for _, name := range []string{"Willow Close", "Quarry Track", "Valley Railway"} {
		if slices.Contains(all, name) {
			t.Errorf("%s is a border road; it should not be", name)
		}
	}
	// Border roads are sorted by length, longest first.
	for _, r := range p.Regions {
		if !slices.IsSortedFunc(r.BorderRoads, func(a, b BorderRoad) int {
			return -cmpFloat(a.LengthKM, b.LengthKM)
		}) {
			t.Errorf("region %d: border roads not longest first: %v", r.ID, r.BorderRoads)
		}
	}
}

func cmpFloat(a, b float64) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}

func TestTownOptions(t *testing.T) {
	tests := []struct {
		name    string
		edit    func(*Options)
		regions int
	}{
		// Valley Railway cuts each of the four northern regions in two.
		{"rail barrier", func(o *Options) { o.Barriers = []string{"rail"} }, townDefaultRegions + 4},
		// Primary roads only: the carriageways (their strip merged away)
		// and Ring Road: north, south and the island.
		{"primary only", func(o *Options) { o.Roads = []string{"primary"} }, 3},
		// Without snapping Ferry Street stays a dangle, and so it does
		// with a tolerance below its 5 m gap; 6 m closes it.
		{"no snap", func(o *Options) { o.SnapMetres = 0 }, townDefaultRegions - 1},
		{"snap 4 m", func(o *Options) { o.SnapMetres = 4 }, townDefaultRegions - 1},
		{"snap 6 m", func(o *Options) { o.SnapMetres = 6 }, townDefaultRegions},
		// Without sliver merging the three strips stay.
		{"no merging", func(o *Options) { o.MinAreaKM2, o.MinCompactness = 0, 0 }, townDefaultRegions + 3},
		// Residential roads only: Willow Close is a dangle; one region.
		{"residential", func(o *Options) { o.Roads = []string{"residential"} }, 1},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			o := handCounted()
			tc.edit(&o)
			p := readTown(t, "ashgrove.osm", o)
			if len(p.Regions) != tc.regions {
				t.Errorf("%d regions, want %d", len(p.Regions), tc.regions)
			}
			checkTiles(t, p)
		})
	}
}

func TestTownBBox(t *testing.T) {
	// The western half only: lines are clipped to it.
	b, err := ParseBBox("-30.02,40.00,-30.00,40.02")
	if err != nil {
		t.Fatal(err)
	}
	o := handCounted()
	o.BBox = &b
	p := readTown(t, "ashgrove.osm", o)
	if !p.Bound.Equal(b) {
		t.Errorf("study area %v, want %v", p.Bound, b)
	}
	for _, r := range p.Regions {
		if !b.Contains(r.Polygon.Bound().Min) || !b.Contains(r.Polygon.Bound().Max) {
			t.Errorf("region %d reaches out of the study area: %v", r.ID, r.Polygon.Bound())
		}
	}
	// North: west and east of S 7; south: around Ring Road, and the island.
	if len(p.Regions) != 4 {
		t.Errorf("%d regions, want 4", len(p.Regions))
	}
	checkTiles(t, p)
}

func TestTownNoBounds(t *testing.T) {
	// Without <bounds> the extent of the chosen roads is the study area,
	// with a warning.
	data, err := os.ReadFile("testdata/ashgrove.osm")
	if err != nil {
		t.Fatal(err)
	}
	var lines []string
	for _, l := range strings.Split(string(data), "\n") {
		if !strings.Contains(l, "<bounds") {
			lines = append(lines, l)
		}
	}
	var warned []string
	o := handCounted()
	o.Warn = func(s string) { warned = append(warned, s) }
	p, err := Build(context.Background(), strings.NewReader(strings.Join(lines, "\n")), "nobounds.osm", o)
	if err != nil {
		t.Fatal(err)
	}
	// Valley Railway crosses the area, but barriers are off here.
	if len(warned) != 2 || !strings.Contains(warned[0], "extent") || !strings.Contains(warned[1], "railway crosses") || !slices.Equal(warned, p.Warnings) {
		t.Errorf("warnings %q (kept %q), want one about the extent, one about the unused railway", warned, p.Warnings)
	}
	want := orb.Bound{Min: orb.Point{-30.03, 39.99}, Max: orb.Point{-29.97, 40.03}}
	if !p.Bound.Equal(want) {
		t.Errorf("study area %v, want the roads' extent %v", p.Bound, want)
	}
	checkTiles(t, p)
}

// checkTiles checks that the regions cover the study rectangle.
func checkTiles(t *testing.T, p *Partition) {
	t.Helper()
	var sum float64
	for _, r := range p.Regions {
		sum += r.AreaKM2
		if !planar.PolygonContains(r.Polygon, r.Point) {
			t.Errorf("region %d: point outside", r.ID)
		}
	}
	if want := rectangleKM2(p.Bound); math.Abs(sum-want)/want > 1e-6 {
		t.Errorf("regions cover %.6f km², rectangle %.6f", sum, want)
	}
}
