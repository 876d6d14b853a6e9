package partition

import (
	"bytes"
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
)

// A pathological file: hundreds of major roads criss-crossing in a box of
// some 60 m, so that noding gives tens of thousands of vertices all within
// the gap-closing search radius of every line end. The partition must still
// come out (the gap search is bounded) and still tile the study area.
func TestDenseCrissCrossLineworkStillTiles(t *testing.T) {
	if testing.Short() {
		t.Skip("dense arrangement")
	}
	rng := rand.New(rand.NewPCG(7, 11))
	const ways = 500
	minLon, minLat, maxLon, maxLat := 10.0, 50.0, 10.0008, 50.0005 // about 57 m x 56 m
	var b bytes.Buffer
	fmt.Fprintf(&b, "<?xml version='1.0' encoding='UTF-8'?>\n<osm version='0.6'>\n<bounds minlat='%g' minlon='%g' maxlat='%g' maxlon='%g'/>\n", minLat, minLon, maxLat, maxLon)
	for i := 1; i <= 2*ways; i++ {
		lon := minLon + rng.Float64()*(maxLon-minLon)
		lat := minLat + rng.Float64()*(maxLat-minLat)
		fmt.Fprintf(&b, "<node id='%d' lat='%.9f' lon='%.9f'/>\n", i, lat, lon)
	}
	for i := 1; i <= ways; i++ {
		fmt.Fprintf(&b, "<way id='%d'><nd ref='%d'/><nd ref='%d'/><tag k='highway' v='primary'/></way>\n", i, 2*i-1, 2*i)
	}
	b.WriteString("</osm>\n")
	p, err := Build(context.Background(), &b, "dense.osm", DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	var area float64
	for _, r := range p.Regions {
		area += r.AreaKM2
	}
	// The rectangle's area in the same local projection.
	const r = 6371008.8
	lat0 := (minLat + maxLat) / 2 * math.Pi / 180
	want := r * math.Cos(lat0) * (maxLon - minLon) * math.Pi / 180 * r * (maxLat - minLat) * math.Pi / 180 / 1e6
	if math.Abs(area-want) > 0.001*want {
		t.Errorf("regions cover %.6f km², the study area is %.6f km²", area, want)
	}
	if p.Stats.Vertices < 10*ways {
		t.Errorf("only %d vertices: the linework is not the dense case this test is about", p.Stats.Vertices)
	}
}
