package town

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"testing"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/planar"

	"narrows/partition"
)

func regionOf(p *partition.Partition, pt orb.Point) int {
	for _, r := range p.Regions {
		if planar.PolygonContains(r.Polygon, pt) {
			return r.ID
		}
	}
	return 0
}

// studyOptions are the partition options of the demo's plain study: the
// defaults, whose barriers include the river and the railway (the planted
// districts face each other across the river, not across a road).
func studyOptions() partition.Options {
	return partition.DefaultOptions()
}

// TestPartitionTown partitions the demo town by its major roads and
// barriers: the region count is in the range the demo needs, the two
// planted districts are different regions, and the link (a tertiary road)
// leaves the regions as they were.
func TestPartitionTown(t *testing.T) {
	tw, err := Generate(defaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	parts := make([]*partition.Partition, 2)
	for k, withLink := range []bool{false, true} {
		path := filepath.Join(dir, []string{"before.osm", "after.osm"}[k])
		f, err := os.Create(path)
		if err != nil {
			t.Fatal(err)
		}
		if err := tw.WriteOSM(f, withLink); err != nil {
			t.Fatal(err)
		}
		if err := f.Close(); err != nil {
			t.Fatal(err)
		}
		parts[k], err = partition.ReadFile(context.Background(), path, studyOptions())
		if err != nil {
			t.Fatalf("partition %s: %v", path, err)
		}
	}
	p := parts[0]
	t.Logf("%d regions (warnings %v)", len(p.Regions), p.Warnings)
	if n := len(p.Regions); n < 30 || n > 80 {
		t.Errorf("%d regions, want 30..80", n)
	}
	h, j := regionOf(p, tw.Housing.Centre), regionOf(p, tw.Jobs.Centre)
	if h == 0 || j == 0 || h == j {
		t.Fatalf("housing in region %d, jobs in region %d: want two different regions", h, j)
	}
	// The regions take the district names from the town's place nodes.
	if got := [2]string{p.Regions[h-1].Name, p.Regions[j-1].Name}; got != [2]string{tw.Housing.Name, tw.Jobs.Name} {
		t.Errorf("planted regions named %q, want %q and %q", got, tw.Housing.Name, tw.Jobs.Name)
	}
	names := map[string]int{}
	for _, r := range p.Regions {
		if prev, dup := names[r.Name]; dup {
			t.Errorf("regions %d and %d are both named %q", prev, r.ID, r.Name)
		}
		names[r.Name] = r.ID
	}
	if len(parts[1].Regions) != len(p.Regions) {
		t.Fatalf("after: %d regions, before %d", len(parts[1].Regions), len(p.Regions))
	}
	for i, r := range p.Regions {
		a := parts[1].Regions[i]
		if r.ID != a.ID || r.Point != a.Point || r.AreaKM2 != a.AreaKM2 {
			t.Errorf("region %d differs after the link: %v/%v km2 vs %v/%v km2", r.ID, r.Point, r.AreaKM2, a.Point, a.AreaKM2)
		}
	}
	if l := regionOf(p, tw.LinkMidpoint); l == 0 {
		t.Errorf("link midpoint %v in no region", tw.LinkMidpoint)
	}
}

// TestPartitionCity checks the benchmark city's size: about 1,450 regions.
func TestPartitionCity(t *testing.T) {
	if testing.Short() {
		t.Skip("city in -short")
	}
	tw, err := Generate(Options{Size: sizeCity, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := tw.WriteOSM(&buf, false); err != nil {
		t.Fatal(err)
	}
	p, err := partition.Build(context.Background(), &buf, "city.osm", studyOptions())
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("city: %d regions", len(p.Regions))
	if n := len(p.Regions); n < 1200 || n > 1800 {
		t.Errorf("%d regions, want about 1,500", n)
	}
	h, j := regionOf(p, tw.Housing.Centre), regionOf(p, tw.Jobs.Centre)
	if h == 0 || j == 0 || h == j {
		t.Errorf("housing in region %d, jobs in region %d", h, j)
	}
}

// A wide but elongated face, such as the ring between an outer ring road
// and the edge of the study area, is no sliver: merging it would leave an
// elongated face again and cascade through whole districts. On the
// generated town without barriers every arterial cell is larger than
// 0.2 km² and far from thin, so default mode must keep every face of the
// exact partition.
func TestWideElongatedFacesAreNotSlivers(t *testing.T) {
	tw, err := Generate(defaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	var osm bytes.Buffer
	if err := tw.WriteOSM(&osm, false); err != nil {
		t.Fatal(err)
	}
	build := func(exact bool) *partition.Partition {
		o := partition.DefaultOptions()
		o.Exact = exact
		p, err := partition.Build(context.Background(), bytes.NewReader(osm.Bytes()), "town.osm", o)
		if err != nil {
			t.Fatal(err)
		}
		return p
	}
	exact, cleaned := build(true), build(false)
	for _, r := range exact.Regions {
		if r.AreaKM2 < 0.2 {
			t.Fatalf("exact face %d is %.3f km²: the premise of this test (no small faces) fails", r.ID, r.AreaKM2)
		}
	}
	if len(cleaned.Regions) != len(exact.Regions) {
		t.Errorf("default mode gives %d regions from %d exact faces, none of them small or narrow: merging cascaded",
			len(cleaned.Regions), len(exact.Regions))
	}
}
