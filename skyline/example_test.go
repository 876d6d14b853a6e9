package skyline_test

import (
	"fmt"

	"narrows/regiongraph"
	"narrows/skyline"
)

func ExampleCandidates() {
	// One morning's edges: speeds in m/s, detours as travel distance over
	// straight-line distance.
	edges := []regiongraph.Edge{
		{From: 1, To: 2, Trips: 60, SpeedMedian: 3.5, DetourMedian: 1.9}, // busy, slow, roundabout
		{From: 2, To: 1, Trips: 55, SpeedMedian: 4.0, DetourMedian: 1.8}, // beaten by 1>2 on all three
		{From: 1, To: 3, Trips: 120, SpeedMedian: 12, DetourMedian: 1.1}, // busiest, but fast and direct
		{From: 3, To: 4, Trips: 25, SpeedMedian: 2.5, DetourMedian: 1.5}, // slowest
		{From: 4, To: 5, Trips: 4, SpeedMedian: 1.0, DetourMedian: 3.0},  // too few trips to judge
	}
	res := skyline.Candidates(edges, skyline.DefaultOptions())
	fmt.Printf("median speed %.1f m/s\n", res.MedianSpeed)
	for _, i := range res.Indices {
		e := edges[i]
		fmt.Printf("candidate %d>%d\n", e.From, e.To)
	}
	fmt.Println("layers", res.Layer)
	// Output:
	// median speed 4.0 m/s
	// candidate 1>2
	// candidate 3>4
	// layers [1 2 1 1 0]
}
