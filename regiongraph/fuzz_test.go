package regiongraph

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"testing"
)

// The fuzz targets feed arbitrary bytes to the readers: they must return an
// error or a store whose quality adds up, and never panic.

func fuzzIngest(t *testing.T, name string, format Format, data []byte, strict bool) {
	path := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(path, data, 0o644); err != nil {
		t.Fatal(err)
	}
	opts := DefaultOptions()
	opts.TimeZone = "Europe/Berlin"
	opts.Strict = strict
	opts.Windows = []Window{{"all", 0, 1440}, {"night", 22 * 60, 6 * 60}}
	s, err := Ingest(context.Background(), gridPartition(4, 4, 13.0, 52.0, 0.02), "fuzz", []Input{{Path: path, Format: format}}, opts)
	if err != nil {
		return
	}
	checkQuality(t, s.Meta.Quality)
	var trips int64
	for _, e := range s.Edges {
		if e.Trips <= 0 || e.From == e.To || !(e.SpeedP25 <= e.SpeedMedian && e.SpeedMedian <= e.SpeedP75) ||
			!(e.DetourP25 <= e.DetourMedian && e.DetourMedian <= e.DetourP75) {
			t.Fatalf("bad edge %+v", e)
		}
		if s.Meta.WindowName(e.Window) == "all" {
			trips += int64(e.Trips)
		}
	}
	if format == FormatTrips && trips != s.Meta.Quality.Used {
		t.Fatalf("window all has %d trips, %d rows used", trips, s.Meta.Quality.Used)
	}
}

func FuzzTripCSV(f *testing.F) {
	f.Add([]byte(tripHeader+"a,2024-05-01T08:00:00Z,2024-05-01T08:10:00Z,13.010,52.010,13.030,52.010,2000\n"), false)
	f.Add([]byte(tripHeader+"\"a,\nb\",2024-05-01 08:00:00,1714551000,13.01,52.01,13.05,52.05,9000\r\n\n"), false)
	f.Add([]byte(tripHeader+"a,2024-03-31 02:30:00,2024-03-31 03:30:00,13.01,52.01,13.05,52.05,9000\n"), true)
	f.Add([]byte("start_time,end_time\n1,2\n"), false)
	f.Add([]byte("\xef\xbb\xbf"+tripHeader+"a,1,2,x,y,z,w,v\n\"unterminated\n"), false)
	f.Add([]byte{0x50, 0x41, 0x52, 0x31, 0, 0}, false)
	f.Add([]byte(tripHeader+"\"a,2024-05-01T08:00:00Z,2024-05-01T08:10:00Z,13.01,52.01,13.05,52.05,9000\nb,2024-05-01T08:00:00Z,2024-05-01T08:10:00Z,13.01,52.01,13.05,52.05,9000\n"), true)
	f.Add([]byte(tripHeader+"pipe 12\",2024-05-01T08:00:00Z,2024-05-01T08:10:00Z,13.01,52.01,13.05,52.05,0x1p13\n\"a\"b,1,2,3,4,5,6,7\r\n"), false)
	f.Add([]byte(tripHeader+"a,0,600,13.01,52.01,13.05,52.05,1_000\na,9000-01-01T00:00:00Z,2024-10-27 02:30:00,13.01,52.01,13.05,52.05,9000\na,0,600,13.01,52.01,13.05,52.05,1_000\n"), false)
	f.Fuzz(func(t *testing.T, data []byte, strict bool) {
		fuzzIngest(t, "trips.csv", FormatTrips, data, strict)
	})
}

func FuzzPointsCSV(f *testing.F) {
	f.Add([]byte("vehicle_id,time,lon,lat,occupied\nv,2024-05-01T08:00:00Z,13.01,52.01,1\nv,2024-05-01T08:05:00Z,13.05,52.01,1\nv,2024-05-01T08:06:00Z,13.05,52.01,0\n"), false)
	f.Add([]byte("vehicle_id,time,lon,lat\nv,1714550400,13.01,52.01\nv,1714550460,13.02,52.01\nv,1714550400,13.03,52.01\nw,1,2,3\n"), true)
	f.Add([]byte("vehicle_id,time,lon,lat\nv,1714550400,13.01,52.01\nv,1714550400,13.01,52.01\n\"v,1714550460,13.02,52.01\nv,2024-03-31 02:30:00,13.02,52.01\n"), false)
	f.Fuzz(func(t *testing.T, data []byte, strict bool) {
		fuzzIngest(t, "points.csv", FormatPoints, data, strict)
	})
}

func FuzzGPX(f *testing.F) {
	f.Add([]byte(`<gpx><trk><trkseg><trkpt lat="52.01" lon="13.01"><time>2024-05-01T08:00:00Z</time></trkpt>`+
		`<trkpt lat="52.01" lon="13.05"><time>2024-05-01T08:05:00Z</time></trkpt></trkseg></trk></gpx>`), false)
	f.Add([]byte(`<?xml version="1.0"?><gpx version="1.1"><trk><trkseg><trkpt lat="x" lon="13"></trkpt></trkseg></trk></gpx>`), true)
	f.Add([]byte(`<gpx><trkpt lat="1" lon="2"/></gpx>`), false)
	f.Add([]byte(`<gpx><trk><trkseg><trkpt lat="52.01" lon="13.01"><time>`), false)
	f.Fuzz(func(t *testing.T, data []byte, strict bool) {
		fuzzIngest(t, "track.gpx", FormatGPX, data, strict)
		// The XML reader on its own.
		segs, err := readGPX(bytes.NewReader(data))
		if err == nil {
			for _, s := range segs {
				for _, p := range s.points {
					if p.line < 1 {
						t.Fatalf("point without a line number: %+v", p)
					}
				}
			}
		}
	})
}

func FuzzParseTime(f *testing.F) {
	for _, s := range []string{"2024-03-31T08:15:00Z", "2024-10-27 02:30:00", "1711872000.5", "2024-03-31T08:15:00.1234+05:45", "-1"} {
		f.Add(s)
	}
	z := newZoneCache(mustZone(f, "Europe/Berlin"))
	f.Fuzz(func(t *testing.T, s string) {
		ms, err := parseTime([]byte(s), z)
		if err != nil {
			return
		}
		// Whatever parses must convert to a local day and back consistently.
		local := z.local(floorDiv(ms, 1000))
		if day := floorDiv(local, 86400); dayString(day) == "" {
			t.Fatalf("%q: no day", s)
		}
	})
}

func FuzzParseFloat(f *testing.F) {
	for _, s := range []string{"13.404954", "-0.5", "1e3", "123456789012345678", ".", "0x1p3", "1_000", "Inf", "nan", "1e400", "5."} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		got, err := parseFloat([]byte(s))
		if err != nil {
			return
		}
		if got != got {
			t.Fatalf("%q: NaN accepted", s)
		}
		if !plainNumber([]byte(s)) {
			t.Fatalf("%q: accepted, not a plain decimal", s)
		}
	})
}
