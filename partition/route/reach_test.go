package route_test

import (
	"context"
	"os"
	"testing"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/planar"

	"narrows/partition"
	"narrows/partition/route"
)

// TestMajorReachExtracts: on real extracts (© OpenStreetMap contributors,
// ODbL) every major road (secondary or higher) inside the study area (the
// union of the regions) reaches every other, or the parts apart are
// reported. The report is checked against a plain breadth-first search
// forwards and backwards from the main part over the network's arcs: every
// node of the main part is reached both ways, and no node of a part
// apart is reached both ways.
func TestMajorReachExtracts(t *testing.T) {
	if testing.Short() {
		t.Skip("real extracts")
	}
	for _, name := range []string{"liechtenstein-latest.osm.pbf", "krems.osm.gz"} {
		t.Run(name, func(t *testing.T) {
			path := "../../../shared/data/osm/" + name
			if _, err := os.Stat(path); err != nil {
				t.Skip("no ../shared/data")
			}
			p := readPartition(t, path)
			n, err := route.Build(context.Background(), p.Routing, route.DefaultOptions())
			if err != nil {
				t.Fatal(err)
			}
			r, err := n.MajorReach("secondary", inRegions(p))
			if err != nil {
				t.Fatal(err)
			}
			t.Logf("%v; %d major-road nodes in the study area, main part %d", n, r.Major, len(r.Main.Nodes))
			for i, a := range r.Apart {
				if i == 10 {
					t.Logf("... and %d more parts apart", len(r.Apart)-10)
					break
				}
				t.Logf("apart: %d major-road node(s), e.g. OSM node %d at %.6f,%.6f", len(a.Nodes), a.OSMID, a.At[0], a.At[1])
			}
			if r.Major == 0 || len(r.Main.Nodes) < r.Major/2 {
				t.Fatalf("main part %d of %d major nodes", len(r.Main.Nodes), r.Major)
			}
			sum := len(r.Main.Nodes)
			for _, a := range r.Apart {
				sum += len(a.Nodes)
			}
			if sum != r.Major {
				t.Fatalf("parts hold %d nodes, %d major", sum, r.Major)
			}
			fwd, bwd := bfs(n, r.Main.Nodes[0], false), bfs(n, r.Main.Nodes[0], true)
			for _, v := range r.Main.Nodes {
				if !fwd[v] || !bwd[v] {
					t.Fatalf("main-part node %d: reached %v, reaches back %v", v, fwd[v], bwd[v])
				}
			}
			for _, a := range r.Apart {
				for _, v := range a.Nodes {
					if fwd[v] && bwd[v] {
						t.Fatalf("node %d reported apart but reaches the main part both ways", v)
					}
				}
			}
		})
	}
}

// inRegions holds inside any region of p.
func inRegions(p *partition.Partition) func(orb.Point) bool {
	return func(pt orb.Point) bool {
		for _, r := range p.Regions {
			if r.Polygon.Bound().Contains(pt) && planar.PolygonContains(r.Polygon, pt) {
				return true
			}
		}
		return false
	}
}

// bfs marks the nodes reached from s along the arcs (against them when
// back): an oracle independent of Components.
func bfs(n *route.Network, s int, back bool) []bool {
	adj := make([][]int, n.Nodes())
	for _, a := range n.Arcs() {
		if back {
			adj[a.To] = append(adj[a.To], a.From)
		} else {
			adj[a.From] = append(adj[a.From], a.To)
		}
	}
	seen := make([]bool, n.Nodes())
	seen[s] = true
	queue := []int{s}
	for len(queue) > 0 {
		u := queue[0]
		queue = queue[1:]
		for _, v := range adj[u] {
			if !seen[v] {
				seen[v] = true
				queue = append(queue, v)
			}
		}
	}
	return seen
}
