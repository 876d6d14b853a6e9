package report

import (
	"bytes"
	"encoding/xml"
	"io"
	"reflect"
	"sort"
	"strings"
	"testing"

	"narrows/patterns"
)

// svgFacts walks an SVG document with encoding/xml (so it must be
// well-formed) and returns the verdicts listed in the legend and those of
// the drawn finding lines.
func svgFacts(t testing.TB, svg []byte) (legend, drawn []string) {
	t.Helper()
	d := xml.NewDecoder(bytes.NewReader(svg))
	d.Strict = true
	var stack []string
	seenLine := map[string]bool{}
	for {
		tok, err := d.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("SVG is not well-formed XML: %v\n%s", err, svg)
		}
		switch el := tok.(type) {
		case xml.StartElement:
			attr := map[string]string{}
			for _, a := range el.Attr {
				attr[a.Name.Local] = a.Value
			}
			inLegend := false
			for _, s := range stack {
				if s == "legend" {
					inLegend = true
				}
			}
			if inLegend && el.Name.Local == "g" && attr["class"] == "legend-entry" {
				if vd, ok := attr["data-verdict"]; ok {
					legend = append(legend, vd)
				}
			}
			if !inLegend && el.Name.Local == "line" {
				if vd, ok := attr["data-verdict"]; ok && !seenLine[vd] {
					seenLine[vd] = true
					drawn = append(drawn, vd)
				}
			}
			stack = append(stack, attr["id"])
		case xml.EndElement:
			stack = stack[:len(stack)-1]
		}
	}
	sort.Strings(legend)
	sort.Strings(drawn)
	return legend, drawn
}

// extractSVG returns the first <svg ...>...</svg> element of a page.
func extractSVG(t testing.TB, page []byte) []byte {
	t.Helper()
	i := bytes.Index(page, []byte("<svg"))
	j := bytes.Index(page[max(i, 0):], []byte("</svg>"))
	if i < 0 || j < 0 {
		t.Fatalf("no SVG element in page")
	}
	return page[i : i+j+len("</svg>")]
}

func TestSVGLegendListsEveryVerdictShown(t *testing.T) {
	only := func(keep ...patterns.Verdict) Input {
		in := fxInput()
		var as []patterns.Assessment
		for _, a := range in.Comparison.Assessments {
			for _, k := range keep {
				if a.Verdict == k {
					as = append(as, a)
				}
			}
		}
		in.Comparison.Assessments = as
		return in
	}
	tests := []struct {
		name string
		in   Input
		want []string
	}{
		{"every verdict", fxInput(), []string{"cleared", "eased", "new", "unchanged", "worse"}},
		{"two verdicts", only(patterns.Cleared, patterns.Worse), []string{"cleared", "worse"}},
		{"no findings", only(), nil},
		{"scan without comparison", fxScanInput(), []string{""}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			var buf bytes.Buffer
			if err := WriteHTML(&buf, tc.in); err != nil {
				t.Fatal(err)
			}
			page := buf.Bytes()
			legend, drawn := svgFacts(t, extractSVG(t, page))
			if !reflect.DeepEqual(legend, tc.want) {
				t.Errorf("legend = %q, want %q", legend, tc.want)
			}
			if !reflect.DeepEqual(drawn, tc.want) {
				t.Errorf("drawn verdicts = %q, want %q", drawn, tc.want)
			}
		})
	}
}

func TestHTMLPage(t *testing.T) {
	in := fxInput()
	in.Title = `Lowmere </title><script>alert("x")</script> & co`
	in.Regions.Regions[4].BorderRoads[0].Name = `A & B <Road> "quoted"`
	v, err := newView(in)
	if err != nil {
		t.Fatal(err)
	}
	page := renderHTML(t, v)
	// The whole page is well-formed XML as well as HTML.
	d := xml.NewDecoder(bytes.NewReader(page))
	d.Strict = true
	for {
		if _, err := d.Token(); err == io.EOF {
			break
		} else if err != nil {
			t.Fatalf("page is not well-formed XML: %v", err)
		}
	}
	if bytes.Contains(page, []byte("<script")) {
		t.Error("title text was written as markup")
	}
	// Offline: nothing to fetch.
	for _, ref := range []string{"http://", "https://", "src=", "<link"} {
		if bytes.Contains(bytes.ReplaceAll(page, []byte(`xmlns="http://www.w3.org/`), nil), []byte(ref)) {
			t.Errorf("page refers to %q", ref)
		}
	}
	s := string(page)
	for _, want := range []string{Headline(in), "<table id=\"verdicts\">", "worse", "cleared", "n&lt;10"} {
		if !strings.Contains(s, strings.NewReplacer("'", "&#39;", `"`, "&#34;", ">", "&gt;", "+", "&#43;").Replace(want)) && !strings.Contains(s, want) {
			t.Errorf("page lacks %q", want)
		}
	}
	// One verdict table row per verdict present, with its count.
	table := s[strings.Index(s, `<table id="verdicts">`):]
	table = table[:strings.Index(table, "</table>")]
	if n := strings.Count(table, `<td class="num">1</td><td>`); n != 5 {
		t.Errorf("verdict table rows with count 1 = %d, want 5", n)
	}
}

func TestSVGDeterministic(t *testing.T) {
	v1, _ := newView(fxInput())
	v2, _ := newView(fxInput())
	if v1.svg() != v2.svg() {
		t.Error("SVG differs between two renderings")
	}
}

// FuzzSVGText feeds arbitrary data text (title, road name, finding id and
// area) through the SVG and HTML writers: the SVG must stay well-formed
// XML and the page must render.
func FuzzSVGText(f *testing.F) {
	f.Add("Lowmere", "Mill Lane", "1>2", "No change.")
	f.Add("=1+1", evilRoad, "<x>", "&amp; ]]> <!--")
	f.Add("\x00\x01\ufffe", "\xff\xfe", "\"'", "</svg>")
	f.Fuzz(func(t *testing.T, title, road, id, area string) {
		in := fxInput()
		in.Title = title
		in.Regions.Regions[0].BorderRoads[0].Name = road
		in.Comparison.Assessments[0].Finding.ID = id
		in.Area = area
		v, err := newView(in)
		if err != nil {
			t.Fatal(err)
		}
		svgFacts(t, []byte(v.svg()))
		page := renderHTML(t, v)
		svgFacts(t, extractSVG(t, page))
		d := xml.NewDecoder(bytes.NewReader(page))
		for {
			if _, err := d.Token(); err == io.EOF {
				break
			} else if err != nil {
				t.Fatalf("page is not well-formed XML: %v", err)
			}
		}
	})
}
