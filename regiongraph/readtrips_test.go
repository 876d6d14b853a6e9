package regiongraph

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"reflect"
	"strings"
	"testing"
)

// TestReadTripsMatchesStore checks the trip reader against the ingest's
// own aggregates: per day, window and region pair, the trips it returns
// count and sum as the store's edge does, including overlapping windows
// and rejected rows.
func TestReadTripsMatchesStore(t *testing.T) {
	p := gridPartition(4, 4, 10, 50, 0.02)
	rng := rand.New(rand.NewPCG(3, 4))
	var b strings.Builder
	b.WriteString(tripHeader)
	for i := 0; i < 3000; i++ {
		o := [2]float64{10 + rng.Float64()*0.085, 50 + rng.Float64()*0.085} // some outside
		d := [2]float64{10 + rng.Float64()*0.08, 50 + rng.Float64()*0.08}
		start := 1772409600 + rng.IntN(5*86400)
		dur := 200 + rng.IntN(1500)
		dist := 500 + rng.Float64()*8000
		fmt.Fprintf(&b, "t%d,%d,%d,%.6f,%.6f,%.6f,%.6f,%.1f\n", i, start, start+dur, o[0], o[1], d[0], d[1], dist)
	}
	opts := DefaultOptions()
	opts.Windows = []Window{{Name: "all", StartMinute: 0, EndMinute: 1440}, {Name: "am", StartMinute: 420, EndMinute: 600}}
	path := writeTemp(t, "trips.csv", b.String())
	store, err := Ingest(context.Background(), p, "x", []Input{{Path: path}}, opts)
	if err != nil {
		t.Fatal(err)
	}
	trips, err := ReadTrips(context.Background(), p, []Input{{Path: path}}, opts, nil)
	if err != nil {
		t.Fatal(err)
	}
	type key struct {
		day, window string
		from, to    int
	}
	got := map[key][2]float64{}
	for _, tr := range trips {
		k := key{tr.Day, tr.Window, tr.From, tr.To}
		v := got[k]
		got[k] = [2]float64{v[0] + 1, v[1] + tr.DistanceMetres}
	}
	if len(got) != len(store.Edges) {
		t.Fatalf("%d day-window-pairs from the trips, store has %d edges", len(got), len(store.Edges))
	}
	for _, e := range store.Edges {
		v := got[key{e.Day.String(), store.Meta.WindowName(e.Window), e.From, e.To}]
		if int(v[0]) != e.Trips || math.Abs(v[1]-e.DistanceSum) > 1e-6*e.DistanceSum+1 {
			t.Fatalf("%s %s %d>%d: %v trips %.1f m, store %d trips %.1f m", e.Day, store.Meta.WindowName(e.Window), e.From, e.To, v[0], v[1], e.Trips, e.DistanceSum)
		}
	}
	// The ingest's KeepTrip sees the same trips in the same pass that
	// builds an identical store.
	var kept []Trip
	keepOpts := opts
	keepOpts.KeepTrip = func(t Trip) { kept = append(kept, t) }
	store2, err := Ingest(context.Background(), p, "x", []Input{{Path: path}}, keepOpts)
	if err != nil {
		t.Fatal(err)
	}
	SortTrips(kept)
	if !reflect.DeepEqual(kept, trips) {
		t.Fatalf("KeepTrip saw %d trips, ReadTrips returns %d (or they differ)", len(kept), len(trips))
	}
	if !reflect.DeepEqual(store2.Edges, store.Edges) {
		t.Fatal("the store differs when KeepTrip is set")
	}
	// keep filters.
	some, err := ReadTrips(context.Background(), p, []Input{{Path: path}}, opts, func(t *Trip) bool { return t.From == 1 })
	if err != nil {
		t.Fatal(err)
	}
	for _, tr := range some {
		if tr.From != 1 {
			t.Fatal("keep ignored")
		}
	}
	if len(some) == 0 || len(some) == len(trips) {
		t.Fatalf("kept %d of %d", len(some), len(trips))
	}
}
