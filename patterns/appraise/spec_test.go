package appraise_test

import (
	"fmt"
	"slices"
	"strings"
	"testing"

	"github.com/paulmach/orb"

	"narrows/partition"
	"narrows/patterns/appraise"
)

func TestParseSpec(t *testing.T) {
	cases := []struct {
		in       string
		way      int64
		class    string
		crossing bool
		line     orb.LineString
		err      string
	}{
		{in: "way/4711", way: 4711},
		{in: "  way/1 ", way: 1},
		{in: "secondary bridge 9.5,47.1 9.51,47.12", class: "secondary", crossing: true, line: orb.LineString{{9.5, 47.1}, {9.51, 47.12}}},
		{in: "residential 1,2 3,4 5,6", class: "residential", line: orb.LineString{{1, 2}, {3, 4}, {5, 6}}},
		{in: "primary_link ford -1.5,-2 1.5,2", class: "primary_link", crossing: true, line: orb.LineString{{-1.5, -2}, {1.5, 2}}},
		{in: "way/0", err: "positive OSM way id"},
		{in: "way/x", err: "positive OSM way id"},
		{in: "", err: "empty"},
		{in: "footway 1,2 3,4", err: `"footway" is not a road class`},
		{in: "secondary 1,2", err: "at least two points"},
		{in: "secondary bridge", err: "at least two points"},
		{in: "secondary 1,2 3;4", err: `point 2 "3;4"`},
		{in: "secondary 1,2 181,4", err: `point 2 "181,4"`},
		{in: "secondary 1,91 1,4", err: `point 1 "1,91"`},
		{in: "secondary 1,NaN 1,4", err: `point 1`},
	}
	for _, c := range cases {
		t.Run(c.in, func(t *testing.T) {
			s, err := appraise.ParseSpec(c.in)
			if c.err != "" {
				if err == nil || !strings.Contains(err.Error(), c.err) {
					t.Fatalf("got %+v, %v; want error with %q", s, err, c.err)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if s.WayID != c.way || s.Link.Class != c.class || s.Link.Crossing != c.crossing || !slices.Equal(s.Link.Line, c.line) {
				t.Fatalf("got %+v, want way %d class %q crossing %v line %v", s, c.way, c.class, c.crossing, c.line)
			}
		})
	}
}

// FuzzParseSpec: no text panics, and a drawn line read back from its own
// text is the same line.
func FuzzParseSpec(f *testing.F) {
	for _, s := range []string{"way/12", "secondary bridge 9.5,47.1 9.51,47.12", "residential 1,2 3,4", "x", "tertiary 1e3,2 3,4"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		sp, err := appraise.ParseSpec(s)
		if err != nil || sp.WayID != 0 {
			return
		}
		again, err := appraise.ParseSpec(appraise.FormatLine(sp.Link))
		if err != nil {
			t.Fatalf("%q -> %q: %v", s, appraise.FormatLine(sp.Link), err)
		}
		if again.Link.Class != sp.Link.Class || again.Link.Crossing != sp.Link.Crossing || !slices.Equal(again.Link.Line, sp.Link.Line) {
			t.Fatalf("%q read back as %+v, was %+v", s, again.Link, sp.Link)
		}
	})
}

func ExampleParseSpec() {
	s, err := appraise.ParseSpec("secondary bridge 9.5071,47.1402 9.5153,47.142")
	fmt.Println(s.Link.Class, s.Link.Crossing, len(s.Link.Line), err)
	fmt.Println(appraise.FormatLine(s.Link))
	// Output:
	// secondary true 2 <nil>
	// secondary bridge 9.5071,47.1402 9.5153,47.142
}

// TestUserCandidates: way/N is looked up among the scheme extract's roads,
// drawn lines are named by their place in the list, and a way without a
// scheme extract or missing from it is an error.
func TestUserCandidates(t *testing.T) {
	scheme := &partition.Routing{Roads: []partition.RoadWay{
		{WayID: 7, Class: "tertiary", Crossing: true, Nodes: []int64{1, 2}, Line: orb.LineString{{1, 1}, {1, 2}}},
	}}
	got, err := appraise.UserCandidates([]string{"way/7", "primary 1,1 2,2"}, scheme)
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != 2 || got[0].Link.Name != "way/7" || got[0].Link.Class != "tertiary" || !got[0].Link.Crossing ||
		!slices.Equal(got[0].Link.Nodes, []int64{1, 2}) || got[1].Link.Name != "line 2" || got[1].Generated {
		t.Fatalf("got %+v", got)
	}
	for _, c := range []struct {
		text   string
		scheme *partition.Routing
		want   string
	}{
		{"way/8", scheme, "no road of the routable classes with that id"},
		{"way/7", nil, "the study names none"},
		{"tram 1,1 2,2", scheme, "not a road class"},
	} {
		if _, err := appraise.UserCandidates([]string{c.text}, c.scheme); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%q: %v, want %q", c.text, err, c.want)
		}
	}
}
