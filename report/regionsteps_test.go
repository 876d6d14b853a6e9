package report

import (
	"testing"

	"narrows/partition"
)

func TestOversizeLine(t *testing.T) {
	o := partition.DefaultOptions()
	o.SplitRoads = []string{"tertiary", "track"}
	tests := []struct {
		name string
		s    partition.Stats
		max  float64
		want string
	}{
		{"none", partition.Stats{}, 4, "no region over 4 km²"},
		{"one split, all done", partition.Stats{Oversized: 1, RegionsSplit: 1, SplitInto: 3, SplitClasses: []string{"tertiary"}}, 4,
			"1 region over 4 km²: 1 region split into 3 by tertiary roads"},
		{"none could be split", partition.Stats{Oversized: 2, StillOversized: 2, StillOversizedNoRoads: 2}, 4,
			"2 regions over 4 km²: none split; 2 regions still over 4 km² (the largest 620 km², 2 with no tertiary or track road inside)"},
		{"some left", partition.Stats{Oversized: 3, RegionsSplit: 2, SplitInto: 5, SplitClasses: []string{"tertiary", "track"}, StillOversized: 2, StillOversizedNoRoads: 1}, 4,
			"3 regions over 4 km²: 2 regions split into 5 by tertiary and track roads; 2 regions still over 4 km² (the largest 620 km², 1 with no tertiary or track road inside, 1 whose split roads end inside or cut off only pieces under 1 km²)"},
		{"splitting off", partition.Stats{}, 0, ""},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			o.MaxRegionKM2 = tc.max
			if got := oversizeLine(tc.s, o, 620); got != tc.want {
				t.Errorf("got  %q\nwant %q", got, tc.want)
			}
		})
	}
}
