package partition

import (
	"testing"
)

func TestSplitOversized(t *testing.T) {
	// The 3 km x 2 km study area is cut by a secondary road at x = 1500 m
	// into two 3 km² regions, over a limit of 2 km². In the west, an
	// unclassified road runs across at y = 1000 m; in the east a track
	// comes from the secondary and stops at x = 2600 m, out of the
	// extension's reach of anything, and a residential street runs the
	// full height at x = 2800 m, cutting off a 0.4 km² strip, under a
	// quarter of the limit.
	tests := []struct {
		name                   string
		splitRoads             []string
		noEastRoads            bool
		wantRegions            int
		wantSplit, wantInto    int
		wantStill, wantNoRoads int
		wantClasses            []string
	}{
		// The west is cut in two; the strip in the east rejoins its
		// piece and the track ends inside: the east stays over.
		{"default classes", nil, false, 3, 1, 2, 1, 0, []string{"unclassified", "residential", "track"}},
		// Nothing inside the east at all.
		{"no roads in the east", nil, true, 3, 1, 2, 1, 1, []string{"unclassified"}},
		// Tertiary only: neither is cut, and neither has a split road.
		{"tertiary only", []string{"tertiary"}, false, 2, 0, 0, 2, 2, nil},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			rt := newRiverTown()
			rt.way([][2]float64{{1500, -50}, {1500, 2050}}, "highway=secondary", "name=Mid Road")
			rt.way([][2]float64{{-50, 1000}, {1500, 1000}}, "highway=unclassified", "name=West Lane")
			if !tc.noEastRoads {
				rt.way([][2]float64{{1500, 1000}, {2600, 1000}}, "highway=track")
				rt.way([][2]float64{{2800, -50}, {2800, 2050}}, "highway=residential", "name=East Street")
			}
			o := DefaultOptions()
			o.MaxRegionKM2 = 2
			if tc.splitRoads != nil {
				o.SplitRoads = tc.splitRoads
			}
			p := rt.build(t, o)
			s := p.Stats
			if len(p.Regions) != tc.wantRegions {
				t.Errorf("%d regions, want %d", len(p.Regions), tc.wantRegions)
			}
			if s.Oversized != 2 || s.RegionsSplit != tc.wantSplit || s.SplitInto != tc.wantInto {
				t.Errorf("%d oversized, %d split into %d; want 2, %d into %d", s.Oversized, s.RegionsSplit, s.SplitInto, tc.wantSplit, tc.wantInto)
			}
			if s.StillOversized != tc.wantStill || s.StillOversizedNoRoads != tc.wantNoRoads {
				t.Errorf("%d still oversized (%d with no split road), want %d (%d)", s.StillOversized, s.StillOversizedNoRoads, tc.wantStill, tc.wantNoRoads)
			}
			if !equalStrings(s.SplitClasses, tc.wantClasses) {
				t.Errorf("split by %v, want %v", s.SplitClasses, tc.wantClasses)
			}
			big := 0
			for _, r := range p.Regions {
				if r.AreaKM2 > o.MaxRegionKM2 {
					big++
				}
				if r.AreaKM2 < o.MaxRegionKM2/4 {
					t.Errorf("region %d %q: %.3f km², a piece under a quarter of the limit", r.ID, r.Name, r.AreaKM2)
				}
			}
			if big != tc.wantStill {
				t.Errorf("%d regions over the limit, Stats say %d", big, tc.wantStill)
			}
			checkTiles(t, p)
		})
	}
}

func equalStrings(a, b []string) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}
