package partition

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strings"
	"testing"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/planar"

	"narrows/partition/geodesy"
)

// sharedDir holds the real OSM extracts and reference values, beside the
// repository.
var sharedDir = filepath.Join("..", "..", "shared")

// geosRef is one entry of ../shared/reference/polygonize-geos.json.
type geosRef struct {
	LinePieces      int       `json:"line_pieces"`
	IncompleteWays  int       `json:"incomplete_ways"`
	BBox            []float64 `json:"bbox"`
	Faces           int       `json:"faces"`
	TotalAreaKM2    float64   `json:"total_area_km2"`
	FacesOver001KM2 int       `json:"faces_over_0_01_km2"`
	FacesOver01KM2  int       `json:"faces_over_0_1_km2"`
	LargestKM2      float64   `json:"largest_km2"`
	GEOSSeconds     float64   `json:"geos_seconds"`
}

func loadGEOSRef(t testing.TB) map[string]geosRef {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(sharedDir, "reference", "polygonize-geos.json"))
	if err != nil {
		t.Skipf("reference values not available: %v", err)
	}
	var m map[string]geosRef
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatal(err)
	}
	if len(m) != 6 {
		t.Fatalf("polygonize-geos.json has %d extracts, want 6", len(m))
	}
	return m
}

func extractPath(t testing.TB, name string) string {
	t.Helper()
	p := filepath.Join(sharedDir, "data", "osm", name)
	if _, err := os.Stat(p); err != nil {
		t.Skipf("extract not available: %v", err)
	}
	return p
}

// readExtract reads an extract once for several partitions.
func readExtract(t testing.TB, name string, o Options) *extract {
	t.Helper()
	f, err := os.Open(extractPath(t, name))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	ex, err := readOSM(context.Background(), f, &o)
	if err != nil {
		t.Fatal(err)
	}
	return ex
}

// rectangleKM2 is the area of a lon/lat rectangle in the local
// equirectangular projection about its centre, by the closed formula
// R²·cos φ0·Δλ·Δφ (radians).
func rectangleKM2(b orb.Bound) float64 {
	rad := math.Pi / 180
	return geodesy.EarthRadiusMetres * geodesy.EarthRadiusMetres * math.Cos(b.Center()[1]*rad) * (b.Max[0] - b.Min[0]) * rad * (b.Max[1] - b.Min[1]) * rad / 1e6
}

func TestExtracts(t *testing.T) {
	ref := loadGEOSRef(t)
	names := make([]string, 0, len(ref))
	for name := range ref {
		names = append(names, name)
	}
	slices.Sort(names)
	for _, name := range names {
		want := ref[name]
		t.Run(name, func(t *testing.T) {
			ex := readExtract(t, name, DefaultOptions())
			t.Run("exact", func(t *testing.T) {
				// The GEOS recipe uses major roads only.
				o := DefaultOptions()
				o.Exact, o.Barriers = true, nil
				p, err := fromExtract(context.Background(), readExtract(t, name, o), o)
				if err != nil {
					t.Fatal(err)
				}
				checkExactAgainstGEOS(t, p, want)
				checkRegions(t, p, o, want)
			})
			t.Run("default", func(t *testing.T) {
				o := DefaultOptions()
				p, err := fromExtract(context.Background(), ex, o)
				if err != nil {
					t.Fatal(err)
				}
				checkRegions(t, p, o, want)
				for _, r := range p.Regions {
					if r.AreaKM2 < o.MinAreaKM2 {
						t.Errorf("region %d: %.4f km², below the minimum %.2f", r.ID, r.AreaKM2, o.MinAreaKM2)
					}
					if pp, width := polsbyPopper(r), meanWidthMetres(r); pp < o.MinCompactness && width < o.MaxSliverWidthMetres {
						t.Errorf("region %d: Polsby-Popper %.3f below the floor %.2f and mean width %.0f m under %.0f m (a sliver)",
							r.ID, pp, o.MinCompactness, width, o.MaxSliverWidthMetres)
					}
				}
				checkNames(t, p, o)
				if slices.Contains(p.Stats.Barriers, "coastline") && p.WaterKM2 == 0 {
					t.Error("a coastline bounds regions but no sea lies beyond it")
				}
				if p.Stats.SliversMerged == 0 {
					t.Errorf("%d regions from %d faces: cleaning merged nothing", len(p.Regions), p.Stats.Faces)
				}
				t.Logf("default mode: %d regions from %d faces (%d gaps closed, %d slivers merged)",
					len(p.Regions), p.Stats.Faces, p.Stats.GapsClosed, p.Stats.SliversMerged)
			})
		})
	}
}

