package regiongraph

import (
	"errors"
	"path/filepath"
	"testing"
	"time"

	"github.com/parquet-go/parquet-go"
)

// TestStrictRowError checks the *RowError of a strict ingest of each input
// kind: its file, line or row, reason, column and text.
func TestStrictRowError(t *testing.T) {
	type parquetTrip struct {
		Start    string  `parquet:"start_time"`
		End      string  `parquet:"end_time"`
		StartLon float64 `parquet:"start_lon"`
		StartLat float64 `parquet:"start_lat"`
		EndLon   float64 `parquet:"end_lon"`
		EndLat   float64 `parquet:"end_lat"`
		Distance float64 `parquet:"distance_m"`
	}
	parquetFile := func(t *testing.T, rows []parquetTrip) string {
		path := filepath.Join(t.TempDir(), "trips.parquet")
		if err := parquet.WriteFile(path, rows); err != nil {
			t.Fatal(err)
		}
		return path
	}
	good := parquetTrip{"2024-05-01T08:00:00Z", "2024-05-01T08:10:00Z", 13.010, 52.010, 13.030, 52.010, 2000}
	fast := good
	fast.End = "2024-05-01T08:00:10Z"
	badTime := good
	badTime.Start = "soon"

	// Region 1 is [13.00,13.02)x[52.00,52.02), region 2 east of it.
	const gpxHead = `<?xml version="1.0"?>
<gpx version="1.1" creator="test">
 <trk><trkseg>
`
	tests := []struct {
		name   string
		input  func(t *testing.T) Input
		want   RowError // but File and Err
		errMsg string   // the text after the folder
	}{
		{"CSV trips, unparseable value",
			func(t *testing.T) Input {
				return Input{Path: writeTemp(t, "trips.csv", tripHeader+
					"a,2024-05-01T08:00:00Z,2024-05-01T08:10:00Z,13.010,52.010,13.030,52.010,2000\n"+
					"b,2024-05-01T08:00:00Z,2024-05-01T08:10:00Z,east,52.010,13.030,52.010,2000\n"), Format: FormatTrips}
			},
			RowError{Line: 3, Reason: ReasonUnparseable, Column: colStartLon, Value: "east"},
			`trips.csv:3: unparseable start_lon "east"`},
		{"CSV trips, missing field",
			func(t *testing.T) Input {
				return Input{Path: writeTemp(t, "trips.csv", tripHeader+
					"m,2024-05-01T08:00:00Z,,13.010,52.010,13.030,52.010,2000\n"), Format: FormatTrips}
			},
			RowError{Line: 2, Reason: ReasonMissingField, Column: colEndTime},
			`trips.csv:2: missing field end_time`},
		{"CSV trips, bad speed",
			func(t *testing.T) Input {
				return Input{Path: writeTemp(t, "trips.csv", tripHeader+
					"v,2024-05-01T08:00:00Z,2024-05-01T08:00:10Z,13.010,52.010,13.030,52.010,2000\n"), Format: FormatTrips}
			},
			RowError{Line: 2, Reason: ReasonBadSpeed, Detail: "720.00 km/h (allowed 1-150 km/h)"},
			`trips.csv:2: bad speed: 720.00 km/h (allowed 1-150 km/h)`},
		{"CSV trips, malformed record",
			func(t *testing.T) Input {
				return Input{Path: writeTemp(t, "trips.csv", tripHeader+
					"\"q,2024-05-01T08:00:00Z\"x,2024-05-01T08:10:00Z,13.010,52.010,13.030,52.010,2000\n"), Format: FormatTrips}
			},
			RowError{Line: 2, Reason: ReasonUnbalancedQuote, Detail: quoteFault(quoteLimits{10, 64 << 10}).detail},
			`trips.csv:2: unbalanced quote: a quoted field opened on this line does not close within 10 line(s) and 65536 bytes`},
		{"CSV points, unparseable value",
			func(t *testing.T) Input {
				return Input{Path: writeTemp(t, "points.csv", "vehicle_id,time,lon,lat\n"+
					"v1,2024-05-01T08:00:00Z,13.010,52.010\n"+
					"v1,2024-05-01T08:01:00Z,13.015,north\n"), Format: FormatPoints}
			},
			RowError{Line: 3, Reason: ReasonUnparseable, Column: colLat, Value: "north"},
			`points.csv:3: unparseable lat "north"`},
		{"CSV points, GPS jump",
			func(t *testing.T) Input {
				return Input{Path: writeTemp(t, "points.csv", "vehicle_id,time,lon,lat\n"+
					"v1,2024-05-01T08:00:00Z,13.010,52.010\n"+
					"v1,2024-05-01T08:00:01Z,13.030,52.010\n"+
					"v1,2024-05-01T08:02:00Z,13.035,52.010\n"), Format: FormatPoints}
			},
			RowError{Line: 2, Reason: ReasonGPSJump, Detail: "a step between points faster than 200 km/h (trip of 3 points to line 4)"},
			`points.csv:2: gps jump: a step between points faster than 200 km/h (trip of 3 points to line 4)`},
		{"GPX, missing time",
			func(t *testing.T) Input {
				return Input{Path: writeTemp(t, "track.gpx", gpxHead+
					`  <trkpt lat="52.010" lon="13.005"><time>2024-05-01T08:00:00Z</time></trkpt>
  <trkpt lat="52.010" lon="13.030"></trkpt>
 </trkseg></trk>
</gpx>`), Format: FormatGPX}
			},
			RowError{Line: 5, Reason: ReasonMissingField, Detail: "trkpt without <time>"},
			`track.gpx:5: missing field: trkpt without <time>`},
		{"GPX, unparseable coordinate",
			func(t *testing.T) Input {
				return Input{Path: writeTemp(t, "track.gpx", gpxHead+
					`  <trkpt lat="52.010" lon="east"><time>2024-05-01T08:00:00Z</time></trkpt>
 </trkseg></trk>
</gpx>`), Format: FormatGPX}
			},
			RowError{Line: 4, Reason: ReasonUnparseable, Column: "lon", Value: "east"},
			`track.gpx:4: unparseable lon "east"`},
		{"Parquet trips, unparseable time",
			func(t *testing.T) Input {
				return Input{Path: parquetFile(t, []parquetTrip{good, good, badTime})}
			},
			RowError{Row: 3, Reason: ReasonUnparseable, Column: colStartTime},
			`trips.parquet:row 3: unparseable start_time`},
		{"Parquet trips, bad speed",
			func(t *testing.T) Input {
				return Input{Path: parquetFile(t, []parquetTrip{good, fast})}
			},
			RowError{Row: 2, Reason: ReasonBadSpeed, Detail: "720.00 km/h (allowed 1-150 km/h)"},
			`trips.parquet:row 2: bad speed: 720.00 km/h (allowed 1-150 km/h)`},
	}
	p := gridPartition(2, 1, 13.0, 52.0, 0.02)
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			in := tc.input(t)
			opts := DefaultOptions()
			opts.Strict = true
			opts.MaxDuration = time.Hour
			_, err := Ingest(t.Context(), p, "test", []Input{in}, opts)
			var re *RowError
			if !errors.As(err, &re) {
				t.Fatalf("error %v (%T), want a *RowError", err, err)
			}
			if re.File != in.Path || re.Line != tc.want.Line || re.Row != tc.want.Row || re.Reason != tc.want.Reason ||
				re.Column != tc.want.Column || re.Value != tc.want.Value || re.Detail != tc.want.Detail {
				t.Errorf("got %+v\nwant file %s, %+v", *re, in.Path, tc.want)
			}
			if malformed := tc.want.Reason == ReasonUnparseable && tc.want.Column == ""; (re.Err != nil) != malformed {
				t.Errorf("cause %v", re.Err)
			}
			if want := "regiongraph: " + filepath.Dir(in.Path) + "/" + tc.errMsg; len(err.Error()) < len(want) || err.Error()[:len(want)] != want {
				t.Errorf("text %q\nwant %q...", err.Error(), want)
			}
		})
	}
}
