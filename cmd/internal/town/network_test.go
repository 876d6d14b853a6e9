package town

import (
	"context"
	"os"
	"path/filepath"
	"testing"

	"narrows/partition"
)

// TestNetworkScheme reads the town's linework with its regions (one read
// per extract) and finds the scheme as the ways of the after extract that
// the before extract lacks: exactly the new bridge, by its OSM name.
func TestNetworkScheme(t *testing.T) {
	tw, err := Generate(defaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	paths := [2]string{filepath.Join(dir, "before.osm"), filepath.Join(dir, "after.osm")}
	for k, withLink := range []bool{false, true} {
		f, err := os.Create(paths[k])
		if err != nil {
			t.Fatal(err)
		}
		if err := tw.WriteOSM(f, withLink); err != nil {
			t.Fatal(err)
		}
		if err := f.Close(); err != nil {
			t.Fatal(err)
		}
	}
	p, err := partition.ReadFile(context.Background(), paths[0], studyOptions())
	if err != nil {
		t.Fatal(err)
	}
	classes := map[string]int{}
	for _, l := range p.Network {
		classes[l.Class]++
		if len(l.Line) < 2 {
			t.Errorf("way %d: line of %d points", l.WayID, len(l.Line))
		}
	}
	// The town's generator writes these classes (osm.go); each must reach
	// the maps: major roads, the minor ones, the railway and the river.
	for _, c := range []string{"trunk", "primary", "secondary", "tertiary", "residential", "rail", "river"} {
		if classes[c] == 0 {
			t.Errorf("no %s line in the network (classes %v)", c, classes)
		}
	}
	after, err := partition.ReadNetwork(context.Background(), paths[1], studyOptions())
	if err != nil {
		t.Fatal(err)
	}
	if len(after) <= len(p.Network) {
		t.Errorf("after network has %d lines, before %d: want more", len(after), len(p.Network))
	}
	scheme := partition.NewWays(p.Network, after)
	if len(scheme) != 1 {
		t.Fatalf("scheme: %d new lines, want the one link: %+v", len(scheme), scheme)
	}
	if got, want := scheme[0].Name, tw.Link.Tag("name"); got != want || want == "" {
		t.Errorf("scheme named %q, want %q", got, want)
	}
	if got, want := scheme[0].WayID, tw.Link.id; got != want {
		t.Errorf("scheme way %d, want %d", got, want)
	}
}
