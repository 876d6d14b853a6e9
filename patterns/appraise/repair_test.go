package appraise

import (
	"context"
	"math/rand/v2"
	"testing"

	"github.com/paulmach/orb"

	"narrows/partition"
	"narrows/partition/route"
)

// TestRepairEqualsFullSearch: routing with a candidate by repairing each
// origin's base search (Search.Repair) gives every trip the same time,
// length and link use as a full search from its origin on the network
// with the link. Random jittered grids of two-way and one-way roads of
// mixed classes with random links; the full search is the oracle (itself
// checked against gonum in package route).
func TestRepairEqualsFullSearch(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	improved, kept := 0, 0
	for g := 0; g < 20; g++ {
		const n = 12
		id := func(i, j int) int64 { return int64(1 + i*n + j) }
		pt := map[int64]orb.Point{}
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				pt[id(i, j)] = orb.Point{10 + 0.004*float64(j) + 0.001*rng.Float64(), 50 + 0.003*float64(i) + 0.001*rng.Float64()}
			}
		}
		classes := []string{"primary", "secondary", "residential", "living_street"}
		var roads []partition.RoadWay
		way := int64(1)
		add := func(a, b int64) {
			if rng.Float64() < 0.1 {
				return // a missing block side
			}
			var oneway int8
			if rng.Float64() < 0.2 {
				oneway = 1
			}
			roads = append(roads, partition.RoadWay{WayID: way, Class: classes[rng.IntN(len(classes))], Oneway: oneway,
				Nodes: []int64{a, b}, Line: orb.LineString{pt[a], pt[b]}})
			way++
		}
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				if j+1 < n {
					add(id(i, j), id(i, j+1))
				}
				if i+1 < n {
					add(id(i, j), id(i+1, j))
				}
			}
		}
		net, err := route.Build(context.Background(), &partition.Routing{Roads: roads}, route.DefaultOptions())
		if err != nil {
			t.Fatal(err)
		}
		var ods []od
		for k := 0; k < 300; k++ {
			o, _ := net.Node(id(rng.IntN(n), rng.IntN(n)))
			d, _ := net.Node(id(rng.IntN(n), rng.IntN(n)))
			if o != d {
				ods = append(ods, od{o: o, d: d, trip: k})
			}
		}
		sortByOrigin(ods)
		var links []*route.Network
		for k := 0; k < 3; k++ {
			a, b := id(rng.IntN(n), rng.IntN(n)), id(rng.IntN(n), rng.IntN(n))
			if a == b {
				continue
			}
			w, err := net.WithLinks([]route.Link{{Name: "x", Class: classes[rng.IntN(2)], Nodes: []int64{a, b}, Line: orb.LineString{pt[a], pt[b]}, Crossing: true}}, nil, 50)
			if err != nil {
				t.Fatal(err)
			}
			links = append(links, w)
		}
		base, withs := routeAll(context.Background(), net, links, ods)
		full := routeAll0(net, ods)
		for c, w := range links {
			want := routeAll0(w, ods)
			for k := range ods {
				if base[k] != full[k] {
					t.Fatalf("grid %d trip %d->%d: base %+v, full search %+v", g, ods[k].o, ods[k].d, base[k], full[k])
				}
				if withs[c][k] != want[k] {
					t.Fatalf("grid %d link %d trip %d->%d: repaired %+v, full search %+v", g, c, ods[k].o, ods[k].d, withs[c][k], want[k])
				}
				if want[k].link >= 0 {
					improved++
				} else {
					kept++
				}
			}
		}
	}
	// Both branches ran, so the comparison tested the skipping.
	t.Logf("%d trips quicker with a link, %d not", improved, kept)
	if improved == 0 || kept == 0 {
		t.Fatalf("%d improved, %d kept: the test does not exercise both", improved, kept)
	}
}

// routeAll0 is the brute force: a full search from every trip's origin,
// all nodes settled.
func routeAll0(net *route.Network, ods []od) []routed {
	out := make([]routed, len(ods))
	s := route.NewSearch(net)
	for k, x := range ods {
		s.From(x.o, nil)
		if secs := s.Seconds(x.d); secs < 1e300 {
			out[k] = routed{secs, s.Metres(x.d), s.Link(x.d)}
		} else {
			out[k] = routed{-1, -1, -1}
		}
	}
	return out
}
