package appraise_test

import (
	"context"
	"math/rand/v2"
	"os"
	"testing"

	"github.com/paulmach/orb"

	"narrows/partition"
	"narrows/partition/route"
	"narrows/patterns/appraise"
	"narrows/regiongraph"
)

// BenchmarkReroute10k appraises one candidate link for 10,000 trips from
// 500 distinct origins on Baltimore's network (© OpenStreetMap
// contributors, ODbL): every trip routed without the link, then with it
// from the origins it may help (target < 2 s). Destinations are spread
// over the whole city, the hard case (a finding's trips are local).
// route's BenchmarkReroute10k is the same work searching from every
// origin twice, side by side.
func BenchmarkReroute10k(b *testing.B) {
	path := "../../../shared/data/osm/baltimore.osm.pbf"
	if _, err := os.Stat(path); err != nil {
		b.Skip("no ../shared/data")
	}
	p, err := partition.ReadFile(context.Background(), path, partition.DefaultOptions())
	if err != nil {
		b.Fatal(err)
	}
	net, err := route.Build(context.Background(), p.Routing, route.DefaultOptions())
	if err != nil {
		b.Fatal(err)
	}
	comp, _ := net.Components()
	var main []int
	for v := range comp {
		if comp[v] == 0 {
			main = append(main, v)
		}
	}
	// The same draws as route's benchmark.
	rng := rand.New(rand.NewPCG(1, 2))
	var trips []regiongraph.Trip
	for i := 0; i < 500; i++ {
		o := main[rng.IntN(len(main))]
		for j := 0; j < 20; j++ {
			d := main[rng.IntN(len(main))]
			trips = append(trips, regiongraph.Trip{Origin: net.Points[o], Dest: net.Points[d], DistanceMetres: 5000, DurationSeconds: 600})
		}
	}
	a, c := net.Points[main[0]], net.Points[main[len(main)/2]]
	cand := appraise.Candidate{Link: route.Link{Name: "bench", Class: "primary", Crossing: true, Line: orb.LineString{a, c}}}
	b.ResetTimer()
	var res *appraise.Appraisal
	for b.Loop() {
		if res, err = appraise.Appraise(context.Background(), net, trips, 1, []appraise.Candidate{cand}, appraise.DefaultOptions()); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(res.Routed), "trips")
}
