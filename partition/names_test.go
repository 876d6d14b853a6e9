package partition

import (
	"fmt"
	"slices"
	"testing"

	"github.com/paulmach/orb"
	"github.com/paulmach/osm"
)

func TestLabel(t *testing.T) {
	tests := []struct {
		tags  osm.Tags
		class string
		want  string
	}{
		{osm.Tags{{Key: "name", Value: "Veterans Memorial Expressway"}, {Key: "ref", Value: "I 95"}}, "motorway", "I 95"},
		{osm.Tags{{Key: "ref", Value: "I 95;US 40"}}, "trunk", "I 95"},
		{osm.Tags{{Key: "name", Value: "Retzer Bundesstraße; Ringstraße"}}, "primary", "Retzer Bundesstraße"},
		{osm.Tags{{Key: "name", Value: "Mill Lane"}, {Key: "ref", Value: "B 2"}}, "primary", "Mill Lane"},
		{osm.Tags{{Key: "name", Value: "fixme"}, {Key: "ref", Value: "S 7"}}, "secondary", "S 7"},
		{osm.Tags{{Key: "name", Value: " ; "}}, "rail", "(unnamed rail)"},
	}
	for _, tc := range tests {
		if got := label(tc.tags, tc.class); got != tc.want {
			t.Errorf("label(%v, %s) = %q, want %q", tc.tags, tc.class, got, tc.want)
		}
	}
}

// Points about 40°N: 0.01° of latitude is 1.11 km.
func TestBorderName(t *testing.T) {
	places := []placeRec{{id: 1, name: "Ashgrove", pt: orb.Point{0, 40}}}
	road := func(names ...string) []BorderRoad {
		var out []BorderRoad
		for i, n := range names {
			out = append(out, BorderRoad{Name: n, LengthKM: float64(10 - i)})
		}
		return out
	}
	tests := []struct {
		name    string
		borders []BorderRoad
		tunnels map[string]bool
		point   orb.Point
		places  []placeRec
		want    string
	}{
		{"two longest named", road("Mill Lane", "(unnamed rail)", "Ferry Street", "Kiln Road"), nil, orb.Point{0, 40.1}, places, "Mill Lane / Ferry Street"},
		{"tunnel skipped", road("Harbour Tunnel", "Mill Lane", "Ferry Street"), map[string]bool{"Harbour Tunnel": true}, orb.Point{0, 40.1}, places, "Mill Lane / Ferry Street"},
		{"unnamed: nearest place", road("(unnamed rail)", "(unnamed coastline)"), nil, orb.Point{0, 40.01}, places, "1.1 km north of Ashgrove"},
		{"unnamed: at the place", road("(unnamed rail)"), nil, orb.Point{0.001, 40}, places, "near Ashgrove"},
		{"unnamed, place too far: tunnel", road("(unnamed rail)", "Harbour Tunnel"), map[string]bool{"Harbour Tunnel": true}, orb.Point{0, 40.1}, places, "Harbour Tunnel"},
		{"unnamed, no place", road("(unnamed rail)", "(unnamed coastline)", "(unnamed rail)"), nil, orb.Point{0, 40.1}, nil, "unnamed railway / unnamed shore"},
		{"nothing", nil, nil, orb.Point{0, 40.1}, nil, "no named border"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			r := Region{BorderRoads: tc.borders, Point: tc.point}
			if got := borderName(&r, tc.tunnels, tc.places); got != tc.want {
				t.Errorf("got %q, want %q", got, tc.want)
			}
		})
	}
}

func TestDisambiguate(t *testing.T) {
	// Four regions along one road pair, each near a different place but
	// the last two near the same one, which a further border road tells
	// apart; two more share another name.
	places := []placeRec{{id: 1, name: "Ashgrove", pt: orb.Point{0, 40}}, {id: 2, name: "Brook End", pt: orb.Point{0.05, 40}}}
	same := "Mill Lane / Ferry Street"
	regs := []Region{
		{ID: 1, Name: same, Point: orb.Point{0, 40.001}},
		{ID: 2, Name: same, Point: orb.Point{0.05, 40.001}},
		{ID: 3, Name: same, Point: orb.Point{0.1, 40.001}, BorderRoads: []BorderRoad{{Name: "Mill Lane", LengthKM: 2}, {Name: "Kiln Road", LengthKM: 1}}},
		{ID: 4, Name: same, Point: orb.Point{0.1, 40.011}, BorderRoads: []BorderRoad{{Name: "Ferry Street", LengthKM: 2}, {Name: "Quay Road", LengthKM: 1}}},
		{ID: 5, Name: "Kiln Road", Point: orb.Point{0.2, 40.2}},
		{ID: 6, Name: "Kiln Road", Point: orb.Point{0.2, 40.1}},
		{ID: 7, Name: "Ashgrove", Point: orb.Point{0, 40}},
	}
	disambiguate(regs, places, make([]map[string]bool, len(regs)))
	want := []string{
		same + " (near Ashgrove)",
		same + " (near Brook End)",
		same + " (by Kiln Road)",
		same + " (by Quay Road)",
		"Kiln Road (north)",
		"Kiln Road (south)",
		"Ashgrove",
	}
	var got []string
	for _, r := range regs {
		got = append(got, r.Name)
	}
	if !slices.Equal(got, want) {
		t.Errorf("names\n got  %q\n want %q", got, want)
	}
}

