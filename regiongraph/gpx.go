package regiongraph

import (
	"bytes"
	"cmp"
	"context"
	"encoding/xml"
	"errors"
	"fmt"
	"io"
	"os"
	"slices"
	"strings"
)

// gpxPoint is a track point as read, before any checks.
type gpxPoint struct {
	lat, lon string // attributes as given
	time     string // text of the <time> child, empty when absent
	line     int64
}

// gpxSegment is one <trkseg>.
type gpxSegment struct {
	points []gpxPoint
	line   int64
}

// readGPX parses a GPX 1.0 or 1.1 document into its track segments. Route
// and way points are ignored. The error names the line of malformed XML.
func readGPX(r io.Reader) ([]gpxSegment, error) {
	d := xml.NewDecoder(r)
	d.Strict = true
	var p gpxParser
	for {
		line, _ := d.InputPos()
		tok, err := d.Token()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			var se *xml.SyntaxError
			if errors.As(err, &se) {
				return nil, fmt.Errorf("line %d: not well-formed GPX XML: %s", se.Line, se.Msg)
			}
			return nil, fmt.Errorf("line %d: %v", line, err)
		}
		switch t := tok.(type) {
		case xml.StartElement:
			if err := p.start(t, line); err != nil {
				return nil, err
			}
		case xml.EndElement:
			p.end(t)
		case xml.CharData:
			if p.inTime {
				p.text.Write(t)
			}
		}
	}
	if !p.rootSeen {
		return nil, fmt.Errorf("line 1: no <gpx> element (not a GPX file)")
	}
	return p.segs, nil
}

// gpxParser is the state of readGPX between tokens.
type gpxParser struct {
	segs     []gpxSegment
	cur      *gpxSegment // the open <trkseg>
	pt       *gpxPoint   // the open <trkpt>
	text     bytes.Buffer
	inTime   bool // in the <time> of pt
	depth    int
	ptDepth  int
	rootSeen bool
}

// start handles an element's start tag on the given line.
func (p *gpxParser) start(t xml.StartElement, line int) error {
	p.depth++
	if !p.rootSeen {
		if t.Name.Local != "gpx" {
			return fmt.Errorf("line %d: root element <%s>, want <gpx> (not a GPX file)", line, t.Name.Local)
		}
		p.rootSeen = true
		return nil
	}
	switch t.Name.Local {
	case "trkseg":
		p.segs = append(p.segs, gpxSegment{line: int64(line)})
		p.cur = &p.segs[len(p.segs)-1]
	case "trkpt":
		if p.cur == nil {
			return fmt.Errorf("line %d: <trkpt> outside <trkseg>", line)
		}
		p.cur.points = append(p.cur.points, gpxPoint{line: int64(line)})
		p.pt = &p.cur.points[len(p.cur.points)-1]
		p.ptDepth = p.depth
		for _, a := range t.Attr {
			switch a.Name.Local {
			case "lat":
				p.pt.lat = a.Value
			case "lon":
				p.pt.lon = a.Value
			}
		}
	case "time":
		if p.pt != nil && p.depth == p.ptDepth+1 {
			p.inTime = true
			p.text.Reset()
		}
	}
	return nil
}

// end handles an element's end tag.
func (p *gpxParser) end(t xml.EndElement) {
	switch t.Name.Local {
	case "trkseg":
		p.cur, p.pt = nil, nil
	case "trkpt":
		p.pt = nil
	case "time":
		if p.inTime && p.pt != nil {
			p.pt.time = strings.TrimSpace(p.text.String())
		}
		p.inTime = false
	}
	p.depth--
}

// ingestGPX reads one GPX file; each track segment with timed points is one
// trip. Rows are track points.
func ingestGPX(ctx context.Context, st *settings, path string, t *tally, progress func(int64)) (string, int64, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return "", 0, fmt.Errorf("regiongraph: %w", err)
	}
	h := newHash()
	h.Write(data)
	if bytes.IndexByte(data, 0) >= 0 {
		return "", 0, fmt.Errorf("regiongraph: %s: binary data, not GPX XML", path)
	}
	segs, err := readGPX(bytes.NewReader(data))
	if err != nil {
		return "", 0, fmt.Errorf("regiongraph: %s: %v", path, err)
	}
	var fail firstFault
	seg := pointSegmenter{st: st, t: t, file: path, fail: &fail}
	var rows int64
	for _, s := range segs {
		if err := ctx.Err(); err != nil {
			return "", 0, err
		}
		pts := make([]gpsPoint, 0, len(s.points))
		for _, p := range s.points {
			rows++
			f := fault{reason: ReasonUnparseable}
			var g gpsPoint
			switch {
			case p.lat == "" || p.lon == "":
				f = fault{reason: ReasonMissingField, detail: "trkpt without lat or lon"}
			case p.time == "":
				f = fault{reason: ReasonMissingField, detail: "trkpt without <time>"}
			default:
				g.line = p.line
				var e1, e2, e3 error
				g.lat, e1 = parseFloat([]byte(p.lat))
				g.lon, e2 = parseFloat([]byte(p.lon))
				g.ms, e3 = parseTime([]byte(p.time), t.zone)
				switch {
				case e1 != nil || g.lat < -90 || g.lat > 90:
					f.column, f.value = "lat", p.lat
				case e2 != nil || g.lon < -180 || g.lon > 180:
					f.column, f.value = "lon", p.lon
				case e3 != nil:
					f.column, f.value = "time", p.time
				default:
					f.reason = reasonUsed
				}
			}
			if f.reason != reasonUsed {
				t.count(f.reason, 1)
				if st.opts.Strict {
					fail.keep(0, f.at(path, p.line, 0))
				}
				continue
			}
			g.occupied = -1
			pts = append(pts, g)
		}
		if len(pts) == 0 {
			continue
		}
		slices.SortStableFunc(pts, func(a, b gpsPoint) int { return cmp.Compare(a.ms, b.ms) })
		seg.trip(pts)
	}
	if progress != nil {
		progress(int64(len(data)))
	}
	if fail.err != nil {
		return "", 0, fail.err
	}
	return hexSum(h), rows, nil
}
