package regiongraph

import (
	"bufio"
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

// A GPX file is read token by token: only the open track segment is held,
// and the XML is bounded as it is read, so that a file crafted to be deep
// or to hold one huge text does not take memory out of proportion: the
// nesting of elements (GPX needs about six levels; extensions a few more)
// and the size of one text or attribute list.
const (
	maxGPXDepth = 64
	maxGPXToken = 1 << 20
)

// readGPX parses a GPX 1.0 or 1.1 document into its track segments. Route
// and way points are ignored. The error names the line of malformed XML.
func readGPX(r io.Reader) ([]gpxSegment, error) {
	var segs []gpxSegment
	err := scanGPX(r, func(s gpxSegment) error {
		segs = append(segs, s)
		return nil
	})
	return segs, err
}

// scanGPX parses a GPX document and passes each track segment to each as
// soon as it ends; an error from each stops the scan.
func scanGPX(r io.Reader, each func(gpxSegment) error) error {
	d := xml.NewDecoder(r)
	d.Strict = true
	p := gpxParser{each: each}
	for {
		line, _ := d.InputPos()
		tok, err := d.Token()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			var se *xml.SyntaxError
			if errors.As(err, &se) {
				return fmt.Errorf("line %d: not well-formed GPX XML: %s", se.Line, se.Msg)
			}
			return fmt.Errorf("line %d: %v", line, err)
		}
		switch t := tok.(type) {
		case xml.StartElement:
			if p.depth >= maxGPXDepth {
				return fmt.Errorf("line %d: elements nest deeper than %d levels (not GPX as written by a device)", line, maxGPXDepth)
			}
			size := 0
			for _, a := range t.Attr {
				size += len(a.Name.Local) + len(a.Value)
			}
			if size > maxGPXToken {
				return fmt.Errorf("line %d: a start tag of %d bytes, more than %d", line, size, maxGPXToken)
			}
			if err := p.start(t, line); err != nil {
				return err
			}
		case xml.EndElement:
			if err := p.end(t); err != nil {
				return err
			}
		case xml.CharData:
			if len(t) > maxGPXToken {
				return fmt.Errorf("line %d: a text of %d bytes, more than %d", line, len(t), maxGPXToken)
			}
			if p.inTime {
				p.text.Write(t)
			}
		case xml.Comment:
			if len(t) > maxGPXToken {
				return fmt.Errorf("line %d: a comment of %d bytes, more than %d", line, len(t), maxGPXToken)
			}
		}
	}
	if !p.rootSeen {
		return fmt.Errorf("line 1: no <gpx> element (not a GPX file)")
	}
	if p.cur != nil {
		// A file cut short inside a segment fails above (unclosed
		// elements); this is a segment left open at a well-formed end.
		return p.each(*p.cur)
	}
	return nil
}

// gpxParser is the state of readGPX between tokens.
type gpxParser struct {
	each     func(gpxSegment) error // called with each segment as it ends
	cur      *gpxSegment            // the open <trkseg>
	pt       *gpxPoint              // the open <trkpt>
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
		if p.cur != nil {
			// A segment inside a segment (not valid GPX) ends the outer one.
			seg := *p.cur
			p.cur, p.pt = nil, nil
			if err := p.each(seg); err != nil {
				return err
			}
		}
		p.cur = &gpxSegment{line: int64(line)}
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
func (p *gpxParser) end(t xml.EndElement) error {
	p.depth--
	switch t.Name.Local {
	case "trkseg":
		if p.cur != nil {
			seg := *p.cur
			p.cur, p.pt = nil, nil
			return p.each(seg)
		}
	case "trkpt":
		p.pt = nil
	case "time":
		if p.inTime && p.pt != nil {
			p.pt.time = strings.TrimSpace(p.text.String())
		}
		p.inTime = false
	}
	return nil
}

// ingestGPX reads one GPX file, streaming; each track segment with timed
// points is one trip. Rows are track points.
func ingestGPX(ctx context.Context, st *settings, path string, t *tally, progress func(int64)) (string, int64, error) {
	f, err := os.Open(path)
	if err != nil {
		return "", 0, fmt.Errorf("regiongraph: %w", err)
	}
	defer f.Close()
	h := newHash()
	in := &gpxInput{r: io.TeeReader(f, h), progress: progress}
	var fail firstFault
	seg := pointSegmenter{st: st, t: t, file: path, fail: &fail}
	var rows int64
	err = scanGPX(bufio.NewReaderSize(in, 64<<10), func(s gpxSegment) error {
		if err := ctx.Err(); err != nil {
			return err
		}
		rows += int64(len(s.points))
		gpxTrip(st, t, &seg, &fail, path, s)
		return nil
	})
	switch {
	case errors.Is(err, errGPXBinary):
		return "", 0, fmt.Errorf("regiongraph: %s: binary data, not GPX XML", path)
	case ctx.Err() != nil:
		return "", 0, ctx.Err()
	case err != nil:
		return "", 0, fmt.Errorf("regiongraph: %s: %v", path, err)
	}
	if fail.err != nil {
		return "", 0, fail.err
	}
	return hexSum(h), rows, nil
}

var errGPXBinary = errors.New("binary data")

// gpxInput reads a GPX file, reporting progress and refusing a NUL byte
// (binary data) wherever it comes.
type gpxInput struct {
	r        io.Reader
	progress func(int64)
}

func (g *gpxInput) Read(b []byte) (int, error) {
	n, err := g.r.Read(b)
	if bytes.IndexByte(b[:n], 0) >= 0 {
		return 0, errGPXBinary
	}
	if g.progress != nil && n > 0 {
		g.progress(int64(n))
	}
	return n, err
}

// gpxTrip checks a segment's points and passes the good ones, in time
// order, to the segmenter.
func gpxTrip(st *settings, t *tally, seg *pointSegmenter, fail *firstFault, path string, s gpxSegment) {
	pts := make([]gpsPoint, 0, len(s.points))
	for _, p := range s.points {
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
		return
	}
	slices.SortStableFunc(pts, func(a, b gpsPoint) int { return cmp.Compare(a.ms, b.ms) })
	seg.trip(pts)
}
