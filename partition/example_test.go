package partition_test

import (
	"bytes"
	"context"
	"fmt"
	"log"
	"os"
	"strings"

	"narrows/partition"
)

func ExampleBuild() {
	// Ashgrove is a fictional town: see testdata/ashgrove.osm.
	f, err := os.Open("testdata/ashgrove.osm")
	if err != nil {
		log.Fatal(err)
	}
	defer f.Close()
	p, err := partition.Build(context.Background(), f, "ashgrove.osm", partition.DefaultOptions())
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("%d regions bounded by roads and %v; %d gaps closed, %d road ends extended, %d slivers merged\n",
		len(p.Regions), p.Stats.Barriers, p.Stats.GapsClosed, p.Stats.DanglesExtended, p.Stats.SliversMerged)
	for _, r := range p.Regions[:4] {
		fmt.Printf("region %d %q: %.2f km², %d neighbours, longest border %s (%.2f km)\n",
			r.ID, r.Name, r.AreaKM2, len(r.Neighbours), r.BorderRoads[0].Name, r.BorderRoads[0].LengthKM)
	}
	// Output:
	// 13 regions bounded by roads and [rail]; 1 gaps closed, 0 road ends extended, 3 slivers merged
	// region 1 "Valley Railway / S 7": 0.28 km², 2 neighbours, longest border Valley Railway (0.85 km)
	// region 2 "Valley Railway / Mill Lane": 0.28 km², 3 neighbours, longest border Valley Railway (0.85 km)
	// region 3 "Valley Railway / Ferry Street (west)": 0.28 km², 3 neighbours, longest border Valley Railway (0.85 km)
	// region 4 "Valley Railway / Ferry Street (east)": 0.28 km², 2 neighbours, longest border Valley Railway (0.85 km)
}

func ExampleParseBBox() {
	b, err := partition.ParseBBox("-30.02,40.00,-29.98,40.02")
	fmt.Println(b.Min, b.Max, err)
	_, err = partition.ParseBBox("-29.98,40.00,-30.02,40.02")
	fmt.Println(err)
	// Output:
	// [-30.02 40] [-29.98 40.02] <nil>
	// bbox "-29.98,40.00,-30.02,40.02": west -29.98 is not less than east -30.02
}

func ExamplePartition_WriteGeoJSON() {
	p, err := partition.ReadFile(context.Background(), "testdata/ashgrove.osm", partition.DefaultOptions())
	if err != nil {
		log.Fatal(err)
	}
	var buf bytes.Buffer
	if err := p.WriteGeoJSON(&buf); err != nil {
		log.Fatal(err)
	}
	// One feature per line after the collection's header.
	lines := strings.Split(buf.String(), "\n")
	fmt.Println(lines[0])
	fmt.Println(len(lines)-3, "features")
	// Read it back, as the later steps do.
	q, err := partition.ReadGeoJSON(&buf, "regions.geojson")
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println(len(q.Regions), "regions read back; region 1 borders", q.Regions[0].BorderRoads[0].Name)
	// Output:
	// {"type":"FeatureCollection","source":"ashgrove.osm","bbox":[-30.02,40,-29.98,40.02],"features":[
	// 13 features
	// 13 regions read back; region 1 borders Valley Railway
}
