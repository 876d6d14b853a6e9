package regiongraph_test

import (
	"context"
	"fmt"
	"log"
	"os"
	"path/filepath"

	"github.com/paulmach/orb"

	"narrows/partition"
	"narrows/regiongraph"
)

// twoRegions returns two regions side by side (in practice they come from
// partition.ReadGeoJSON).
func twoRegions() *partition.Partition {
	west := orb.Ring{{13.00, 52.00}, {13.02, 52.00}, {13.02, 52.02}, {13.00, 52.02}, {13.00, 52.00}}
	east := orb.Ring{{13.02, 52.00}, {13.04, 52.00}, {13.04, 52.02}, {13.02, 52.02}, {13.02, 52.00}}
	return &partition.Partition{Regions: []partition.Region{
		{ID: 1, Polygon: orb.Polygon{west}},
		{ID: 2, Polygon: orb.Polygon{east}},
	}}
}

// ingestTrips ingests three trips of a morning from a CSV file in dir:
// two from region 1 to region 2, one inside region 1.
func ingestTrips(dir string) (*regiongraph.Store, error) {
	trips := filepath.Join(dir, "trips.csv")
	csv := "trip_id,start_time,end_time,start_lon,start_lat,end_lon,end_lat,distance_m\n" +
		"1,2024-05-02 08:00:00,2024-05-02 08:06:00,13.005,52.010,13.035,52.010,2500\n" +
		"2,2024-05-02 08:10:00,2024-05-02 08:20:00,13.006,52.012,13.030,52.008,3000\n" +
		"3,2024-05-02 08:30:00,2024-05-02 08:34:00,13.010,52.010,13.012,52.011,400\n"
	if err := os.WriteFile(trips, []byte(csv), 0o644); err != nil {
		return nil, err
	}
	opts := regiongraph.DefaultOptions()
	opts.TimeZone = "Europe/Berlin"
	am, err := regiongraph.ParseWindow("am=07:00-10:00")
	if err != nil {
		return nil, err
	}
	opts.Windows = []regiongraph.Window{am}
	return regiongraph.Ingest(context.Background(), twoRegions(), "sha256-of-regions-file",
		[]regiongraph.Input{{Path: trips, Format: regiongraph.FormatTrips}}, opts)
}

func ExampleIngest() {
	dir, err := os.MkdirTemp("", "example")
	if err != nil {
		log.Fatal(err)
	}
	defer os.RemoveAll(dir)
	store, err := ingestTrips(dir)
	if err != nil {
		log.Fatal(err)
	}
	q := store.Meta.Quality
	fmt.Printf("read %d, used %d, intra-region %d\n", q.Read, q.Used, q.Rejected[string(regiongraph.ReasonIntraRegion)])
	for _, e := range store.Edges {
		fmt.Printf("%s %s %d->%d: %d trips, median %.1f km/h, detour %.2f\n",
			e.Day, store.Meta.WindowName(e.Window), e.From, e.To, e.Trips, e.SpeedMedian*3.6, e.DetourMedian)
	}
	// Trip 3 stays in region 1: counted, not an edge. Medians of two trips
	// are their means: (25 + 18) / 2 km/h; detours 1.22 and 1.76.

	// Output:
	// read 3, used 2, intra-region 1
	// 2024-05-02 am 1->2: 2 trips, median 21.5 km/h, detour 1.49
}

func ExampleStore_WriteParquet() {
	dir, err := os.MkdirTemp("", "example")
	if err != nil {
		log.Fatal(err)
	}
	defer os.RemoveAll(dir)
	store, err := ingestTrips(dir)
	if err != nil {
		log.Fatal(err)
	}

	path := filepath.Join(dir, "graphs.parquet")
	f, err := os.Create(path)
	if err != nil {
		log.Fatal(err)
	}
	if err := store.WriteParquet(f); err != nil {
		log.Fatal(err)
	}
	if err := f.Close(); err != nil {
		log.Fatal(err)
	}

	// Read back the morning edges with at least two trips.
	back, err := regiongraph.ReadFileOptions(path, regiongraph.ReadOptions{MinTrips: 2, Window: "am"})
	if err != nil {
		log.Fatal(err)
	}
	am, _ := back.Meta.WindowIndex("am")
	fmt.Println(back.Meta.TimeZone, back.WindowNames(), back.Days(am))
	for _, e := range back.Edges {
		fmt.Printf("%d->%d: %d trips, %.0f m in %.0f s\n", e.From, e.To, e.Trips, e.DistanceSum, e.DurationSum)
	}
	regions, err := back.Regions()
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("%d regions, rows read %d\n", len(regions.Regions), back.Meta.Quality.Read)

	// Output:
	// Europe/Berlin [am] [2024-05-02]
	// 1->2: 2 trips, 5500 m in 960 s
	// 2 regions, rows read 3
}

func ExampleParseDay() {
	d, err := regiongraph.ParseDay("2028-02-28")
	if err != nil {
		log.Fatal(err)
	}
	next := d.AddDays(1) // 2028 is a leap year
	fmt.Println(next, next.Weekday(), int32(next))
	_, err = regiongraph.ParseDay("2027-02-29")
	fmt.Println(err)
	// Output:
	// 2028-02-29 Tuesday 21243
	// day "2027-02-29" is not a date YYYY-MM-DD
}

func ExampleStore_DayTotals() {
	dir, err := os.MkdirTemp("", "example")
	if err != nil {
		log.Fatal(err)
	}
	defer os.RemoveAll(dir)
	store, err := ingestTrips(dir)
	if err != nil {
		log.Fatal(err)
	}
	path := filepath.Join(dir, "graphs") // a dataset
	if err := store.WriteDataset(path); err != nil {
		log.Fatal(err)
	}

	// A read with a minimum of three trips keeps no edge of this store,
	// but the network's totals still count every pair with trips.
	back, err := regiongraph.ReadFileOptions(path, regiongraph.ReadOptions{MinTrips: 3})
	if err != nil {
		log.Fatal(err)
	}
	totals, ok := back.DayTotals()
	fmt.Println(len(back.Edges), "edges kept; totals known:", ok)
	for _, t := range totals {
		fmt.Printf("%s %s: %d pairs, %d trips, %.0f m in %.0f s\n", t.Day, back.Meta.WindowName(t.Window), t.Edges, t.Trips, t.DistanceSum, t.DurationSum)
	}
	// Output:
	// 0 edges kept; totals known: true
	// 2024-05-02 am: 1 pairs, 2 trips, 5500 m in 960 s
}
