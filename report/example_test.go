package report_test

import (
	"bytes"
	"fmt"
	"log"
	"regexp"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"
	"github.com/xuri/excelize/v2"

	"narrows/partition"
	"narrows/patterns"
	"narrows/report"
)

// weirRoad is a scan of two regions of a fictional town in which trips from
// region 1 to region 2 were slow and circuitous on three of four days.
func weirRoad() report.Input {
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
	return report.Input{Title: "Weir Road study", Area: "Lowmere (fictional)", Regions: regions, Scan: scan, Version: "example"}
}

func ExampleHeadline() {
	fmt.Println(report.Headline(weirRoad()))
	// Output:
	// One weak link recurred on at least 50 % of the 4 analysed days (2026-03-02 to 2026-03-05): across Weir Road between region 1 and region 2 (1>2), with 48 extra vehicle-km and 4.1 extra vehicle-hours per day.
}

func ExampleWriteWorkbook() {
	var buf bytes.Buffer
	if err := report.WriteWorkbook(&buf, weirRoad()); err != nil {
		log.Fatal(err)
	}
	f, err := excelize.OpenReader(&buf)
	if err != nil {
		log.Fatal(err)
	}
	defer f.Close()
	fmt.Println(f.GetSheetList())
	rows, err := f.GetRows(report.SheetFindings)
	if err != nil {
		log.Fatal(err)
	}
	for col := 7; col <= 9; col++ { // the trips, speed and detour of the weak link
		fmt.Printf("%s: %s\n", rows[0][col], rows[1][col])
	}
	// Output:
	// [Summary Weak links Edges Daily Timeline Speed v detour Cost by day Regions Data quality Inputs Method]
	// Trips per day: 24
	// Speed km/h: 15.1
	// Detour ratio: 2.30
}

func ExampleWriteHTML() {
	var buf bytes.Buffer
	if err := report.WriteHTML(&buf, weirRoad()); err != nil {
		log.Fatal(err)
	}
	fmt.Println(regexp.MustCompile(`<title>.*</title>`).FindString(buf.String()))
	// Output:
	// <title>Weir Road study</title>
}

func ExampleWriteFindingsGeoJSON() {
	var buf bytes.Buffer
	if err := report.WriteFindingsGeoJSON(&buf, weirRoad()); err != nil {
		log.Fatal(err)
	}
	fc, err := geojson.UnmarshalFeatureCollection(buf.Bytes())
	if err != nil {
		log.Fatal(err)
	}
	for _, f := range fc.Features {
		fmt.Println(f.ID, f.Geometry.GeoJSONType(), f.Properties["speed_kmh"], "km/h")
	}
	// Output:
	// 1>2/1>2 LineString 15.12 km/h
}

func ExampleWriteRegionsGeoJSON() {
	var buf bytes.Buffer
	if err := report.WriteRegionsGeoJSON(&buf, weirRoad()); err != nil {
		log.Fatal(err)
	}
	fc, err := geojson.UnmarshalFeatureCollection(buf.Bytes())
	if err != nil {
		log.Fatal(err)
	}
	for _, f := range fc.Features {
		fmt.Println("region", f.Properties["id"], "weak links:", f.Properties["findings"])
	}
	// Output:
	// region 1 weak links: 1
	// region 2 weak links: 1
}
