package route_test

import (
	"context"
	"math"
	"testing"

	"github.com/paulmach/orb"

	"narrows/partition"
	"narrows/partition/geodesy"
	"narrows/partition/route"
)

// A hand-drawn network, along a parallel at 50° N where 0.01° of
// longitude is 715 m and 0.01° of latitude 1,112 m:
//
//	1 ---(primary, one-way east)--- 2
//	|                              |
//	residential                residential
//	|                              |
//	3 ---(residential)------------ 4 -- untagged road over the river -- 6
//	                               |
//	                               +--- bridge=yes over the river ---- 5
//
// A river runs north-south at lon 10.025 east of 4.
func handNetwork(t *testing.T) *route.Network {
	t.Helper()
	pt := map[int64]orb.Point{
		1: {10.00, 50.01}, 2: {10.02, 50.01}, 3: {10.00, 50.00}, 4: {10.02, 50.00},
		5: {10.03, 49.995}, 6: {10.03, 50.00},
	}
	way := func(id int64, class string, oneway int8, crossing bool, ids ...int64) partition.RoadWay {
		w := partition.RoadWay{WayID: id, Class: class, Oneway: oneway, Crossing: crossing, Nodes: ids}
		for _, i := range ids {
			w.Line = append(w.Line, pt[i])
		}
		return w
	}
	r := &partition.Routing{
		Roads: []partition.RoadWay{
			way(10, "primary", 1, false, 1, 2),
			way(11, "residential", 0, false, 1, 3),
			way(12, "residential", 0, false, 2, 4),
			way(13, "residential", 0, false, 3, 4),
			way(14, "residential", 0, false, 4, 6),
			way(15, "residential", 0, true, 4, 5),
		},
		Barriers: []partition.BarrierWay{{WayID: 90, Kind: "river", Nodes: []int64{91, 92},
			Line: orb.LineString{{10.025, 49.98}, {10.025, 50.03}}}},
	}
	n, err := route.Build(context.Background(), r, route.DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	return n
}

func TestHandCheckedPaths(t *testing.T) {
	n := handNetwork(t)
	node := func(id int64) int {
		v, ok := n.Node(id)
		if !ok {
			t.Fatalf("node %d missing", id)
		}
		return v
	}
	if len(n.Dropped) != 1 || n.Dropped[0].WayID != 14 || n.Dropped[0].BarrierWayID != 90 {
		t.Fatalf("dropped %+v, want way 14 across river 90 only", n.Dropped)
	}
	gc := func(a, b orb.Point) float64 { return geodesy.GreatCircleMetres(a, b) }
	p := func(id int64) orb.Point { return n.Points[node(id)] }
	res, prim := geodesy.MPS(30), geodesy.MPS(60)
	s := route.NewSearch(n)
	cases := []struct {
		name         string
		from, to     int64
		secs, metres float64
	}{
		// 1 to 4: east along the one-way primary (2 km at 60) then south
		// (1.1 km at 30) beats south then east (1.1 + 1.4 km at 30).
		{"one-way east", 1, 4, gc(p(1), p(2))/prim + gc(p(2), p(4))/res, gc(p(1), p(2)) + gc(p(2), p(4))},
		// 2 to 1: the primary is one-way, so round by 4 and 3.
		{"against the one-way", 2, 1, (gc(p(2), p(4)) + gc(p(4), p(3)) + gc(p(3), p(1))) / res, gc(p(2), p(4)) + gc(p(4), p(3)) + gc(p(3), p(1))},
		// 3 to 5 over the bridge.
		{"bridge", 3, 5, (gc(p(3), p(4)) + gc(p(4), p(5))) / res, gc(p(3), p(4)) + gc(p(4), p(5))},
		// 3 to 6: the untagged crossing is dropped, 6 is cut off.
		{"no crossing tag", 3, 6, math.Inf(1), math.Inf(1)},
	}
	for _, c := range cases {
		s.From(node(c.from), []int{node(c.to)})
		got, m := s.Seconds(node(c.to)), s.Metres(node(c.to))
		if math.IsInf(c.secs, 1) {
			if !math.IsInf(got, 1) {
				t.Errorf("%s: reached in %v s, want unreachable", c.name, got)
			}
			continue
		}
		if math.Abs(got-c.secs) > 1e-6 || math.Abs(m-c.metres) > 1e-6 {
			t.Errorf("%s: %v s, %v m; want %v s, %v m", c.name, got, m, c.secs, c.metres)
		}
	}
	// Plain numbers as a check on the formula: 1 to 4 is about
	// 1,430 m at 60 km/h (86 s) plus 1,112 m at 30 km/h (133 s).
	s.From(node(1), nil)
	if got := s.Seconds(node(4)); math.Abs(got-219.3) > 1.5 {
		t.Errorf("1 to 4: %v s, want about 219 s", got)
	}
}

func TestLinks(t *testing.T) {
	n := handNetwork(t)
	snap := n.NewSnapper(nil)
	six, _ := n.Node(6)
	three, _ := n.Node(3)
	// A drawn bridge from 4 to 6 joins 6 to the network.
	bridge := route.Link{Name: "new bridge", Class: "residential", Crossing: true, Line: orb.LineString{{10.02, 50.0}, {10.03, 50.0}}}
	w, err := n.WithLinks([]route.Link{bridge}, snap, 50)
	if err != nil {
		t.Fatal(err)
	}
	s := route.NewSearch(w)
	s.From(three, []int{six})
	if math.IsInf(s.Seconds(six), 1) || s.Link(six) != 0 {
		t.Fatalf("3 to 6 with the bridge: %v s, link %d", s.Seconds(six), s.Link(six))
	}
	bad := []struct {
		name string
		link route.Link
		want string
	}{
		{"no crossing tag", route.Link{Name: "x", Class: "residential", Line: orb.LineString{{10.02, 50.0}, {10.03, 50.0}}}, "not tagged as a bridge"},
		{"outside", route.Link{Name: "y", Class: "residential", Line: orb.LineString{{10.02, 50.0}, {11, 51}}}, "not within 50 m"},
		{"one point", route.Link{Name: "z", Line: orb.LineString{{10.02, 50.0}}}, "fewer than two points"},
	}
	for _, b := range bad {
		_, err := n.WithLinks([]route.Link{b.link}, snap, 50)
		if err == nil || !contains(err.Error(), b.want) {
			t.Errorf("%s: error %v, want %q", b.name, err, b.want)
		}
	}
}

func contains(s, sub string) bool {
	for i := 0; i+len(sub) <= len(s); i++ {
		if s[i:i+len(sub)] == sub {
			return true
		}
	}
	return false
}
