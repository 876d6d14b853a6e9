package route_test

import (
	"context"
	"math"
	"math/rand/v2"
	"os"
	"testing"

	"github.com/paulmach/orb"
	"gonum.org/v1/gonum/graph/path"
	"gonum.org/v1/gonum/graph/simple"

	"narrows/partition"
	"narrows/partition/route"
)

// randomRouting makes a random road set: nodes on a jittered grid joined
// by ways of random class and direction.
func randomRouting(rng *rand.Rand, nodes, ways int) *partition.Routing {
	pts := make([]orb.Point, nodes)
	for i := range pts {
		pts[i] = orb.Point{10 + rng.Float64()*0.05, 50 + rng.Float64()*0.05}
	}
	classes := []string{"primary", "secondary", "residential", "tertiary"}
	r := &partition.Routing{}
	for w := 0; w < ways; w++ {
		k := 2 + rng.IntN(4)
		rw := partition.RoadWay{WayID: int64(w + 1), Class: classes[rng.IntN(len(classes))], Oneway: int8(rng.IntN(3) - 1)}
		if rng.IntN(4) == 0 {
			rw.MaxSpeedKMH = float64(20 + rng.IntN(60))
		}
		for j := 0; j < k; j++ {
			id := rng.IntN(nodes)
			rw.Nodes = append(rw.Nodes, int64(id+1))
			rw.Line = append(rw.Line, pts[id])
		}
		r.Roads = append(r.Roads, rw)
	}
	return r
}

// checkAgainstGonum compares every shortest time from a few origins with
// gonum's graph/path.DijkstraFrom on the same arcs (parallel arcs kept at
// their cheapest, as gonum's simple graph holds one arc per pair).
func checkAgainstGonum(t *testing.T, n *route.Network, origins []int) {
	t.Helper()
	g := simple.NewWeightedDirectedGraph(0, math.Inf(1))
	for v := 0; v < n.Nodes(); v++ {
		g.AddNode(simple.Node(v))
	}
	for _, a := range n.Arcs() {
		if a.From == a.To {
			continue
		}
		if e := g.WeightedEdge(int64(a.From), int64(a.To)); e != nil && e.Weight() <= a.Seconds {
			continue
		}
		g.SetWeightedEdge(g.NewWeightedEdge(simple.Node(a.From), simple.Node(a.To), a.Seconds))
	}
	s := route.NewSearch(n)
	for _, o := range origins {
		s.From(o, nil)
		sp := path.DijkstraFrom(simple.Node(o), g)
		for v := 0; v < n.Nodes(); v++ {
			want := sp.WeightTo(int64(v))
			got := s.Seconds(v)
			if math.IsInf(want, 1) != math.IsInf(got, 1) || (!math.IsInf(want, 1) && math.Abs(got-want) > 1e-9*max(1, want)) {
				t.Fatalf("origin %d, node %d: %v s, gonum %v s", o, v, got, want)
			}
		}
	}
}

func TestShortestTimesAgainstGonumRandom(t *testing.T) {
	for seed := uint64(1); seed <= 30; seed++ {
		rng := rand.New(rand.NewPCG(seed, 7))
		r := randomRouting(rng, 40+rng.IntN(200), 30+rng.IntN(300))
		n, err := route.Build(context.Background(), r, route.DefaultOptions())
		if err != nil {
			t.Fatal(err)
		}
		origins := []int{0, n.Nodes() / 2, n.Nodes() - 1}
		checkAgainstGonum(t, n, origins)
	}
}

