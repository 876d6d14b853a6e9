package partition_test

import (
	"context"
	"fmt"
	"log"
	"os"

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
	fmt.Printf("%d regions, %d gaps closed, %d slivers merged\n", len(p.Regions), p.Stats.GapsClosed, p.Stats.SliversMerged)
	for _, r := range p.Regions[:4] {
		fmt.Printf("region %d: %.2f km², %d neighbours, longest border %s (%.2f km)\n",
			r.ID, r.AreaKM2, len(r.Neighbours), r.BorderRoads[0].Name, r.BorderRoads[0].LengthKM)
	}
	// Output:
	// 9 regions, 1 gaps closed, 3 slivers merged
	// region 1: 0.93 km², 2 neighbours, longest border S 7 (1.10 km)
	// region 2: 0.93 km², 3 neighbours, longest border Mill Lane (1.10 km)
	// region 3: 0.93 km², 3 neighbours, longest border Ferry Street (1.10 km)
	// region 4: 0.93 km², 2 neighbours, longest border Ferry Street (1.10 km)
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
