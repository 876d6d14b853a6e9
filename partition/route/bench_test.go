package route_test

import (
	"context"
	"math/rand/v2"
	"os"
	"testing"

	"github.com/paulmach/orb"

	"narrows/partition/route"
)

// Baltimore extract: © OpenStreetMap contributors, ODbL.
const baltimore = "../../../shared/data/osm/baltimore.osm.pbf"

// BenchmarkBuildBaltimore builds the routable network from the roads the
// partition read (target < 1 s).
func BenchmarkBuildBaltimore(b *testing.B) {
	if _, err := os.Stat(baltimore); err != nil {
		b.Skip("no ../shared/data")
	}
	p := readPartition(b, baltimore)
	b.ResetTimer()
	for b.Loop() {
		if _, err := route.Build(context.Background(), p.Routing, route.DefaultOptions()); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkReroute10k routes 10,000 trips from 500 distinct origins on
// Baltimore's network, without and with one added link, one search per
// origin (target < 2 s), side by side: full, a second search from every
// origin on the network with the link; repair, each origin's search
// repaired for the link (Search.Repair), as the appraisal does.
// Destinations are spread over the whole city, the hard case.
func BenchmarkReroute10k(b *testing.B) {
	if _, err := os.Stat(baltimore); err != nil {
		b.Skip("no ../shared/data")
	}
	p := readPartition(b, baltimore)
	n, err := route.Build(context.Background(), p.Routing, route.DefaultOptions())
	if err != nil {
		b.Fatal(err)
	}
	comp, _ := n.Components()
	var main []int
	for v := range comp {
		if comp[v] == 0 {
			main = append(main, v)
		}
	}
	rng := rand.New(rand.NewPCG(1, 2))
	origins := make([]int, 500)
	dests := make([][]int, 500)
	for i := range origins {
		origins[i] = main[rng.IntN(len(main))]
		for j := 0; j < 20; j++ {
			dests[i] = append(dests[i], main[rng.IntN(len(main))])
		}
	}
	snap := n.NewSnapper(func(v int) bool { return comp[v] == 0 })
	a, c := n.Points[main[0]], n.Points[main[len(main)/2]]
	link := route.Link{Name: "bench", Class: "primary", Crossing: true, Line: orb.LineString{a, c}}
	b.Run("full", func(b *testing.B) {
		for b.Loop() {
			w, err := n.WithLinks([]route.Link{link}, snap, 50)
			if err != nil {
				b.Fatal(err)
			}
			for _, net := range []*route.Network{n, w} {
				s := route.NewSearch(net)
				for i, o := range origins {
					s.From(o, dests[i])
				}
			}
		}
	})
	b.Run("repair", func(b *testing.B) {
		for b.Loop() {
			w, err := n.WithLinks([]route.Link{link}, snap, 50)
			if err != nil {
				b.Fatal(err)
			}
			s, r := route.NewSearch(n), route.NewSearch(n)
			for i, o := range origins {
				s.From(o, dests[i])
				far := 0.0
				for _, d := range dests[i] {
					far = max(far, s.Seconds(d))
				}
				r.Repair(w, s, far)
			}
		}
	})
}
