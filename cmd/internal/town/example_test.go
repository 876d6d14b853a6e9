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
