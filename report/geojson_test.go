package report

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"testing"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"
	"github.com/paulmach/orb/planar"
)

// signedArea is the shoelace sum of a closed ring in degrees (positive for
// counter-clockwise), computed independently of orb.
func signedArea(r orb.Ring) float64 {
	var a float64
	for i := 0; i+1 < len(r); i++ {
		a += r[i][0]*r[i+1][1] - r[i+1][0]*r[i][1]
	}
	return a / 2
}

// readFC writes in with write and decodes the FeatureCollection written.
func readFC(t *testing.T, write func(io.Writer, Input) error, in Input) *geojson.FeatureCollection {
	t.Helper()
	var buf bytes.Buffer
	if err := write(&buf, in); err != nil {
		t.Fatal(err)
	}
	fc, err := geojson.UnmarshalFeatureCollection(buf.Bytes())
	if err != nil {
		t.Fatal(err)
	}
	return fc
}

func TestRegionsGeoJSON(t *testing.T) {
	in := fxInput()
	// Region 1 given clockwise with a counter-clockwise hole, and region 2
	// with an unclosed ring: the output must follow RFC 7946 anyway.
	r1 := &in.Regions.Regions[0]
	r1.Polygon[0].Reverse()
	hole := orb.Ring{{10.002, 50.002}, {10.004, 50.002}, {10.004, 50.004}, {10.002, 50.004}, {10.002, 50.002}} // CCW
	r1.Polygon = append(r1.Polygon, hole)
	r2 := &in.Regions.Regions[1]
	r2.Polygon[0] = r2.Polygon[0][:4]
	before := r1.Polygon.Clone()

	fc := readFC(t, WriteRegionsGeoJSON, in)
	if !orb.Equal(before, r1.Polygon) {
		t.Error("WriteRegionsGeoJSON modified its input")
	}
	if len(fc.Features) != 9 {
		t.Fatalf("%d features, want 9", len(fc.Features))
	}
	for i, f := range fc.Features {
		poly, ok := f.Geometry.(orb.Polygon)
		if !ok {
			t.Fatalf("feature %d geometry %T, want Polygon", i, f.Geometry)
		}
		for j, ring := range poly {
			if len(ring) < 4 || ring[0] != ring[len(ring)-1] {
				t.Errorf("feature %d ring %d is not closed: %v", i, j, ring)
			}
			a := signedArea(ring)
			if j == 0 && a <= 0 || j > 0 && a >= 0 {
				t.Errorf("feature %d ring %d has signed area %g: exterior must be CCW, holes CW", i, j, a)
			}
		}
		id := f.Properties.MustInt("id")
		if id != i+1 {
			t.Errorf("feature %d id = %d", i, id)
		}
		wantFocus := id == 8 || id == 9 // regions of the cleared focus finding
		if got := f.Properties.MustBool("in_focus"); got != wantFocus {
			t.Errorf("region %d in_focus = %v, want %v", id, got, wantFocus)
		}
	}
	if got := len(fc.Features[0].Geometry.(orb.Polygon)); got != 2 {
		t.Errorf("region 1 has %d rings, want 2 (with its hole)", got)
	}
	r5 := fc.Features[4].Properties
	if roads, _ := r5["border_roads"].([]any); len(roads) != 1 || roads[0] != evilRoad {
		t.Errorf("region 5 border_roads = %v", r5["border_roads"])
	}
	if n := r5.MustInt("findings"); n != 2 {
		t.Errorf("region 5 findings = %d, want 2", n)
	}
}

