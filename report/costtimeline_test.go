package report

import (
	"bytes"
	"encoding/xml"
	"io"
	"math"
	"strconv"
	"strings"
	"testing"

	"narrows/patterns"
)

// svgElement is one element of an SVG, with its attributes and the
// attributes of the group it sits in.
type svgElement struct {
	name, groupID string
	attr          map[string]string
}

// svgElements parses an SVG and lists its elements in document order.
func svgElements(t *testing.T, svg []byte) []svgElement {
	t.Helper()
	dec := xml.NewDecoder(bytes.NewReader(svg))
	var out []svgElement
	var groups []string
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			return out
		}
		if err != nil {
			t.Fatalf("timeline SVG does not parse: %v", err)
		}
		switch el := tok.(type) {
		case xml.StartElement:
			e := svgElement{name: el.Name.Local, attr: map[string]string{}}
			for _, a := range el.Attr {
				e.attr[a.Name.Local] = a.Value
			}
			if len(groups) > 0 {
				e.groupID = groups[len(groups)-1]
			}
			if el.Name.Local == "g" {
				groups = append(groups, e.attr["id"])
			}
			out = append(out, e)
		case xml.EndElement:
			if el.Name.Local == "g" {
				groups = groups[:len(groups)-1]
			}
		}
	}
}

func num(t *testing.T, s string) float64 {
	t.Helper()
	x, err := strconv.ParseFloat(s, 64)
	if err != nil {
		t.Fatalf("%q is not a number", s)
	}
	return x
}

// timelineSVG returns the page's timeline SVG, or nil when it has none.
func timelineSVG(page []byte) []byte {
	i := bytes.Index(page, []byte(`<svg xmlns="http://www.w3.org/2000/svg" id="cost-timeline"`))
	if i < 0 {
		return nil
	}
	j := bytes.Index(page[i:], []byte("</svg>"))
	return page[i : i+j+len("</svg>")]
}

// TestCostTimelineMarksOpening renders the HTML page with a daily cost
// series on the costliest weak link before and reads the timeline back as
// XML: the opening mark stands on the opening day's point of the after
// series, between the two shaded periods, and each day is one point.
func TestCostTimelineMarksOpening(t *testing.T) {
	tests := []struct {
		name      string
		opening   string // "" for none
		suppress  bool   // the lead's trips under the publication minimum
		wantChart bool
		wantMark  bool
	}{
		{"opening on the first after day", "2026-05-04", false, true, true},
		{"opening between the periods", "2026-04-01", false, true, true},
		{"no opening given", "", false, true, false},
		{"opening after the last day", "2027-01-01", false, true, false},
		{"lead suppressed", "2026-05-04", true, false, false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			in := fxInput()
			c := in.Comparison
			c.Options.Opening = tc.opening
			lead := costliestBefore(c)
			if lead == nil || lead.Finding.Rank != 1 {
				t.Fatal("fixture: no rank-1 weak link before")
			}
			// Costs 10..23 before, 5..18 after, one value a day.
			for p, sc := range []*patterns.Scan{c.Before, c.After} {
				for i, d := range sc.Days {
					lead.DailyCost[p] = append(lead.DailyCost[p], patterns.DayValue{Day: d, Value: float64(10 - 5*p + i)})
				}
			}
			if tc.suppress {
				in.PublicationMinTrips = 1000
			}
			v, err := newView(in)
			if err != nil {
				t.Fatal(err)
			}
			svg := timelineSVG(renderHTML(t, v))
			if (svg != nil) != tc.wantChart {
				t.Fatalf("timeline shown %v, want %v", svg != nil, tc.wantChart)
			}
			if svg == nil {
				return
			}
			els := svgElements(t, svg)
			var mark, before, after *svgElement
			var lines []svgElement
			for i := range els {
				e := &els[i]
				switch {
				case e.name == "g" && e.attr["id"] == "opening":
					mark = e
				case e.name == "line" && e.groupID == "opening":
					lines = append(lines, *e)
				case e.name == "rect" && e.attr["id"] == "period-before":
					before = e
				case e.name == "rect" && e.attr["id"] == "period-after":
					after = e
				}
			}
			if before == nil || after == nil {
				t.Fatal("the periods are not both shaded")
			}
			beforeEnd := num(t, before.attr["x"]) + num(t, before.attr["width"])
			afterStart := num(t, after.attr["x"])
			if beforeEnd > afterStart {
				t.Errorf("before shading ends at %v, after the after shading starts (%v)", beforeEnd, afterStart)
			}
			// Points: one per day and period; the first after point is the
			// first after day, 2026-05-04.
			var firstAfterX, lastY float64
			points := 0
			for _, e := range els {
				if e.name != "polyline" {
					continue
				}
				pts := strings.Fields(e.attr["points"])
				points += len(pts)
				if e.attr["data-period"] == "1" {
					firstAfterX = num(t, strings.Split(pts[0], ",")[0])
					lastY = num(t, strings.Split(pts[len(pts)-1], ",")[1])
				}
			}
			if want := len(c.Before.Days) + len(c.After.Days); points != want {
				t.Errorf("%d points, want %d (one a day)", points, want)
			}
			// The largest cost is 23 (the last before day), so the scale's
			// top is 30: the last after point (18) stands at 18/30 of the
			// plot's height (16 to 200) above its foot.
			foot, head := 200.0, 16.0
			if got, want := lastY, foot-(foot-head)*18.0/30; math.Abs(got-want) > 0.1 {
				t.Errorf("last after point at y %v, want %v (cost 18 of a 30 scale)", got, want)
			}
			if !tc.wantMark {
				if mark != nil {
					t.Errorf("opening mark drawn (day %q), want none", mark.attr["data-day"])
				}
				return
			}
			if mark == nil || len(lines) != 1 {
				t.Fatalf("opening mark %v with %d lines, want one line", mark, len(lines))
			}
			if mark.attr["data-day"] != tc.opening {
				t.Errorf("mark on %q, want %q", mark.attr["data-day"], tc.opening)
			}
			x := num(t, lines[0].attr["x1"])
			if x != num(t, lines[0].attr["x2"]) {
				t.Error("opening line not upright")
			}
			if x < beforeEnd || x > firstAfterX+0.05 {
				t.Errorf("opening at x %v, want between the before shading's end %v and the first after day %v", x, beforeEnd, firstAfterX)
			}
			if tc.opening == c.After.Days[0] && math.Abs(x-firstAfterX) > 0.05 {
				t.Errorf("opening at x %v, want on the first after day's point %v", x, firstAfterX)
			}
			if !bytes.Contains(svg, []byte("Scheme opens "+tc.opening)) {
				t.Error("the mark's label does not name the day")
			}
		})
	}
}
