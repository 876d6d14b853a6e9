package regiongraph

import (
	"math"
	"path/filepath"
	"strings"
	"testing"
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
