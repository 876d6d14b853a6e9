package report_test

import (
	"fmt"
	"log"
	"os"
	"path/filepath"

	"github.com/paulmach/orb"

	"narrows/partition"
	"narrows/patterns"
	"narrows/report"
)

// A scan of two regions of a fictional town in which trips from region 1 to
// region 2 were slow and circuitous on three of four days.
func ExampleWriteAll() {
	square := func(x0 float64) orb.Polygon {
		return orb.Polygon{{{x0, 50}, {x0 + 0.01, 50}, {x0 + 0.01, 50.01}, {x0, 50.01}, {x0, 50}}}
	}
	regions := &partition.Partition{
		Bound: orb.Bound{Min: orb.Point{10, 50}, Max: orb.Point{10.02, 50.01}},
		Regions: []partition.Region{
			{ID: 1, Polygon: square(10), AreaKM2: 0.79, PerimeterKM: 3.6, Point: orb.Point{10.005, 50.005},
				BorderRoads: []partition.BorderRoad{{Name: "Weir Road", LengthKM: 1.1}}, Neighbours: []partition.Neighbour{{ID: 2, SharedKM: 1.1}}},
			{ID: 2, Polygon: square(10.01), AreaKM2: 0.79, PerimeterKM: 3.6, Point: orb.Point{10.015, 50.005},
				BorderRoads: []partition.BorderRoad{{Name: "Weir Road", LengthKM: 1.1}}, Neighbours: []partition.Neighbour{{ID: 1, SharedKM: 1.1}}},
		},
	}
	days := []string{"2026-03-02", "2026-03-03", "2026-03-04", "2026-03-05"}
	var daily []patterns.DailyValue
	for _, d := range days[:3] {
		daily = append(daily, patterns.DailyValue{Day: d, Trips: 24, Speed: 4.2, Detour: 2.3, Candidate: true, DistanceSum: 24 * 3500, StraightSum: 24 * 1500, DurationSum: 24 * 3500 / 4.2})
	}
	edge := patterns.FindingEdge{From: 1, To: 2, TripsMedian: 24, SpeedMedian: 4.2, DetourMedian: 2.3, ExtraKMPerDay: 48, ExtraHoursPerDay: 4.1, Daily: daily}
	scan := &patterns.Scan{
		Options:          patterns.ScanOptions{Support: 0.5},
		Window:           "am-peak",
		Days:             days,
		CandidatesPerDay: []int{1, 1, 1, 0},
		EdgeDaily:        map[patterns.EdgeKey][]patterns.DailyValue{{From: 1, To: 2}: daily},
		Findings: []patterns.Finding{{Rank: 1, ID: "1>2", Regions: []int{1, 2}, Edges: []patterns.FindingEdge{edge},
			Days: days[:3], Share: 0.75, ExtraKMPerDay: 48, ExtraHoursPerDay: 4.1}},
	}

	dir, err := os.MkdirTemp("", "narrows-report")
	if err != nil {
		log.Fatal(err)
	}
	defer os.RemoveAll(dir)
	in := report.Input{Title: "Weir Road study", Area: "Lowmere (fictional)", Regions: regions, Scan: scan, Version: "example"}
	paths, err := report.WriteAll(dir, "weir", in)
	if err != nil {
		log.Fatal(err)
	}
	for _, p := range paths {
		fmt.Println(filepath.Base(p))
	}
	fmt.Println(report.Headline(in))
	// Output:
	// weir.xlsx
	// regions.geojson
	// findings.geojson
	// weir.html
	// 1 weak link recurred on at least 50 % of the 4 analysed days (2026-03-02 to 2026-03-05). The costliest, regions 1>2, adds 48 km of travel and 4.1 vehicle-hours a day.
}
