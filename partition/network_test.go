package partition

import (
	"testing"
)

// TestNetworkAshgrove checks the maps' linework of the hand-drawn town
// (see the list in town_test.go): Willow Close, a residential street that
// bounds nothing, and the Valley Railway come with the regions from the
// same read, named, and each carriageway of Harbour Road once.
func TestNetworkAshgrove(t *testing.T) {
	for _, tc := range []struct {
		name     string
		opts     func() Options
		wantWays map[string]string // name -> class
		absent   []string
	}{
		{"default", DefaultOptions, map[string]string{"Willow Close": "residential", "Valley Railway": "rail", "Harbour Road": "primary", "Mill Lane": "secondary"}, nil},
		{"no minor roads", func() Options { o := DefaultOptions(); o.NetworkRoads = nil; return o }, map[string]string{"Valley Railway": "rail"}, []string{"Willow Close"}},
		{"railway not a barrier", func() Options { o := DefaultOptions(); o.Barriers = nil; return o }, map[string]string{"Valley Railway": "rail", "Willow Close": "residential"}, nil},
	} {
		t.Run(tc.name, func(t *testing.T) {
			p := readTown(t, "ashgrove.osm", tc.opts())
			got := map[string]string{}
			ways := map[string]map[int64]bool{}
			for _, l := range p.Network {
				got[l.Name] = l.Class
				if ways[l.Name] == nil {
					ways[l.Name] = map[int64]bool{}
				}
				ways[l.Name][l.WayID] = true
			}
			for name, class := range tc.wantWays {
				if got[name] != class {
					t.Errorf("%s: class %q, want %q", name, got[name], class)
				}
			}
			for _, name := range tc.absent {
				if _, ok := got[name]; ok {
					t.Errorf("%s is on the map, want it left out", name)
				}
			}
			if n := len(ways["Harbour Road"]); tc.name == "default" && n != 2 {
				t.Errorf("Harbour Road: %d ways, want its two carriageways", n)
			}
		})
	}
}
