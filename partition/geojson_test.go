package partition

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"strings"
	"testing"

	"github.com/paulmach/orb"
)

func townGeoJSON(t testing.TB) (*Partition, []byte) {
	t.Helper()
	p := readTown(t, "ashgrove.osm", handCounted())
	var buf bytes.Buffer
	if err := p.WriteGeoJSON(&buf); err != nil {
		t.Fatal(err)
	}
	return p, buf.Bytes()
}

func TestGeoJSONRoundTrip(t *testing.T) {
	p, data := townGeoJSON(t)
	q, err := ReadGeoJSON(bytes.NewReader(data), "regions.geojson")
	if err != nil {
		t.Fatal(err)
	}
	if q.Source != "ashgrove.osm" || !q.Bound.Equal(p.Bound) || len(q.Regions) != len(p.Regions) {
		t.Fatalf("read back source %q, bound %v, %d regions; wrote %q, %v, %d", q.Source, q.Bound, len(q.Regions), p.Source, p.Bound, len(p.Regions))
	}
	near := func(a, b float64) bool { return math.Abs(a-b) <= 1e-5*math.Max(math.Abs(a), 1e-3) }
	for i, r := range p.Regions {
		s := q.Regions[i]
		if s.ID != r.ID || !orb.Equal(s.Polygon, r.Polygon) || s.Point != r.Point {
			t.Errorf("region %d: geometry or id changed in the round trip", r.ID)
		}
		if !near(s.AreaKM2, r.AreaKM2) || !near(s.PerimeterKM, r.PerimeterKM) {
			t.Errorf("region %d: area %v perimeter %v, wrote %v %v", r.ID, s.AreaKM2, s.PerimeterKM, r.AreaKM2, r.PerimeterKM)
		}
		if len(s.BorderRoads) != len(r.BorderRoads) || len(s.Neighbours) != len(r.Neighbours) {
			t.Fatalf("region %d: border roads or neighbours lost", r.ID)
		}
		for j := range r.BorderRoads {
			if s.BorderRoads[j].Name != r.BorderRoads[j].Name || !near(s.BorderRoads[j].LengthKM, r.BorderRoads[j].LengthKM) {
				t.Errorf("region %d: border road %v read back as %v", r.ID, r.BorderRoads[j], s.BorderRoads[j])
			}
		}
		for j := range r.Neighbours {
			if s.Neighbours[j].ID != r.Neighbours[j].ID || !near(s.Neighbours[j].SharedKM, r.Neighbours[j].SharedKM) {
				t.Errorf("region %d: neighbour %v read back as %v", r.ID, r.Neighbours[j], s.Neighbours[j])
			}
		}
	}
	// Writing what was read gives the same bytes: the format is stable.
	var again bytes.Buffer
	if err := q.WriteGeoJSON(&again); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(again.Bytes(), data) {
		t.Errorf("rewritten GeoJSON differs from the original")
	}
}

func TestGeoJSONDeterministic(t *testing.T) {
	_, a := townGeoJSON(t)
	_, b := townGeoJSON(t)
	if !bytes.Equal(a, b) {
		t.Error("two runs gave different bytes")
	}
}

func TestGeoJSONShape(t *testing.T) {
	// Decoded generically, the file is an RFC 7946 FeatureCollection with
	// the documented properties.
	_, data := townGeoJSON(t)
	var doc struct {
		Type     string    `json:"type"`
		BBox     []float64 `json:"bbox"`
		Features []struct {
			Type     string `json:"type"`
			Geometry struct {
				Type string `json:"type"`
			} `json:"geometry"`
			Properties map[string]json.RawMessage `json:"properties"`
		} `json:"features"`
	}
	if err := json.Unmarshal(data, &doc); err != nil {
		t.Fatal(err)
	}
	if doc.Type != "FeatureCollection" || len(doc.BBox) != 4 || len(doc.Features) != townDefaultRegions {
		t.Fatalf("type %q, bbox %v, %d features", doc.Type, doc.BBox, len(doc.Features))
	}
	for i, f := range doc.Features {
		if f.Type != "Feature" || f.Geometry.Type != "Polygon" {
			t.Errorf("feature %d: %s %s", i, f.Type, f.Geometry.Type)
		}
		for _, key := range []string{"id", "area_km2", "perimeter_km", "point", "border_roads", "neighbours"} {
			if _, ok := f.Properties[key]; !ok {
				t.Errorf("feature %d: no property %q", i, key)
			}
		}
	}
}

