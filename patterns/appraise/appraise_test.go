package appraise_test

import (
	"context"
	"math"
	"strings"
	"testing"

	"github.com/paulmach/orb"

	"narrows/partition"
	"narrows/partition/geodesy"
	"narrows/partition/route"
	"narrows/patterns/appraise"
	"narrows/regiongraph"
)

// A hand-drawn network at 50° N (0.01° of longitude is about 715 m, of
// latitude about 1,112 m), all residential two-way roads (30 km/h):
//
//	2 -------------- 4
//	|                |
//	|      river     |
//	|        |       |
//	1        |       3
//
// The river runs north-south at lon 10.01 between lat 49.99 and 50.01, so
// the only way from 1 to 3 is round by 2 and 4.
var handPoints = map[int64]orb.Point{
	1: {10.00, 50.00}, 2: {10.00, 50.02}, 3: {10.02, 50.00}, 4: {10.02, 50.02},
}

func handNetwork(t testing.TB) *route.Network {
	t.Helper()
	way := func(id int64, a, b int64) partition.RoadWay {
		return partition.RoadWay{WayID: id, Class: "residential", Nodes: []int64{a, b},
			Line: orb.LineString{handPoints[a], handPoints[b]}}
	}
	r := &partition.Routing{
		Roads: []partition.RoadWay{way(10, 1, 2), way(11, 2, 4), way(12, 4, 3)},
		Barriers: []partition.BarrierWay{{WayID: 90, Kind: "river", Nodes: []int64{91, 92},
			Line: orb.LineString{{10.01, 49.99}, {10.01, 50.01}}}},
	}
	n, err := route.Build(context.Background(), r, route.DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	return n
}

func trip(a, b int64) regiongraph.Trip {
	return regiongraph.Trip{Origin: handPoints[a], Dest: handPoints[b], DistanceMetres: 9000, DurationSeconds: 1200}
}

// TestAppraiseHand checks each candidate's figures against sums worked
// out by hand on the drawn network. Four trips over two days: 1->3 twice,
// 3->1 once (all three cross the river, 2 + 2 + 1 km round by the north
// road), 1->2 once (never helped). A link 1-3 saves, on each crossing
// trip, the way round minus the link: per day 3/2 of that.
func TestAppraiseHand(t *testing.T) {
	net := handNetwork(t)
	gc := func(a, b int64) float64 { return geodesy.GreatCircleMetres(handPoints[a], handPoints[b]) }
	round := gc(1, 2) + gc(2, 4) + gc(4, 3) // 1 -> 3 without a link, about 5,878 m
	direct := gc(1, 3)                      // the link, about 1,430 m
	res, prim := geodesy.MPS(30), geodesy.MPS(60)
	trips := []regiongraph.Trip{trip(1, 3), trip(1, 3), trip(3, 1), trip(1, 2)}
	const days = 2
	link := func(name, class string, nodes []int64, line orb.LineString) appraise.Candidate {
		return appraise.Candidate{Link: route.Link{Name: name, Class: class, Line: line, Nodes: nodes, Crossing: true}}
	}
	// A hand-drawn line whose ends lie 14 m inside nodes 1 and 3: it joins
	// there (attach 50 m), so it routes like the link 1-3 but is shorter.
	drawn := orb.LineString{{10.0002, 50.00}, {10.0198, 50.00}}
	cands := []appraise.Candidate{
		link("way 1-3", "residential", []int64{1, 3}, orb.LineString{handPoints[1], handPoints[3]}),
		link("fast 1-3", "primary", []int64{1, 3}, orb.LineString{handPoints[1], handPoints[3]}),
		link("drawn", "residential", nil, drawn),
		// A slow copy of road 1-2: never the quicker way.
		link("slow 1-2", "living_street", []int64{1, 2}, orb.LineString{handPoints[1], handPoints[2]}),
	}
	a, err := appraise.Appraise(context.Background(), net, trips, days, cands, appraise.DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	near := func(what string, got, want float64) {
		t.Helper()
		if math.Abs(got-want) > 1e-6*math.Max(1, math.Abs(want)) {
			t.Errorf("%s = %.6f, want %.6f by hand", what, got, want)
		}
	}
	if a.Trips != 4 || a.Routed != 4 || a.Days != days {
		t.Fatalf("trips %d routed %d days %d, want 4, 4, 2", a.Trips, a.Routed, a.Days)
	}
	straight := (3*direct + gc(1, 2)) / days
	near("routed metres/day", a.RoutedMetres, (3*round+gc(1, 2))/days)
	near("routed seconds/day", a.RoutedSeconds, (3*round+gc(1, 2))/res/days)
	near("observed metres/day", a.ObservedMetres, 4*9000.0/days)
	near("observed seconds/day", a.ObservedSeconds, 4*1200.0/days)
	near("detour", a.Detour, (3*round+gc(1, 2))/days/straight)
	type want struct {
		name                    string
		length, metres, seconds float64
		share, detour           float64
	}
	saved := 3 * (round - direct) / days
	cases := []want{
		// Ranked by seconds saved per metre of link: the primary link
		// saves most; the drawn line saves what the residential way does
		// on a shorter length; the slow copy saves nothing.
		{"fast 1-3", direct, saved, 3 * (round/res - direct/prim) / days, 0.75, 1},
		{"drawn", geodesy.GreatCircleMetres(drawn[0], drawn[1]), saved, saved / res, 0.75, 1},
		{"way 1-3", direct, saved, saved / res, 0.75, 1},
		{"slow 1-2", gc(1, 2), 0, 0, 0, (3*round + gc(1, 2)) / days / straight},
	}
	if len(a.Results) != len(cases) {
		t.Fatalf("%d results, want %d", len(a.Results), len(cases))
	}
	for i, w := range cases {
		r := a.Results[i]
		if r.Candidate.Link.Name != w.name {
			t.Errorf("rank %d is %q, want %q", i+1, r.Candidate.Link.Name, w.name)
			continue
		}
		near(w.name+" length", r.LengthMetres, w.length)
		near(w.name+" metres saved/day", r.VehicleMetresSaved, w.metres)
		near(w.name+" seconds saved/day", r.VehicleSecondsSaved, w.seconds)
		near(w.name+" share using", r.ShareUsing, w.share)
		near(w.name+" detour", r.Detour, w.detour)
		if w.length > 0 {
			near(w.name+" seconds per metre", r.SecondsSavedPerMetre, w.seconds/w.length)
		}
	}
}

// TestAppraiseErrors: input an appraisal cannot use gets an error that
// says why.
func TestAppraiseErrors(t *testing.T) {
	net := handNetwork(t)
	far := regiongraph.Trip{Origin: orb.Point{11, 51}, Dest: orb.Point{11.1, 51}}
	ok := []regiongraph.Trip{trip(1, 3)}
	outside := appraise.Candidate{Link: route.Link{Name: "far away", Class: "primary", Crossing: true,
		Line: orb.LineString{{12, 52}, {12.01, 52}}}}
	unbridged := appraise.Candidate{Link: route.Link{Name: "no bridge", Class: "primary",
		Line: orb.LineString{handPoints[1], handPoints[3]}, Nodes: []int64{1, 3}}}
	cases := []struct {
		name  string
		trips []regiongraph.Trip
		days  int
		cands []appraise.Candidate
		want  string
	}{
		{"empty finding", nil, 5, nil, "the finding has no trips"},
		{"no days", ok, 0, nil, "0 analysed days"},
		{"trips off the network", []regiongraph.Trip{far}, 5, nil, "none of the finding's trips has both ends near the road network"},
		{"candidate outside the area", ok, 5, []appraise.Candidate{outside}, `candidate "far away": its end`},
		{"candidate across the river untagged", ok, 5, []appraise.Candidate{unbridged}, `candidate "no bridge" crosses the river (OSM way 90)`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			a, err := appraise.Appraise(context.Background(), net, c.trips, c.days, c.cands, appraise.DefaultOptions())
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Fatalf("got %v, %v; want an error with %q", a, err, c.want)
			}
		})
	}
}

