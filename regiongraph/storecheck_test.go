package regiongraph

import (
	"math"
	"path/filepath"
	"strings"
	"testing"

	"narrows/partition"
)

func TestReadRefusesDamagedValues(t *testing.T) {
	tests := []struct {
		name   string
		damage func(s *Store)
		want   string
	}{
		{"negative region id", func(s *Store) { s.Edges[0].From = -5 }, "region ids must be at least 1"},
		{"day that is no date", func(s *Store) { s.Edges[0].Day = "2026-13-45" }, "not a date"},
		{"window not in the metadata", func(s *Store) { s.Edges[0].Window = "night" }, "window not in the metadata"},
		{"negative quality count", func(s *Store) { s.Meta.Quality.Rejected[string(ReasonBadSpeed)] = -3 }, "rows rejected"},
		{"counts that do not add up", func(s *Store) { s.Meta.Quality.Read++ }, "add up to"},
		{"trips = MaxInt64", func(s *Store) { s.Edges[0].Trips = math.MaxInt64 }, "trips"},
		{"more trips than rows used", func(s *Store) { s.Edges[0].Trips += int(s.Meta.Quality.Used) }, "more trips than"},
		{"NaN speed", func(s *Store) { s.Edges[1].SpeedMedian = math.NaN() }, "a measure is NaN"},
		{"negative duration", func(s *Store) { s.Edges[2].DurationSum = -1 }, "a measure is -1"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s := syntheticStore(2, 6, 5, "am")
			path := filepath.Join(t.TempDir(), "graphs.parquet")
			if err := createFile(path, s.WriteParquet); err != nil {
				t.Fatal(err)
			}
			if _, err := ReadFile(path); err != nil {
				t.Fatalf("sound store: %v", err)
			}
			tc.damage(s)
			if err := createFile(path, s.WriteParquet); err != nil {
				t.Fatal(err)
			}
			_, err := ReadFile(path)
			if err == nil || !strings.Contains(err.Error(), tc.want) || !strings.Contains(err.Error(), path) {
				t.Errorf("%v, want %q", err, tc.want)
			}
		})
	}
}

func TestCheckRegions(t *testing.T) {
	s := syntheticStore(1, 6, 5, "am")
	if err := s.CheckRegions(gridPartition(3, 2, 0, 0, 1)); err != nil {
		t.Errorf("ids 1-6 on six regions: %v", err)
	}
	s.Edges[0].To = 9999
	if err := s.CheckRegions(gridPartition(3, 2, 0, 0, 1)); err == nil || !strings.Contains(err.Error(), "region 9999") {
		t.Errorf("id 9999: %v", err)
	}
}

// TestRegionSetAgainstMap checks the region test, a slice for small ids
// and a map for the rest, against a plain map of the ids.
func TestRegionSetAgainstMap(t *testing.T) {
	for _, ids := range [][]int{{0, 1, 2}, {5, 9, 4000000, -3}, {1 << 40, 7}, {}, {2, 2, 3}} {
		p := &partition.Partition{}
		want := map[int]bool{}
		for _, id := range ids {
			p.Regions = append(p.Regions, partition.Region{ID: id})
			want[id] = true
		}
		known := regionSet(p)
		for _, id := range []int{-3, -1, 0, 1, 2, 3, 4, 5, 6, 7, 9, 10, 1023, 1024, 1030, 4000000, 4000001, 1 << 40} {
			if got := known(id); got != want[id] {
				t.Errorf("regions %v: id %d known %v, want %v", ids, id, got, want[id])
			}
		}
	}
}