// checkNames checks that region names are unique and read as names: no
// placeholder for an unnamed way, no ";"-joined OSM values, no bare
// number to tell regions apart, and no border road shorter than the
// minimum listed.
func checkNames(t *testing.T, p *Partition, o Options) {
	t.Helper()
	numbered := regexp.MustCompile(`\(\d+\)$`)
	seen := map[string]int{}
	for _, r := range p.Regions {
		if id, dup := seen[r.Name]; dup {
			t.Errorf("regions %d and %d are both called %q", id, r.ID, r.Name)
		}
		seen[r.Name] = r.ID
		if strings.Contains(r.Name, "(unnamed ") || strings.Contains(r.Name, ";") || numbered.MatchString(r.Name) {
			t.Errorf("region %d is called %q", r.ID, r.Name)
		}
		for _, b := range r.BorderRoads {
			if b.LengthKM*1000 < o.MinBorderRoadMetres {
				t.Errorf("region %d lists %q along %.0f m of border, under %.0f m", r.ID, b.Name, b.LengthKM*1000, o.MinBorderRoadMetres)
			}
		}
	}
}

// meanWidthMetres is 2A/P, the width of a strip of the same area and
// perimeter.
func meanWidthMetres(r Region) float64 { return 2 * r.AreaKM2 / r.PerimeterKM * 1000 }

func polsbyPopper(r Region) float64 {
	return 4 * math.Pi * r.AreaKM2 / (r.PerimeterKM * r.PerimeterKM)
}

// checkExactAgainstGEOS compares the exact-mode faces with the reference.
func checkExactAgainstGEOS(t *testing.T, p *Partition, want geosRef) {
	t.Helper()
	// Reference: GEOS 3.11 via Shapely 1.8.5, ../shared/reference/polygonize-geos.json
	if got := len(p.Regions); got != want.Faces {
		t.Errorf("faces: got %d, GEOS %d", got, want.Faces)
	}
	if p.Stats.Lines != want.LinePieces || p.Stats.IncompleteWays != want.IncompleteWays {
		t.Errorf("lines %d (incomplete ways %d), reference %d (%d)", p.Stats.Lines, p.Stats.IncompleteWays, want.LinePieces, want.IncompleteWays)
	}
	wantBound := orb.Bound{Min: orb.Point{want.BBox[0], want.BBox[1]}, Max: orb.Point{want.BBox[2], want.BBox[3]}}
	if !p.Bound.Equal(wantBound) {
		t.Errorf("study area %v, reference %v", p.Bound, wantBound)
	}
	var sum, largest float64
	over001, over01 := 0, 0
	for _, r := range p.Regions {
		sum += r.AreaKM2
		largest = max(largest, r.AreaKM2)
		if r.AreaKM2 >= 0.01 {
			over001++
		}
		if r.AreaKM2 >= 0.1 {
			over01++
		}
	}
	if rel := math.Abs(sum-want.TotalAreaKM2) / want.TotalAreaKM2; rel > 0.005 {
		t.Errorf("summed area %.4f km², GEOS %.4f (%.3f %% off, limit 0.5 %%)", sum, want.TotalAreaKM2, 100*rel)
	}
	if rel := math.Abs(largest-want.LargestKM2) / want.LargestKM2; rel > 0.005 {
		t.Errorf("largest face %.4f km², GEOS %.4f", largest, want.LargestKM2)
	}
	// The size classes match too (same projection, so no face sits on a
	// threshold differently).
	if over001 != want.FacesOver001KM2 || over01 != want.FacesOver01KM2 {
		t.Errorf("faces >= 0.01 km²: %d (GEOS %d); >= 0.1 km²: %d (GEOS %d)", over001, want.FacesOver001KM2, over01, want.FacesOver01KM2)
	}
	// Euler's formula for a plane graph, the unbounded face counted:
	// V - E + (F + 1) = 1 + C.
	s := p.Stats
	if s.Vertices-s.Edges+s.Faces+1 != 1+s.Components {
		t.Errorf("Euler: V %d - E %d + F %d+1 != 1 + C %d", s.Vertices, s.Edges, s.Faces, s.Components)
	}
	if s.Faces != want.Faces {
		t.Errorf("bounded faces of the unpruned arrangement %d, GEOS %d", s.Faces, want.Faces)
	}
}