// TestShortestTimesAgainstGonumExtract checks a real extract (Liechtenstein,
// © OpenStreetMap contributors, ODbL).
func TestShortestTimesAgainstGonumExtract(t *testing.T) {
	if testing.Short() {
		t.Skip("real extract")
	}
	path := "../../../shared/data/osm/liechtenstein-latest.osm.pbf"
	if _, err := os.Stat(path); err != nil {
		t.Skip("no ../shared/data")
	}
	p := readPartition(t, path)
	n, err := route.Build(context.Background(), p.Routing, route.DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	comp, sizes := n.Components()
	if sizes[0] < n.Nodes()/2 {
		t.Fatalf("largest component %d of %d nodes", sizes[0], n.Nodes())
	}
	var origins []int
	for v := 0; v < n.Nodes() && len(origins) < 3; v += n.Nodes() / 7 {
		if comp[v] == 0 {
			origins = append(origins, v)
		}
	}
	checkAgainstGonum(t, n, origins)
	t.Logf("%v; %d components, largest %d nodes", n, len(sizes), sizes[0])
}

func readPartition(t testing.TB, path string) *partition.Partition {
	p, err := partition.ReadFile(context.Background(), path, partition.DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// TestRepairAgainstGonum: on random networks with random links (two-way,
// one-way, with a drawn middle point), a search on the network without
// them repaired for the links gives, below the bound, every node's time
// on the network with them as gonum's Dijkstra does on that network: a
// node Repair calls improved has gonum's time, strictly under the time
// without links; any other node's time is its time without links,
// or gonum's time is at least the bound.
func TestRepairAgainstGonum(t *testing.T) {
	improved := 0
	for seed := uint64(1); seed <= 30; seed++ {
		rng := rand.New(rand.NewPCG(seed, 9))
		r := randomRouting(rng, 40+rng.IntN(200), 30+rng.IntN(300))
		n, err := route.Build(context.Background(), r, route.DefaultOptions())
		if err != nil {
			t.Fatal(err)
		}
		var links []route.Link
		for k := 0; k < 1+rng.IntN(3); k++ {
			a, b := rng.IntN(n.Nodes()), rng.IntN(n.Nodes())
			if a == b {
				continue
			}
			pa, pb := n.Points[a], n.Points[b]
			links = append(links, route.Link{Name: "l", Class: "primary", Crossing: true, Oneway: int8(rng.IntN(2)),
				Nodes: []int64{n.OSMIDs[a], 0, n.OSMIDs[b]}, Line: orb.LineString{pa, {(pa[0] + pb[0]) / 2, (pa[1]+pb[1])/2 + 0.001}, pb}})
		}
		if len(links) == 0 {
			continue
		}
		w, err := n.WithLinks(links, nil, 50)
		if err != nil {
			t.Fatal(err)
		}
		g := simple.NewWeightedDirectedGraph(0, math.Inf(1))
		for v := 0; v < w.Nodes(); v++ {
			g.AddNode(simple.Node(v))
		}
		for _, a := range w.Arcs() {
			if e := g.WeightedEdge(int64(a.From), int64(a.To)); a.From == a.To || (e != nil && e.Weight() <= a.Seconds) {
				continue
			}
			g.SetWeightedEdge(g.NewWeightedEdge(simple.Node(a.From), simple.Node(a.To), a.Seconds))
		}
		base, rep := route.NewSearch(n), route.NewSearch(n)
		for _, o := range []int{0, n.Nodes() / 3, n.Nodes() - 1} {
			// Stop the base search at a few targets, as the appraisal does.
			targets := []int{rng.IntN(n.Nodes()), rng.IntN(n.Nodes())}
			base.From(o, targets)
			bound := 0.0
			for _, d := range targets {
				bound = max(bound, base.Seconds(d))
			}
			rep.Repair(w, base, bound)
			sp := path.DijkstraFrom(simple.Node(o), g)
			for v := 0; v < w.Nodes(); v++ {
				want := sp.WeightTo(int64(v))
				switch {
				case rep.Improved(v):
					improved++
					if got := rep.Seconds(v); math.Abs(got-want) > 1e-9*max(1, want) || !(got < base.Seconds(v)) || !(got < bound) {
						t.Fatalf("seed %d origin %d node %d: repaired %v s, gonum %v, without links %v, bound %v", seed, o, v, got, want, base.Seconds(v), bound)
					}
				case want < bound && v < n.Nodes() && math.Abs(base.Seconds(v)-want) > 1e-9*max(1, want):
					t.Fatalf("seed %d origin %d node %d: not repaired, %v s without links, gonum %v with, bound %v", seed, o, v, base.Seconds(v), want, bound)
				case want < bound && v >= n.Nodes():
					t.Fatalf("seed %d origin %d: link node %d at %v s below the bound %v, not repaired", seed, o, v, want, bound)
				}
			}
		}
	}
	if improved == 0 {
		t.Fatal("no node improved: the test does not exercise the repair")
	}
}