func TestReadGeoJSONErrors(t *testing.T) {
	_, data := townGeoJSON(t)
	good := string(data)
	tests := []struct {
		name, in, want string
	}{
		{"empty", "", "empty file"},
		{"not JSON", "trip,start\n", "not JSON"},
		{"array", "[1,2]", "not a region FeatureCollection"},
		{"wrong type", `{"type":"Feature"}`, "want FeatureCollection"},
		{"feature type", `{"type":"FeatureCollection","features":[{"type":"Point"}]}`, "feature 0"},
		{"no id", `{"type":"FeatureCollection","features":[{"type":"Feature","properties":{}}]}`, "feature 0: no properties.id"},
		{"not polygon", `{"type":"FeatureCollection","features":[{"type":"Feature","geometry":{"type":"LineString","coordinates":[[0,0],[1,1]]},"properties":{"id":1}}]}`, "feature 0 (id 1): geometry is not a Polygon"},
		{"short ring", `{"type":"FeatureCollection","features":[{"type":"Feature","geometry":{"type":"Polygon","coordinates":[[[0,0],[1,1],[0,0]]]},"properties":{"id":1}}]}`, "ring 0 has 3 positions"},
		{"open ring", `{"type":"FeatureCollection","features":[{"type":"Feature","geometry":{"type":"Polygon","coordinates":[[[0,0],[1,0],[1,1],[0,1]]]},"properties":{"id":1}}]}`, "not closed"},
		{"bad position", `{"type":"FeatureCollection","features":[{"type":"Feature","geometry":{"type":"Polygon","coordinates":[[[0,0],[1,0],[1,1],[0,99],[0,0]]]},"properties":{"id":1}}]}`, "position 3"},
		{"no area", `{"type":"FeatureCollection","features":[{"type":"Feature","geometry":{"type":"Polygon","coordinates":[[[0,0],[1,0],[1,1],[0,0]]]},"properties":{"id":1,"point":[0.5,0.2]}}]}`, "area_km2"},
		{"ids not 1..n", strings.Replace(good, `"properties":{"id":2,`, `"properties":{"id":7,`, 1), "region ids must be 1.."},
		{"unknown neighbour", strings.Replace(good, `"neighbours":[{"id":2,`, `"neighbours":[{"id":99,`, 1), "neighbour id 99"},
		{"truncated", good[:len(good)/2], "regions.geojson"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := ReadGeoJSON(strings.NewReader(tc.in), "regions.geojson")
			if err == nil || !strings.Contains(err.Error(), "regions.geojson") || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %v; want the file name and %q", err, tc.want)
			}
		})
	}
}

func TestGeoJSONExtract(t *testing.T) {
	// Round trip on a real extract in exact mode, where faces can be tiny:
	// coordinates are written losslessly.
	o := exactOptions()
	p, err := ReadFile(context.Background(), extractPath(t, "krems.osm.gz"), o)
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := p.WriteGeoJSON(&buf); err != nil {
		t.Fatal(err)
	}
	q, err := ReadGeoJSON(&buf, "krems.geojson")
	if err != nil {
		t.Fatal(err)
	}
	for i := range p.Regions {
		if !orb.Equal(p.Regions[i].Polygon, q.Regions[i].Polygon) {
			t.Fatalf("region %d: polygon changed", p.Regions[i].ID)
		}
	}
}
