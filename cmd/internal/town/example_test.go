package town_test

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"log"
	"strings"

	"narrows/cmd/internal/town"
)

// Generate the demo town, write the OSM files before and after the new
// bridge, and simulate the first two days of the link scenario.
func Example() {
	tw, err := town.Generate(town.Options{Size: town.SizeTown, Seed: 1})
	if err != nil {
		log.Fatal(err)
	}
	if err := tw.WriteOSM(io.Discard, false); err != nil { // the "before" network
		log.Fatal(err)
	}
	if err := tw.WriteOSM(io.Discard, true); err != nil { // the "after" network
		log.Fatal(err)
	}
	plan, err := town.Scenario("link")
	if err != nil {
		log.Fatal(err)
	}
	opts := plan.SimOptions(1)
	opts.Days, opts.TripsPerDay = 2, 500
	var trips bytes.Buffer
	st, err := tw.Simulate(context.Background(), opts, &trips)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println(tw.Name, "gets", tw.Link.Tag("name"), "on", plan.LinkOpens.Format("2006-01-02"))
	fmt.Println(strings.SplitN(trips.String(), "\n", 2)[0])
	fmt.Println(st.Days, "days,", st.Trips > 800, "trips > 800")
	// Output:
	// Quillhaven gets Lantern Bridge on 2026-03-30
	// trip_id,start_time,end_time,start_lon,start_lat,end_lon,end_lat,distance_m
	// 2 days, true trips > 800
}

// The "after" network is the "before" network plus the new bridge: one
// more way, and the same ids for everything else.
func ExampleTown_WriteOSM() {
	tw, err := town.Generate(town.Options{Size: town.SizeTown, Seed: 1})
	if err != nil {
		log.Fatal(err)
	}
	for _, withLink := range []bool{false, true} {
		var osm bytes.Buffer
		if err := tw.WriteOSM(&osm, withLink); err != nil {
			log.Fatal(err)
		}
		fmt.Printf("link %v: %d nodes, %d ways\n", withLink,
			strings.Count(osm.String(), "<node "), strings.Count(osm.String(), "<way "))
	}
	fmt.Println(tw.Housing.Name, "faces", tw.Jobs.Name, "across the river")
	// Output:
	// link false: 512 nodes, 78 ways
	// link true: 514 nodes, 79 ways
	// Northbank housing faces Southbank works across the river
}

// The demo's plan: four weeks before the new bridge opens, four after.
func ExampleScenario() {
	plan, err := town.Scenario("link")
	if err != nil {
		log.Fatal(err)
	}
	for _, p := range []town.Period{plan.Before, plan.After} {
		fmt.Println(p.From.Format("Mon 2 Jan"), "to", p.To.Format("Mon 2 Jan 2006"), "(exclusive)")
	}
	fmt.Println("link opens", plan.LinkOpens.Format("2006-01-02"), "in", plan.Location)
	control, _ := town.Scenario("control")
	fmt.Println("control: link opens", control.LinkOpens != nil)
	// Output:
	// Mon 2 Mar to Mon 30 Mar 2026 (exclusive)
	// Mon 30 Mar to Mon 27 Apr 2026 (exclusive)
	// link opens 2026-03-30 in Etc/GMT-1
	// control: link opens false
}

// Simulate writes the trips as CSV; every TraceEvery-th trip also gets a
// GPS trace, here written as GPS points CSV.
func ExampleTown_Simulate() {
	tw, err := town.Generate(town.Options{Size: town.SizeTown, Seed: 1})
	if err != nil {
		log.Fatal(err)
	}
	plan, err := town.Scenario("control")
	if err != nil {
		log.Fatal(err)
	}
	opts := plan.SimOptions(1)
	opts.Days, opts.TripsPerDay = 1, 300
	var points bytes.Buffer
	pw := town.NewPointsWriter(&points)
	opts.TraceEvery, opts.OnTrace = 100, pw.Write
	var trips bytes.Buffer
	st, err := tw.Simulate(context.Background(), opts, &trips)
	if err != nil {
		log.Fatal(err)
	}
	if err := pw.Flush(); err != nil {
		log.Fatal(err)
	}
	fmt.Println(st.Trips, "trips on", st.Days, "day,", st.IncidentDays, "with an incident")
	for _, line := range strings.SplitN(trips.String(), "\n", 3)[:2] {
		fmt.Println(line)
	}
	for _, line := range strings.SplitN(points.String(), "\n", 3)[:2] {
		fmt.Println(line)
	}
	// Output:
	// 319 trips on 1 day, 1 with an incident
	// trip_id,start_time,end_time,start_lon,start_lat,end_lon,end_lat,distance_m
	// 1,2026-03-02T06:05:57+01:00,2026-03-02T06:12:39+01:00,0.834226,0.645198,0.855827,0.639554,3530.2
	// vehicle_id,time,lon,lat,occupied
	// veh-100,2026-03-02T09:17:48+01:00,0.855555,0.619737,1
}