func TestPlaceRelationNamesRegion(t *testing.T) {
	// A secondary road at x = 1500 m splits the study area in two. A
	// suburb is drawn as a multipolygon of two ways (one untagged, one an
	// administrative boundary) around the west half's point; the east
	// half has no place and keeps its road name. Drawn as a boundary
	// relation, the suburb names the west half just the same; with a
	// member missing, its ring is open and names nothing.
	tests := []struct {
		name     string
		relType  string
		drop     bool
		wantWest string
	}{
		{"multipolygon", "multipolygon", false, "Ashgrove"},
		{"boundary", "boundary", false, "Ashgrove"},
		{"open ring", "multipolygon", true, "Mid Road (west)"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			rt := newRiverTown()
			rt.way([][2]float64{{1500, -50}, {1500, 2050}}, "highway=secondary", "name=Mid Road")
			corner := func(x, y float64) int {
				rt.nextID++
				q := rt.at(x, y)
				fmt.Fprintf(&rt.b, "<node id=\"%d\" lat=\"%.7f\" lon=\"%.7f\"/>\n", rt.nextID, q[1], q[0])
				return rt.nextID
			}
			sw, se, ne, nw := corner(100, 100), corner(1400, 100), corner(1400, 1900), corner(100, 1900)
			rt.b.WriteString(fmt.Sprintf("<way id=\"901\"><nd ref=\"%d\"/><nd ref=\"%d\"/><nd ref=\"%d\"/></way>\n", sw, se, ne))
			rt.b.WriteString(fmt.Sprintf("<way id=\"902\"><nd ref=\"%d\"/><nd ref=\"%d\"/><nd ref=\"%d\"/><tag k=\"boundary\" v=\"administrative\"/></way>\n", sw, nw, ne))
			rt.b.WriteString("<relation id=\"7\"><member type=\"way\" ref=\"901\" role=\"outer\"/>")
			if !tc.drop {
				rt.b.WriteString("<member type=\"way\" ref=\"902\" role=\"outer\"/>")
			}
			fmt.Fprintf(&rt.b, "<tag k=\"type\" v=%q/><tag k=\"place\" v=\"suburb\"/><tag k=\"name\" v=\"Ashgrove\"/></relation>\n", tc.relType)
			o := DefaultOptions()
			p := rt.build(t, o)
			if len(p.Regions) != 2 {
				t.Fatalf("%d regions, want 2", len(p.Regions))
			}
			west := regionAt(t, p, rt.at(700, 1000))
			east := regionAt(t, p, rt.at(2200, 1000))
			if west.Name != tc.wantWest || east.Name == "Ashgrove" {
				t.Errorf("west %q, east %q; want west %q", west.Name, east.Name, tc.wantWest)
			}
		})
	}
}

func FuzzJoinRings(f *testing.F) {
	f.Add([]byte{1, 2, 3, 0, 3, 4, 1, 0})
	f.Add([]byte{1, 2, 0, 2, 3, 0, 1, 3, 0})
	f.Add([]byte{5, 5, 0, 1})
	f.Fuzz(func(t *testing.T, data []byte) {
		// Zero bytes separate ways; other bytes are node ids.
		var parts [][]int64
		var cur []int64
		for _, b := range append(data, 0) {
			if b != 0 {
				cur = append(cur, int64(b))
				continue
			}
			if len(cur) >= 2 {
				parts = append(parts, cur)
			}
			cur = nil
		}
		total := 0
		for _, p := range parts {
			total += len(p)
		}
		used := 0
		for _, r := range joinRings(parts) {
			if len(r) < 4 || r[0] != r[len(r)-1] {
				t.Fatalf("ring %v is not closed or too short", r)
			}
			used += len(r)
		}
		// Each way is used at most once: a ring of k ways has their nodes
		// less the k-1 joins.
		if used > total {
			t.Fatalf("rings hold %d nodes, the ways only %d", used, total)
		}
	})
}