// TestAppraisePaceHand: at the observed pace, every time is the
// free-flow time times the median over the routed trips of observed
// seconds per metre over free-flow seconds per metre along the route.
// On the drawn network every route is residential (1/res s/m at
// free-flow) and each trip runs 9,000 m, in 600, 1,200, 1,800 and
// 2,400 s: the ratios are k*res/9000 for those k, whose median is the
// mean of the middle two, 1,500*res/9000 (about 1.39). Metres, shares
// and ranks stay as at free-flow.
func TestAppraisePaceHand(t *testing.T) {
	net := handNetwork(t)
	res := geodesy.MPS(30)
	trips := []regiongraph.Trip{trip(1, 3), trip(1, 3), trip(3, 1), trip(1, 2)}
	for i, s := range []float64{1800, 600, 2400, 1200} {
		trips[i].DurationSeconds = s
	}
	cands := []appraise.Candidate{
		{Link: route.Link{Name: "way 1-3", Class: "residential", Nodes: []int64{1, 3}, Line: orb.LineString{handPoints[1], handPoints[3]}, Crossing: true}},
		{Link: route.Link{Name: "fast 1-3", Class: "primary", Nodes: []int64{1, 3}, Line: orb.LineString{handPoints[1], handPoints[3]}, Crossing: true}},
	}
	free, err := appraise.Appraise(context.Background(), net, trips, 2, cands, appraise.DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	opts := appraise.DefaultOptions()
	opts.Speeds = appraise.SpeedsObserved
	paced, err := appraise.Appraise(context.Background(), net, trips, 2, cands, opts)
	if err != nil {
		t.Fatal(err)
	}
	f := 1500 * res / 9000
	if free.Speeds != appraise.SpeedsFreeFlow || free.PaceFactor != 1 || paced.Speeds != appraise.SpeedsObserved || math.Abs(paced.PaceFactor-f) > 1e-9 {
		t.Fatalf("speeds %q factor %v and %q factor %v, want free-flow 1 and observed %.6f", free.Speeds, free.PaceFactor, paced.Speeds, paced.PaceFactor, f)
	}
	if math.Abs(paced.RoutedSeconds-f*free.RoutedSeconds) > 1e-6 || paced.RoutedMetres != free.RoutedMetres {
		t.Errorf("routed %.3f s %.3f m, want %.3f s %.3f m", paced.RoutedSeconds, paced.RoutedMetres, f*free.RoutedSeconds, free.RoutedMetres)
	}
	for i, r := range paced.Results {
		w := free.Results[i]
		if r.Candidate.Link.Name != w.Candidate.Link.Name || r.VehicleMetresSaved != w.VehicleMetresSaved || r.ShareUsing != w.ShareUsing ||
			math.Abs(r.VehicleSecondsSaved-f*w.VehicleSecondsSaved) > 1e-6 || math.Abs(r.SecondsSavedPerMetre-f*w.SecondsSavedPerMetre) > 1e-9 {
			t.Errorf("rank %d: paced %+v, free-flow %+v, factor %.6f", i+1, r, w, f)
		}
	}
	opts.Speeds = "posted"
	if err := opts.Check(); err == nil || !strings.Contains(err.Error(), `speeds "posted"`) {
		t.Errorf("speeds posted: %v", err)
	}
}