// checkRegions checks what every partition must satisfy: ids 1..n north
// to south, rings oriented per RFC 7946, the regions tile the study
// rectangle (area, and a grid of sample points each in exactly one
// region), representative points inside, symmetric neighbours.
func checkRegions(t *testing.T, p *Partition, o Options, want geosRef) {
	t.Helper()
	var sum float64
	for i, r := range p.Regions {
		if r.ID != i+1 {
			t.Fatalf("region %d has id %d", i+1, r.ID)
		}
		if i > 0 && r.Point[1] > p.Regions[i-1].Point[1] {
			t.Errorf("region %d lies north of region %d: not numbered north to south", r.ID, r.ID-1)
		}
		sum += r.AreaKM2
		if len(r.Polygon) == 0 || r.Polygon[0].Orientation() != orb.CCW {
			t.Errorf("region %d: exterior ring not counter-clockwise", r.ID)
		}
		for _, h := range r.Polygon[1:] {
			if h.Orientation() != orb.CW {
				t.Errorf("region %d: hole not clockwise", r.ID)
			}
		}
		if !planar.PolygonContains(r.Polygon, r.Point) {
			t.Errorf("region %d: representative point %v outside its polygon", r.ID, r.Point)
		}
		for _, n := range r.Neighbours {
			back := p.Regions[n.ID-1].Neighbours
			j := slices.IndexFunc(back, func(m Neighbour) bool { return m.ID == r.ID })
			if j < 0 || math.Abs(back[j].SharedKM-n.SharedKM) > 1e-9 {
				t.Errorf("regions %d and %d: neighbours not symmetric", r.ID, n.ID)
			}
		}
	}
	// Water areas are no region: regions and water tile the rectangle.
	sum += p.WaterKM2
	rectKM2 := rectangleKM2(p.Bound)
	if rel := math.Abs(sum-rectKM2) / rectKM2; rel > 0.001 {
		t.Errorf("regions and water cover %.4f km² of the %.4f km² rectangle (%.3f %% off, limit 0.1 %%)", sum, rectKM2, 100*rel)
	}
	// Reference: GEOS 3.11 via Shapely 1.8.5, ../shared/reference/polygonize-geos.json
	if rel := math.Abs(sum-want.TotalAreaKM2) / want.TotalAreaKM2; rel > 0.001 {
		t.Errorf("regions and water cover %.4f km², GEOS faces %.4f", sum, want.TotalAreaKM2)
	}
	checkSamples(t, p)
}

// checkSamples checks on a grid of sample points that each lies in at
// most one region, and that the share lying in none matches the share of
// the rectangle that is water (within two points in a hundred).
func checkSamples(t *testing.T, p *Partition) {
	t.Helper()

	bounds := make([]orb.Bound, len(p.Regions))
	for i, r := range p.Regions {
		bounds[i] = r.Polygon.Bound()
	}
	const n = 50
	dx, dy := (p.Bound.Max[0]-p.Bound.Min[0])/n, (p.Bound.Max[1]-p.Bound.Min[1])/n
	bad, wet := 0, 0
	for i := range n {
		for j := range n {
			// Offsets off the half so that no sample sits on a straight
			// road at a round coordinate.
			pt := orb.Point{p.Bound.Min[0] + (float64(i)+0.4817)*dx, p.Bound.Min[1] + (float64(j)+0.5273)*dy}
			in := 0
			for k, r := range p.Regions {
				if bounds[k].Contains(pt) && planar.PolygonContains(r.Polygon, pt) {
					in++
				}
			}
			if (in > 1 || (in == 0 && p.WaterKM2 == 0)) && bad < 5 {
				t.Errorf("sample point %v lies in %d regions, want exactly 1", pt, in)
			}
			if in > 1 || (in == 0 && p.WaterKM2 == 0) {
				bad++
			}
			if in == 0 {
				wet++
			}
		}
	}
	if got, want := float64(wet)/(n*n), p.WaterKM2/rectangleKM2(p.Bound); math.Abs(got-want) > 0.02 {
		t.Errorf("%.3f of the sample points lie in no region, but water is %.3f of the rectangle", got, want)
	}
	for _, r := range p.Regions {
		for k, s := range p.Regions {
			if k != r.ID-1 && bounds[k].Contains(r.Point) && planar.PolygonContains(s.Polygon, r.Point) {
				t.Errorf("representative point of region %d also lies in region %d", r.ID, s.ID)
			}
		}
	}
}

func TestExtractDeterministic(t *testing.T) {
	// The PBF decoder works in parallel; the output must not depend on it.
	// The GeoJSON also reads back and rewrites to the same bytes.
	path := extractPath(t, "baltimore.osm.pbf")
	var first []byte
	for range 2 {
		p, err := ReadFile(context.Background(), path, DefaultOptions())
		if err != nil {
			t.Fatal(err)
		}
		var buf bytes.Buffer
		if err := p.WriteGeoJSON(&buf); err != nil {
			t.Fatal(err)
		}
		if first == nil {
			first = buf.Bytes()
			continue
		}
		if !bytes.Equal(buf.Bytes(), first) {
			t.Fatal("two runs on the same extract gave different GeoJSON")
		}
	}
	q, err := ReadGeoJSON(bytes.NewReader(first), "baltimore.geojson")
	if err != nil {
		t.Fatal(err)
	}
	var again bytes.Buffer
	if err := q.WriteGeoJSON(&again); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(again.Bytes(), first) {
		t.Error("GeoJSON read back and rewritten differs")
	}
}
