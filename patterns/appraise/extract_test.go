package appraise_test

import (
	"context"
	"math"
	"math/rand/v2"
	"os"
	"testing"

	"github.com/paulmach/orb"

	"narrows/partition"
	"narrows/partition/geodesy"
	"narrows/partition/route"
	"narrows/patterns/appraise"
	"narrows/regiongraph"
)

// TestAppraiseMadeUpLinkExtract appraises a made-up link on a real
// extract (Liechtenstein, © OpenStreetMap contributors, ODbL): a primary
// road between two junctions about a kilometre apart and far apart by
// road, with 200 generated trips between their neighbourhoods. The oracle
// is the textbook identity for one added two-way link A-B of time L: the
// new shortest time from o to d is min(T(o,d), T(o,A)+L+T(B,d),
// T(o,B)+L+T(A,d)), with T from searches on the network without the link.
func TestAppraiseMadeUpLinkExtract(t *testing.T) {
	if testing.Short() {
		t.Skip("real extract")
	}
	path := "../../../shared/data/osm/liechtenstein-latest.osm.pbf"
	if _, err := os.Stat(path); err != nil {
		t.Skip("no ../shared/data")
	}
	p, err := partition.ReadFile(context.Background(), path, partition.DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	net, err := route.Build(context.Background(), p.Routing, route.DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	comp, _ := net.Components()
	major := func(v int) bool {
		return comp[v] == 0 && net.OSMIDs[v] != 0 && net.Rank[v] <= int8(route.ClassRank("tertiary"))
	}
	gc := func(u, v int) float64 { return geodesy.GreatCircleMetres(net.Points[u], net.Points[v]) }
	a := -1
	for v := range net.Points {
		if major(v) {
			a = v
			break
		}
	}
	full := func(src int) *route.Search {
		s := route.NewSearch(net)
		s.From(src, nil)
		return s
	}
	fromA := full(a)
	b, worst := -1, 0.0
	for v := range net.Points {
		if d := gc(a, v); major(v) && d > 800 && d < 1200 && fromA.Seconds(v)/d > worst {
			b, worst = v, fromA.Seconds(v)/d
		}
	}
	if b < 0 {
		t.Fatal("no junction 800-1,200 m from the first")
	}
	fromB := full(b)
	link := route.Link{Name: "made up", Class: "primary", Crossing: true,
		Line: orb.LineString{net.Points[a], net.Points[b]}, Nodes: []int64{net.OSMIDs[a], net.OSMIDs[b]}}
	linkSecs := gc(a, b) / geodesy.MPS(route.DefaultSpeedsKMH()["primary"])

	var nearA, nearB []int
	for v := range net.Points {
		if comp[v] == 0 && gc(a, v) < 1500 {
			nearA = append(nearA, v)
		}
		if comp[v] == 0 && gc(b, v) < 1500 {
			nearB = append(nearB, v)
		}
	}
	rng := rand.New(rand.NewPCG(19, 1))
	const days = 5
	var trips []regiongraph.Trip
	snap := net.NewSnapper(func(v int) bool { return comp[v] == 0 })
	var wantSaved float64
	var strict int
	for range 200 {
		o, d := nearA[rng.IntN(len(nearA))], nearB[rng.IntN(len(nearB))]
		if rng.IntN(2) == 0 {
			o, d = d, o
		}
		tr := regiongraph.Trip{Origin: net.Points[o], Dest: net.Points[d], DistanceMetres: 3000, DurationSeconds: 400}
		so, _, _ := snap.Nearest(tr.Origin, 500)
		sd, _, _ := snap.Nearest(tr.Dest, 500)
		if so == sd {
			continue
		}
		trips = append(trips, tr)
		fromO := full(so)
		base := fromO.Seconds(sd)
		with := min(base, fromO.Seconds(a)+linkSecs+fromB.Seconds(sd), fromO.Seconds(b)+linkSecs+fromA.Seconds(sd))
		if with < base-1e-9 {
			strict++
		}
		wantSaved += (base - with) / days
	}
	res, err := appraise.Appraise(context.Background(), net, trips, days, []appraise.Candidate{{Link: link}}, appraise.DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	r := res.Results[0]
	t.Logf("link %.0f m between OSM nodes %d and %d (%.0f s by road before); %d trips, %d routed: %.1f veh-s/day saved (oracle %.1f), %.0f %% using, detour %.2f -> %.2f",
		r.LengthMetres, net.OSMIDs[a], net.OSMIDs[b], fromA.Seconds(b), len(trips), res.Routed, r.VehicleSecondsSaved, wantSaved, 100*r.ShareUsing, res.Detour, r.Detour)
	if res.Routed != len(trips) {
		t.Fatalf("routed %d of %d trips", res.Routed, len(trips))
	}
	if wantSaved <= 0 || math.Abs(r.VehicleSecondsSaved-wantSaved) > 1e-6*wantSaved {
		t.Fatalf("saved %.6f veh-s/day, oracle %.6f", r.VehicleSecondsSaved, wantSaved)
	}
	if used := math.Round(r.ShareUsing * float64(res.Routed)); int(used) < strict {
		t.Fatalf("%v trips use the link, but %d are quicker with it", used, strict)
	}
}
