package partition

import (
	"bytes"
	"compress/gzip"
	"context"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/paulmach/orb"
)

const minorTown = `<?xml version="1.0"?>
<osm version="0.6">
 <bounds minlat="40.00" minlon="-30.02" maxlat="40.02" maxlon="-29.98"/>
 <node id="1" lat="40.005" lon="-30.01"/>
 <node id="2" lat="40.015" lon="-29.99"/>
 <way id="9"><nd ref="1"/><nd ref="2"/><tag k="highway" v="residential"/><tag k="name" v="Lark Rise"/></way>
</osm>`

func gzipped(t *testing.T, b []byte) []byte {
	t.Helper()
	var buf bytes.Buffer
	zw := gzip.NewWriter(&buf)
	zw.Write(b)
	zw.Close()
	return buf.Bytes()
}

func TestBadInput(t *testing.T) {
	town, err := os.ReadFile("testdata/ashgrove.osm")
	if err != nil {
		t.Fatal(err)
	}
	var pbf []byte
	if p := extractPathOrEmpty("baltimore.osm.pbf"); p != "" {
		if pbf, err = os.ReadFile(p); err != nil {
			t.Fatal(err)
		}
	}
	far := orb.Bound{Min: orb.Point{10, 10}, Max: orb.Point{10.1, 10.1}}
	tests := []struct {
		name string
		data []byte
		edit func(*Options)
		want string // part of the message
	}{
		{"empty", nil, nil, "empty file"},
		{"empty gzip", gzipped(t, nil), nil, "empty file"},
		{"text", []byte("trip_id,start,end\n1,2,3\n"), nil, "not an OpenStreetMap file"},
		{"png", []byte("\x89PNG\r\n\x1a\n\x00\x00\x00\rIHDR"), nil, "not an OpenStreetMap file"},
		{"html", []byte("<!DOCTYPE html>\n<html><body>hello</body></html>"), nil, "root element is <html>"},
		{"gzip garbage", []byte("\x1f\x8b\x08\x00garbage garbage garbage"), nil, "truncated or corrupt"},
		{"bzip2 garbage", []byte("BZh91AY&SYgarbage garbage"), nil, "truncated or corrupt"},
		{"truncated XML", town[:len(town)/2], nil, "XML syntax error on line"},
		{"truncated gzip", gzipped(t, town)[:300], nil, "truncated"},
		{"bad node", []byte(`<osm><node id="1" lat="95" lon="0"/></osm>`), nil, "node 1"},
		{"no elements", []byte(`<osm version="0.6"></osm>`), nil, "no OSM nodes or ways"},
		{"no major roads", []byte(minorTown), nil, "--roads"},
		{"bbox misses data", town, func(o *Options) { o.BBox = &far }, "misses the data"},
		{"unknown barrier", town, func(o *Options) { o.Barriers = []string{"lava"} }, "unknown barrier"},
		{"negative snap", town, func(o *Options) { o.SnapMetres = -1 }, "snap distance"},
	}
	if pbf != nil {
		tests = append(tests,
			struct {
				name string
				data []byte
				edit func(*Options)
				want string
			}{"truncated PBF", pbf[:len(pbf)/2], nil, "PBF is truncated"},
			struct {
				name string
				data []byte
				edit func(*Options)
				want string
			}{"PBF cut in its header", pbf[:100], nil, "PBF is truncated"},
		)
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			o := DefaultOptions()
			if tc.edit != nil {
				tc.edit(&o)
			}
			const name = "input/study-file.osm"
			p, err := Build(context.Background(), bytes.NewReader(tc.data), name, o)
			if err == nil {
				t.Fatalf("no error; got %d regions", len(p.Regions))
			}
			msg := err.Error()
			t.Log(msg)
			if !strings.Contains(msg, name) || !strings.Contains(msg, tc.want) {
				t.Errorf("error %q; want the file name and %q", msg, tc.want)
			}
		})
	}
}

func extractPathOrEmpty(name string) string {
	p := filepath.Join(sharedDir, "data", "osm", name)
	if _, err := os.Stat(p); err != nil {
		return ""
	}
	return p
}

func TestReadFileMissing(t *testing.T) {
	_, err := ReadFile(context.Background(), "testdata/no-such-town.osm", DefaultOptions())
	if err == nil || !strings.Contains(err.Error(), "no-such-town.osm") || !errors.Is(err, os.ErrNotExist) {
		t.Errorf("error %v; want a not-exist error naming the file", err)
	}
}

func TestCancelled(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	_, err := ReadFile(ctx, "testdata/ashgrove.osm", DefaultOptions())
	if !errors.Is(err, context.Canceled) {
		t.Errorf("error %v, want context.Canceled", err)
	}
}

func TestParseBBox(t *testing.T) {
	tests := []struct {
		in   string
		want orb.Bound
		err  string
	}{
		{"-30.02,40.00,-29.98,40.02", orb.Bound{Min: orb.Point{-30.02, 40}, Max: orb.Point{-29.98, 40.02}}, ""},
		{" 1.5 , -20.6, 1.6 ,-20.4 ", orb.Bound{Min: orb.Point{1.5, -20.6}, Max: orb.Point{1.6, -20.4}}, ""},
		{"", orb.Bound{}, "four numbers"},
		{"1,2,3", orb.Bound{}, "four numbers"},
		{"1,2,3,4,5", orb.Bound{}, "four numbers"},
		{"a,2,3,4", orb.Bound{}, `west "a" is not a number`},
		{"1,2,3,NaN", orb.Bound{}, "north"},
		{"1,2,Inf,4", orb.Bound{}, "east"},
		{"3,2,1,4", orb.Bound{}, "west 3 is not less than east 1"},
		{"1,4,3,2", orb.Bound{}, "south 4 is not less than north 2"},
		{"1,2,1,4", orb.Bound{}, "not less than"},
		{"-181,2,3,4", orb.Bound{}, "longitudes"},
		{"1,-89,3,4", orb.Bound{}, "latitudes"},
		{"0,0,20,5", orb.Bound{}, "more than the 10°"},
	}
	for _, tc := range tests {
		got, err := ParseBBox(tc.in)
		switch {
		case tc.err == "" && err != nil:
			t.Errorf("ParseBBox(%q): %v", tc.in, err)
		case tc.err == "" && !got.Equal(tc.want):
			t.Errorf("ParseBBox(%q) = %v, want %v", tc.in, got, tc.want)
		case tc.err != "" && (err == nil || !strings.Contains(err.Error(), tc.err)):
			t.Errorf("ParseBBox(%q): error %v, want one containing %q", tc.in, err, tc.err)
		}
	}
}
