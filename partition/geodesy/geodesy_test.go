package geodesy

import (
	"encoding/json"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"

	"github.com/paulmach/orb"
)

func TestGreatCircleMetresAgainstGeographicLib(t *testing.T) {
	// Reference: GeographicLib 2.1.2 GeodSolve -i -p 3 (WGS84 ellipsoid),
	// ../../../shared/reference/geodesic.json.
	path := filepath.Join("..", "..", "..", "shared", "reference", "geodesic.json")
	data, err := os.ReadFile(path)
	if err != nil {
		t.Skipf("reference file missing: %v", err)
	}
	var ref struct {
		Pairs []struct {
			Lat1, Lon1, Lat2, Lon2, Metres float64
		}
	}
	if err := json.Unmarshal(data, &ref); err != nil {
		t.Fatal(err)
	}
	if len(ref.Pairs) == 0 {
		t.Fatal("no pairs in reference")
	}
	for _, p := range ref.Pairs {
		got := GreatCircleMetres(orb.Point{p.Lon1, p.Lat1}, orb.Point{p.Lon2, p.Lat2})
		rel := math.Abs(got-p.Metres) / p.Metres
		if rel > 0.005 {
			t.Errorf("(%g,%g)-(%g,%g): %.3f m, GeographicLib %.3f m, off by %.3f %%", p.Lat1, p.Lon1, p.Lat2, p.Lon2, got, p.Metres, 100*rel)
		}
	}
}

func TestGreatCircleMetresProperties(t *testing.T) {
	quarter := GreatCircleMetres(orb.Point{0, 0}, orb.Point{0, 90})
	if want := EarthRadiusMetres * math.Pi / 2; math.Abs(quarter-want) > 1e-6 {
		t.Errorf("equator to pole: %v, want %v", quarter, want)
	}
	if d := GreatCircleMetres(orb.Point{10, 50}, orb.Point{10, 50}); d != 0 {
		t.Errorf("same point: %v", d)
	}
	antipode := GreatCircleMetres(orb.Point{0, 0}, orb.Point{180, 0})
	if want := EarthRadiusMetres * math.Pi; math.Abs(antipode-want) > 1e-3 {
		t.Errorf("antipodes: %v, want %v", antipode, want)
	}
	rng := rand.New(rand.NewPCG(1, 2))
	for i := 0; i < 1000; i++ {
		a := orb.Point{rng.Float64()*360 - 180, rng.Float64()*180 - 90}
		b := orb.Point{rng.Float64()*360 - 180, rng.Float64()*180 - 90}
		if d1, d2 := GreatCircleMetres(a, b), GreatCircleMetres(b, a); math.Abs(d1-d2) > 1e-6 {
			t.Fatalf("not symmetric: %v vs %v", d1, d2)
		}
		// Independent formula: spherical law of cosines (fine at these distances).
		const rad = math.Pi / 180
		c := math.Sin(a[1]*rad)*math.Sin(b[1]*rad) + math.Cos(a[1]*rad)*math.Cos(b[1]*rad)*math.Cos((b[0]-a[0])*rad)
		want := EarthRadiusMetres * math.Acos(math.Max(-1, math.Min(1, c)))
		if d := GreatCircleMetres(a, b); math.Abs(d-want) > 1 {
			t.Fatalf("%v-%v: haversine %v, law of cosines %v", a, b, d, want)
		}
	}
}

func TestProjectionRoundTripAndScale(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	for _, origin := range []orb.Point{{0, 0}, {13.4, 52.5}, {-76.6, 39.3}, {170, -45}} {
		p := NewProjection(origin)
		for i := 0; i < 200; i++ {
			q := orb.Point{origin[0] + (rng.Float64()-0.5)*0.2, origin[1] + (rng.Float64()-0.5)*0.2}
			x, y := p.Forward(q)
			back := p.Inverse(x, y)
			if math.Abs(back[0]-q[0]) > 1e-9 || math.Abs(back[1]-q[1]) > 1e-9 {
				t.Fatalf("origin %v: %v -> (%v, %v) -> %v", origin, q, x, y, back)
			}
			// Within a city, planar distance from the origin agrees with the
			// great-circle distance to well under 1 %.
			if d := GreatCircleMetres(origin, q); d > 100 {
				if rel := math.Abs(math.Hypot(x, y)-d) / d; rel > 0.002 {
					t.Fatalf("origin %v, %v: planar %.3f m, great circle %.3f m", origin, q, math.Hypot(x, y), d)
				}
			}
		}
	}
}

func TestSpeedConversions(t *testing.T) {
	for _, tc := range []struct{ mps, kmh float64 }{{0, 0}, {1, 3.6}, {10, 36}, {25, 90}} {
		if got := KMH(tc.mps); math.Abs(got-tc.kmh) > 1e-12 {
			t.Errorf("KMH(%v) = %v, want %v", tc.mps, got, tc.kmh)
		}
		if got := MPS(tc.kmh); math.Abs(got-tc.mps) > 1e-12 {
			t.Errorf("MPS(%v) = %v, want %v", tc.kmh, got, tc.mps)
		}
	}
}
