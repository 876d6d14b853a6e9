package regiongraph_test

import (
	"context"
	"fmt"
	"log"
	"os"
	"path/filepath"

	"narrows/regiongraph"
)

// Two shards of one trip table, placed apart (on any machine) and
// aggregated together: the second shard repeats a row of the first,
// which the aggregation finds.
func ExampleAggregator() {
	dir, err := os.MkdirTemp("", "example")
	if err != nil {
		log.Fatal(err)
	}
	defer os.RemoveAll(dir)
	header := "trip_id,start_time,end_time,start_lon,start_lat,end_lon,end_lat,distance_m\n"
	shards := map[string]string{
		"part-1.csv": header +
			"1,2024-05-02 08:00:00,2024-05-02 08:06:00,13.005,52.010,13.035,52.010,2500\n" +
			"2,2024-05-02 08:10:00,2024-05-02 08:20:00,13.006,52.012,13.030,52.008,3000\n",
		"part-2.csv": header +
			"3,2024-05-02 08:30:00,2024-05-02 08:39:00,13.030,52.010,13.004,52.011,2300\n" +
			"1,2024-05-02 08:00:00,2024-05-02 08:06:00,13.005,52.010,13.035,52.010,2500\n",
	}
	opts := regiongraph.DefaultOptions()
	opts.TimeZone = "Europe/Berlin"
	regions := twoRegions()
	agg, err := regiongraph.NewAggregator(regions, "sha256-of-regions-file", opts)
	if err != nil {
		log.Fatal(err)
	}
	defer agg.Close()
	for _, name := range []string{"part-1.csv", "part-2.csv"} {
		in := filepath.Join(dir, name)
		if err := os.WriteFile(in, []byte(shards[name]), 0o644); err != nil {
			log.Fatal(err)
		}
		placed := filepath.Join(dir, name+".placed.parquet")
		f, err := os.Create(placed)
		if err != nil {
			log.Fatal(err)
		}
		_, n, err := regiongraph.PlaceTo(context.Background(), regions, "sha256-of-regions-file",
			[]regiongraph.Input{{Path: in, Format: regiongraph.FormatTrips}}, opts, f)
		if err != nil {
			log.Fatal(err)
		}
		if err := f.Close(); err != nil {
			log.Fatal(err)
		}
		fmt.Printf("%s: %d placed trips\n", name, n)
		if err := agg.AddFile(placed); err != nil {
			log.Fatal(err)
		}
	}
	store, err := agg.Store(context.Background())
	if err != nil {
		log.Fatal(err)
	}
	q := store.Meta.Quality
	fmt.Printf("read %d, used %d, duplicate rows %d\n", q.Read, q.Used, q.Rejected[string(regiongraph.ReasonDuplicateRow)])
	for _, e := range store.Edges {
		fmt.Printf("%s %s: region %d -> %d, %d trips\n", e.Day, store.Meta.WindowName(e.Window), e.From, e.To, e.Trips)
	}
	// Output:
	// part-1.csv: 2 placed trips
	// part-2.csv: 2 placed trips
	// read 4, used 3, duplicate rows 1
	// 2024-05-02 all: region 1 -> 2, 2 trips
	// 2024-05-02 all: region 2 -> 1, 1 trips
}
