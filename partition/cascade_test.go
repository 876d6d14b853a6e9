package partition_test

import (
	"bytes"
	"context"
	"testing"

	"narrows/cmd/town"
	"narrows/partition"
)

// A wide but elongated face, such as the ring between an outer ring road
// and the edge of the study area, is no sliver: merging it would leave an
// elongated face again and cascade through whole districts. On the
// generated town without barriers every arterial cell is larger than
// 0.2 km² and far from thin, so default mode must keep every face of the
// exact partition.
func TestWideElongatedFacesAreNotSlivers(t *testing.T) {
	tw, err := town.Generate(town.DefaultOptions())
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
