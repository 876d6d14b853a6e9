package patterns

import (
	"flag"
	"os"
	"path/filepath"
	"testing"

	"github.com/paulmach/orb"

	"narrows/partition"
)

var cityStore = flag.String("city-store", "", "write the year-against-year benchmark store as Parquet to this `dir` (for timing the whole compare command)")

// TestWriteCityStore writes BenchmarkCompareYearAgainstYear's store (two
// years over 2,025 regions, every edge, not filtered by trips) to
// -city-store DIR/graphs.parquet, with the grid's regions beside it.
// Skipped without the flag.
func TestWriteCityStore(t *testing.T) {
	if *cityStore == "" {
		t.Skip("no -city-store")
	}
	store := scanTestStore(6, 45, 730, 4200, []scanPlant{scanPlantA, scanPlantB})
	for i := range store.Edges { // a store's region ids start at 1
		store.Edges[i].From++
		store.Edges[i].To++
	}
	if err := os.MkdirAll(*cityStore, 0o755); err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(*cityStore, "graphs.parquet")
	f, err := os.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	if err := store.WriteParquet(f); err != nil {
		t.Fatal(err)
	}
	if err := f.Close(); err != nil {
		t.Fatal(err)
	}
	regions := &partition.Partition{Source: "grid 45 x 45"}
	const side, cell = 45, 0.01 // degrees, about a kilometre
	for row := range side {
		for col := range side {
			x0, y0 := 10+float64(col)*cell, 50+float64(row)*cell
			x1, y1 := x0+cell, y0+cell
			regions.Regions = append(regions.Regions, partition.Region{
				ID:      row*side + col + 1,
				Polygon: orb.Polygon{orb.Ring{{x0, y0}, {x1, y0}, {x1, y1}, {x0, y1}, {x0, y0}}},
				Point:   orb.Point{(x0 + x1) / 2, (y0 + y1) / 2},
			})
		}
	}
	regions.Bound = orb.Bound{Min: orb.Point{10, 50}, Max: orb.Point{10 + side*cell, 50 + side*cell}}
	g, err := os.Create(filepath.Join(*cityStore, "regions.geojson"))
	if err != nil {
		t.Fatal(err)
	}
	if err := regions.WriteGeoJSON(g); err != nil {
		t.Fatal(err)
	}
	if err := g.Close(); err != nil {
		t.Fatal(err)
	}
	t.Logf("%s: %d edges, %s to %s", path, len(store.Edges), store.Edges[0].Day, store.Edges[len(store.Edges)-1].Day)
}