func TestFindingsGeoJSON(t *testing.T) {
	in := fxInput()
	fc := readFC(t, WriteFindingsGeoJSON, in)
	// 1 + 2 + 1 + 1 + 1 edges over the five assessments.
	if len(fc.Features) != 6 {
		t.Fatalf("%d features, want 6", len(fc.Features))
	}
	byID := map[string]*geojson.Feature{}
	for _, f := range fc.Features {
		id, _ := f.ID.(string)
		byID[id] = f
		ls, ok := f.Geometry.(orb.LineString)
		if !ok || len(ls) != 2 {
			t.Fatalf("feature %v geometry %v, want a 2-point LineString", f.ID, f.Geometry)
		}
		from, to := f.Properties.MustInt("from"), f.Properties.MustInt("to")
		if planar.Distance(ls[0], in.Regions.Regions[from-1].Point) > 1e-7 || planar.Distance(ls[1], in.Regions.Regions[to-1].Point) > 1e-7 {
			t.Errorf("feature %v runs %v, want region %d to %d points", f.ID, ls, from, to)
		}
	}
	w := byID["1>2/1>2"]
	if w == nil {
		t.Fatalf("no feature 1>2/1>2 among %v", byID)
	}
	if w.Properties.MustString("colour") != "#D55E00" {
		t.Errorf("1>2 colour = %v, want the worse colour", w.Properties["colour"])
	}
	if w.Properties.MustString("verdict") != "worse" || w.Properties.MustFloat64("speed_kmh") != 18 || w.Properties.MustFloat64("trips") != 40 || w.Properties.MustInt("rank") != 1 {
		t.Errorf("1>2 properties = %v", w.Properties)
	}
	// The verdict's evidence, as the fixture's assessment of finding 1>2
	// holds it: cost 3 -> 3.4 veh-h/day with CI ±10 %, adjusted shift
	// 0.4 (0.1 to 0.7), group +2 %, travel time 10 -> 11.67 min; the
	// group's two pairs nearest first.
	for k, want := range map[string]float64{
		"extra_vehicle_hours_per_day_before": 3, "extra_vehicle_hours_per_day_before_low": 2.7, "extra_vehicle_hours_per_day_after_high": 3.74,
		"extra_vehicle_hours_per_day_raw_change": 0.4, "extra_vehicle_hours_per_day_adjusted_change": 0.4,
		"extra_vehicle_hours_per_day_adjusted_low": 0.1, "extra_vehicle_hours_per_day_adjusted_high": 0.7,
		"extra_vehicle_hours_per_day_group_change": 0.02, "travel_time_min_before": 10, "travel_time_min_after": 11.667,
	} {
		if got, ok := w.Properties[k].(float64); !ok || math.Abs(got-want) > 1e-9 {
			t.Errorf("1>2 %s = %v, want %v", k, w.Properties[k], want)
		}
	}
	if got := fmt.Sprint(w.Properties["comparison_pairs"]); got != "[1>3 3>1]" || w.Properties.MustString("decided_by") != "time" {
		t.Errorf("1>2 comparison_pairs = %s, decided_by = %v", got, w.Properties["decided_by"])
	}
	s := byID["2>5/2>5"]
	if s != nil && s.Properties["extra_vehicle_hours_per_day_before"] != nil {
		t.Errorf("suppressed 2>5 shows its cost: %v", s.Properties["extra_vehicle_hours_per_day_before"])
	}
	if s == nil || !s.Properties.MustBool("suppressed") || s.Properties["speed_kmh"] != nil || s.Properties["trips"] != nil {
		t.Errorf("suppressed 2>5 properties = %v", s.Properties)
	}
	if n := byID["4>5+5>6/5>6"]; n == nil || n.Properties.MustString("verdict") != "new" {
		t.Errorf("new finding edge 5>6 = %v", n)
	}
}

func TestGeoJSONDeterministic(t *testing.T) {
	for _, name := range []string{"regions", "findings"} {
		var got [][]byte
		for i := 0; i < 2; i++ {
			write := WriteRegionsGeoJSON
			if name == "findings" {
				write = WriteFindingsGeoJSON
			}
			var buf bytes.Buffer
			if err := write(&buf, fxInput()); err != nil {
				t.Fatal(err)
			}
			got = append(got, buf.Bytes())
		}
		if !bytes.Equal(got[0], got[1]) {
			t.Errorf("%s GeoJSON differs between two writes", name)
		}
	}
}

func TestRFC7946PolygonDegenerate(t *testing.T) {
	tests := []struct {
		name  string
		in    orb.Polygon
		rings int
	}{
		{"empty", orb.Polygon{}, 0},
		{"two-point exterior", orb.Polygon{{{0, 0}, {1, 1}}}, 0},
		{"repeated points only", orb.Polygon{{{0, 0}, {0, 0}, {0, 0}, {0, 0}}}, 0},
		{"degenerate hole dropped", orb.Polygon{{{0, 0}, {1, 0}, {1, 1}, {0, 0}}, {{0.1, 0.1}, {0.2, 0.2}}}, 1},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := rfc7946Polygon(tc.in); len(got) != tc.rings {
				t.Errorf("rings = %d, want %d (%v)", len(got), tc.rings, got)
			}
		})
	}
}
