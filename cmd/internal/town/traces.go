package town

import (
	"bufio"
	"encoding/xml"
	"fmt"
	"io"
	"math"
	"strconv"
	"time"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geo"
)

// Trace is the GPS trace of one simulated trip: positions along its route
// at a fixed interval, from the trip's start to its end.
type Trace struct {
	tripID int64
	points []tracePoint
}

// tracePoint is one GPS fix.
type tracePoint struct {
	Time  time.Time
	Point orb.Point // longitude, latitude
}

// pointsHeader is the first line of the GPS points CSV.
const pointsHeader = "vehicle_id,time,lon,lat,occupied"

// PointsWriter writes traces as GPS points CSV (pointsHeader). Each trace
// is one vehicle ("veh-<trip id>") occupied from its first to its last
// point, so a reader that cuts trips at changes of the occupied flag, or at
// a new vehicle, finds exactly the trip.
type PointsWriter struct {
	w      *bufio.Writer
	header bool
	buf    []byte
}

// NewPointsWriter returns a writer of GPS points CSV to w.
func NewPointsWriter(w io.Writer) *PointsWriter { return &PointsWriter{w: bufio.NewWriter(w)} }

// Write writes one trace.
func (pw *PointsWriter) Write(tr Trace) error {
	if !pw.header {
		pw.header = true
		if _, err := pw.w.WriteString(pointsHeader + "\n"); err != nil {
			return err
		}
	}
	for _, p := range tr.points {
		b := append(pw.buf[:0], "veh-"...)
		b = strconv.AppendInt(b, tr.tripID, 10)
		b = append(b, ',')
		b = p.Time.AppendFormat(b, time.RFC3339)
		b = append(b, ',')
		b = strconv.AppendFloat(b, p.Point[0], 'f', 6, 64)
		b = append(b, ',')
		b = strconv.AppendFloat(b, p.Point[1], 'f', 6, 64)
		b = append(b, ",1\n"...)
		pw.buf = b
		if _, err := pw.w.Write(b); err != nil {
			return err
		}
	}
	return nil
}

// Flush writes the header if nothing was written yet, then any buffered
// data.
func (pw *PointsWriter) Flush() error {
	if !pw.header {
		pw.header = true
		if _, err := pw.w.WriteString(pointsHeader + "\n"); err != nil {
			return err
		}
	}
	return pw.w.Flush()
}

// WriteGPX writes traces as a GPX 1.1 file: one track per trace, one
// segment per track (a segment is a trip to a GPX reader).
func WriteGPX(w io.Writer, creator string, traces []Trace) error {
	bw := bufio.NewWriter(w)
	fmt.Fprintf(bw, "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n<gpx version=\"1.1\" creator=\"")
	if err := xml.EscapeText(bw, []byte(creator)); err != nil {
		return err
	}
	fmt.Fprintf(bw, "\" xmlns=\"http://www.topografix.com/GPX/1/1\">\n")
	for _, tr := range traces {
		fmt.Fprintf(bw, "  <trk>\n    <name>trip %d</name>\n    <trkseg>\n", tr.tripID)
		for _, p := range tr.points {
			fmt.Fprintf(bw, "      <trkpt lat=\"%.6f\" lon=\"%.6f\"><time>%s</time></trkpt>\n",
				p.Point[1], p.Point[0], p.Time.UTC().Format(time.RFC3339))
		}
		fmt.Fprintf(bw, "    </trkseg>\n  </trk>\n")
	}
	fmt.Fprintf(bw, "</gpx>\n")
	return bw.Flush()
}

// traceOf samples the polyline line every interval seconds between start
// and start+duration, moving at constant speed along it.
func traceOf(id int64, line []orb.Point, start time.Time, duration, interval float64) Trace {
	tr := Trace{tripID: id}
	cum := make([]float64, len(line))
	for i := 1; i < len(line); i++ {
		cum[i] = cum[i-1] + geo.Distance(line[i-1], line[i])
	}
	total := cum[len(cum)-1]
	steps := int(math.Ceil(duration / interval))
	k := 0
	for s := 0; s <= steps; s++ {
		sec := math.Min(float64(s)*interval, duration)
		d := 0.0
		if duration > 0 {
			d = total * sec / duration
		}
		for k+1 < len(cum)-1 && cum[k+1] < d {
			k++
		}
		p := line[len(line)-1]
		if k+1 < len(line) {
			seg := cum[k+1] - cum[k]
			f := 0.0
			if seg > 0 {
				f = math.Min(1, math.Max(0, (d-cum[k])/seg))
			}
			a, b := line[k], line[k+1]
			p = orb.Point{a[0] + (b[0]-a[0])*f, a[1] + (b[1]-a[1])*f}
		}
		tr.points = append(tr.points, tracePoint{Time: start.Add(time.Duration(math.Round(sec)) * time.Second), Point: p})
	}
	return tr
}
