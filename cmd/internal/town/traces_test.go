package town

import (
	"bytes"
	"encoding/xml"
	"strings"
	"testing"
	"time"

	"github.com/paulmach/orb/geo"
)

func TestTraces(t *testing.T) {
	tw, err := Generate(defaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	o := defaultSimOptions()
	o.Days, o.TripsPerDay, o.TraceEvery, o.TraceInterval = 1, 2000, 100, 15*time.Second
	var traces []Trace
	o.OnTrace = func(tr Trace) error { traces = append(traces, tr); return nil }
	data, st := simulate(t, tw, o)
	trips := readTrips(t, bytes.NewReader(data))
	if want := st.Trips / 100; len(traces) != want {
		t.Fatalf("%d traces, want %d", len(traces), want)
	}
	for _, tr := range traces {
		c := trips[tr.tripID-1] // ids run from 1 in row order
		first, last := tr.points[0], tr.points[len(tr.points)-1]
		if !first.Time.Equal(c.start) || !last.Time.Equal(c.end) {
			t.Fatalf("trip %d: trace %v..%v, trip %v..%v", tr.tripID, first.Time, last.Time, c.start, c.end)
		}
		if geo.Distance(first.Point, c.o) > 1 || geo.Distance(last.Point, c.d) > 1 {
			t.Fatalf("trip %d: trace ends %v %v, trip ends %v %v", tr.tripID, first.Point, last.Point, c.o, c.d)
		}
		var along float64
		for k := 1; k < len(tr.points); k++ {
			along += geo.Distance(tr.points[k-1].Point, tr.points[k].Point)
			if tr.points[k].Time.Sub(tr.points[k-1].Time) > o.TraceInterval+o.TraceInterval/2 {
				t.Fatalf("trip %d: gap of %v between fixes", tr.tripID, tr.points[k].Time.Sub(tr.points[k-1].Time))
			}
		}
		// Fixes cut corners, so the trace is no longer than the route (plus
		// rounding) and no shorter than the straight line.
		if along > c.distance+2 || along < geo.Distance(c.o, c.d)-1 {
			t.Fatalf("trip %d: trace %.0f m, route %.0f m, straight %.0f m", tr.tripID, along, c.distance, geo.Distance(c.o, c.d))
		}
	}
	var pts bytes.Buffer
	pw := NewPointsWriter(&pts)
	for _, tr := range traces[:3] {
		if err := pw.Write(tr); err != nil {
			t.Fatal(err)
		}
	}
	if err := pw.Flush(); err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(pts.String()), "\n")
	if lines[0] != pointsHeader || len(lines) != 1+len(traces[0].points)+len(traces[1].points)+len(traces[2].points) {
		t.Errorf("points CSV: header %q, %d lines", lines[0], len(lines))
	}
	var gpx bytes.Buffer
	if err := WriteGPX(&gpx, "narrows town <test>", traces[:3]); err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Creator string `xml:"creator,attr"`
		Trk     []struct {
			Seg []struct {
				Pt []struct {
					Lat  float64 `xml:"lat,attr"`
					Lon  float64 `xml:"lon,attr"`
					Time string  `xml:"time"`
				} `xml:"trkpt"`
			} `xml:"trkseg"`
		} `xml:"trk"`
	}
	if err := xml.Unmarshal(gpx.Bytes(), &doc); err != nil {
		t.Fatalf("GPX does not parse: %v", err)
	}
	if doc.Creator != "narrows town <test>" || len(doc.Trk) != 3 || len(doc.Trk[0].Seg) != 1 || len(doc.Trk[0].Seg[0].Pt) != len(traces[0].points) {
		t.Errorf("GPX: creator %q, %d tracks", doc.Creator, len(doc.Trk))
	}
	o.OnTrace = nil
	if _, err := tw.Simulate(t.Context(), o, &bytes.Buffer{}); err == nil {
		t.Error("TraceEvery without OnTrace: no error")
	}
}
