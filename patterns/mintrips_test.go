package patterns

import (
	"context"
	"fmt"
	"math/rand/v2"
	"os"
	"path/filepath"
	"reflect"
	"testing"

	"narrows/regiongraph"
)

// readBack writes store to a file and reads it back with the given
// minimum of trips, as a command does.
func readBack(t *testing.T, store *regiongraph.Store, minTrips int) *regiongraph.Store {
	t.Helper()
	path := filepath.Join(t.TempDir(), "graphs.parquet")
	f, err := os.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	// The test grids number regions from 0; a store file holds ids from 1
	// (ReadFile refuses others): shift them on the way out and back.
	shifted := *store
	shifted.Edges = append([]regiongraph.Edge(nil), store.Edges...)
	for i := range shifted.Edges {
		shifted.Edges[i].From++
		shifted.Edges[i].To++
	}
	if err := shifted.WriteParquet(f); err != nil {
		t.Fatal(err)
	}
	if err := f.Close(); err != nil {
		t.Fatal(err)
	}
	read, err := regiongraph.ReadFileOptions(path, regiongraph.ReadOptions{MinTrips: minTrips})
	if err != nil {
		t.Fatal(err)
	}
	for i := range read.Edges {
		read.Edges[i].From--
		read.Edges[i].To--
	}
	if len(read.Edges) == len(store.Edges) {
		t.Fatalf("no edge under %d trips: the store does not test the minimum", minTrips)
	}
	return read
}

// An unfiltered store in memory scans exactly as the same store read with
// the scan's minimum of trips: the edges under it neither make a day
// analysed nor enter the daily values.
func TestScanStoreMinTripsAsReadFilter(t *testing.T) {
	store := scanTestStore(1, 25, 30, 600, []scanPlant{scanPlantA, scanPlantB})
	// A last day with only thin edges: analysed without the minimum, not
	// with it.
	for i := range 40 {
		store.Edges = append(store.Edges, scanEdge("2025-02-05", "am", EdgeKey{From: i, To: i + 1}, 3, 1000, 1.5, 5))
	}
	opts := DefaultScanOptions()
	read := readBack(t, store, opts.Skyline.MinTrips)
	want, err := ScanStore(context.Background(), read, opts)
	if err != nil {
		t.Fatal(err)
	}
	got, err := ScanStore(context.Background(), store, opts)
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("scan of the unfiltered store differs from the scan of the store read with MinTrips %d:\n%+v\n%+v",
			opts.Skyline.MinTrips, got, want)
	}
	if n := len(got.Days); n != 30 || len(got.Findings) == 0 {
		t.Errorf("%d analysed days and %d findings, want 30 days (not the thin last one) and findings", n, len(got.Findings))
	}
	// With the smallest minimum, the thin day counts.
	opts.Skyline.MinTrips = 1
	all, err := ScanStore(context.Background(), store, opts)
	if err != nil {
		t.Fatal(err)
	}
	if len(all.Days) != 31 {
		t.Errorf("MinTrips 1: %d analysed days, want 31", len(all.Days))
	}
}

// The same holds for a comparison, whose daily series come from the store
// itself: a day on which a finding's edges had too few trips is left out.
func TestCompareMinTripsAsReadFilter(t *testing.T) {
	r := rand.New(rand.NewPCG(2026, 9))
	dayList := append(days("2026-03-02", 28), days("2026-05-04", 28)...)
	store := syntheticStore(r, dayList, plantedChange(28), realistic)
	// Thin out one edge-day in eight, planted edges included.
	thin := rand.New(rand.NewPCG(7, 7))
	for i := range store.Edges {
		if thin.IntN(8) == 0 {
			store.Edges[i].Trips = 1 + thin.IntN(9)
		}
	}
	before := scanPeriod("2026-03-02", "2026-03-29", nil)
	after := scanPeriod("2026-05-04", "2026-05-31", nil)
	opts := DefaultCompareOptions()
	read := readBack(t, store, before.Skyline.MinTrips)
	want, err := Compare(context.Background(), read, gridPartition(), before, after, opts)
	if err != nil {
		t.Fatal(err)
	}
	got, err := Compare(context.Background(), store, gridPartition(), before, after, opts)
	if err != nil {
		t.Fatal(err)
	}
	// NaN fields (tests not done) are never DeepEqual: compare them as
	// text. The network's change counts the thin pairs too, so it alone
	// may differ.
	if !reflect.DeepEqual(got.Before, want.Before) || !reflect.DeepEqual(got.After, want.After) ||
		fmt.Sprint(got.Counts, got.BarSpeed, got.PoolSize) != fmt.Sprint(want.Counts, want.BarSpeed, want.PoolSize) ||
		fmt.Sprint(got.Assessments) != fmt.Sprint(want.Assessments) {
		t.Errorf("comparison of the unfiltered store differs from the comparison of the store read with MinTrips %d", before.Skyline.MinTrips)
		for i := range min(len(got.Assessments), len(want.Assessments)) {
			if g, w := got.Assessments[i], want.Assessments[i]; fmt.Sprint(g) != fmt.Sprint(w) {
				t.Errorf("assessment %d:\n%+v\n%+v", i, g, w)
			}
		}
	}
	// The thin days are out of the series: fewer than the 28 days of each
	// period remain.
	for _, a := range got.Assessments {
		if a.DaysWithTrips == [2]int{28, 28} {
			t.Errorf("finding %s keeps every day in its series", a.Finding.ID)
		}
	}
}
