package partition

import (
	"bytes"
	"context"
	"math"
	"os"
	"strconv"
	"strings"
	"testing"

	"github.com/paulmach/orb"
)

func FuzzBuild(f *testing.F) {
	// Small seeds: the fuzzer minimises each new input it finds, for up
	// to a minute, and the inputs grown from a large seed take all of it.
	// The plain extract is read whole by the ordinary tests.
	for _, file := range []string{"ashgrove.osm.gz", "ashgrove.osm.bz2"} {
		data, err := os.ReadFile("testdata/" + file)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(data)
		f.Add(data[:len(data)/3])
	}
	f.Add([]byte(minorTown))
	f.Add(townPBF(nil))
	f.Add(townPBF(nil)[:100])
	f.Add([]byte(""))
	f.Add([]byte("<osm>"))
	f.Add([]byte(`<osm><node id="1" lat="0" lon="0"/><node id="2" lat="0.01" lon="0.01"/><way id="1"><nd ref="1"/><nd ref="2"/><nd ref="1"/><tag k="highway" v="primary"/></way></osm>`))
	f.Add([]byte("\x00\x00\x00\x0d\x0a\x09OSMHeader\x18\x01"))
	f.Fuzz(func(t *testing.T, data []byte) {
		if len(data) > 1<<14 {
			return
		}
		p, err := Build(context.Background(), bytes.NewReader(data), "fuzz.osm", DefaultOptions())
		if err != nil {
			if !strings.Contains(err.Error(), "fuzz.osm") {
				t.Errorf("error does not name the file: %v", err)
			}
			return
		}
		// Whatever the input, the regions tile the study rectangle.
		var sum float64
		for i, r := range p.Regions {
			if r.ID != i+1 {
				t.Fatalf("region %d has id %d", i+1, r.ID)
			}
			sum += r.AreaKM2
		}
		if want := rectangleKM2(p.Bound); math.Abs(sum-want) > 1e-6*want+1e-9 {
			t.Errorf("regions cover %g km² of %g", sum, want)
		}
	})
}

func FuzzParseBBox(f *testing.F) {
	for _, s := range []string{"-30.02,40.00,-29.98,40.02", "1,2,3", "a,b,c,d", "3,2,1,4", "0,0,20,5", " 1 , 2 , 3 , 4 ", "1e2,0,1e2,1"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		b, err := ParseBBox(s)
		if err != nil {
			return
		}
		if !(b.Min[0] < b.Max[0] && b.Min[1] < b.Max[1]) || checkBound(b) != nil {
			t.Errorf("ParseBBox(%q) accepted %v", s, b)
		}
		// Formatting and parsing again gives the same box.
		c, err := ParseBBox(fmtExact(b))
		if err != nil || c != b {
			t.Errorf("ParseBBox(%q) = %v; round trip gave %v, %v", s, b, c, err)
		}
	})
}

// fmtExact writes a box as W,S,E,N without loss.
func fmtExact(b orb.Bound) string {
	var parts []string
	for _, v := range []float64{b.Min[0], b.Min[1], b.Max[0], b.Max[1]} {
		parts = append(parts, strconv.FormatFloat(v, 'g', -1, 64))
	}
	return strings.Join(parts, ",")
}

func FuzzReadGeoJSON(f *testing.F) {
	// Small seeds (the whole town's regions are read by the ordinary
	// tests): the fuzzer minimises the inputs it grows from them.
	f.Add([]byte(`{"type":"FeatureCollection","features":[]}`))
	f.Add([]byte(`{"type":"FeatureCollection","features":[{"type":"Feature","geometry":{"type":"Polygon","coordinates":[[[0,0],[1,0],[1,1],[0,0]]]},"properties":{"id":1,"area_km2":1,"perimeter_km":4,"point":[0.7,0.2],"neighbours":[{"id":1}]}}]}`))
	f.Fuzz(func(t *testing.T, data []byte) {
		if len(data) > 1<<14 {
			return
		}
		p, err := ReadGeoJSON(bytes.NewReader(data), "fuzz.geojson")
		if err != nil {
			if !strings.Contains(err.Error(), "fuzz.geojson") {
				t.Errorf("error does not name the file: %v", err)
			}
			return
		}
		// What was read can be written and read again, unchanged.
		var buf bytes.Buffer
		if err := p.WriteGeoJSON(&buf); err != nil {
			t.Fatal(err)
		}
		q, err := ReadGeoJSON(bytes.NewReader(buf.Bytes()), "again.geojson")
		if err != nil {
			t.Fatalf("rereading what was written: %v", err)
		}
		if len(q.Regions) != len(p.Regions) {
			t.Errorf("%d regions, then %d", len(p.Regions), len(q.Regions))
		}
	})
}
