package regiongraph

import (
	"io"
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
		text   func(s *Store, t *storeText) // writes the day and window columns otherwise
	}{
		{"negative region id", func(s *Store) { s.Edges[0].From = -5 }, "region ids must be at least 1", nil},
		{"day that is no date", func(s *Store) {}, "not a date", func(s *Store, t *storeText) {
			t.day, t.dayText = s.Edges[0].Day, []byte("2026-13-45")
		}},
		{"window not in the metadata", func(s *Store) {}, "window \"night\" not in the metadata", func(s *Store, t *storeText) {
			t.nameBytes[0] = []byte("night")
		}},
		{"negative quality count", func(s *Store) { s.Meta.Quality.Rejected[string(ReasonBadSpeed)] = -3 }, "rows rejected", nil},
		{"counts that do not add up", func(s *Store) { s.Meta.Quality.Read++ }, "add up to", nil},
		{"trips = MaxInt64", func(s *Store) { s.Edges[0].Trips = math.MaxInt64 }, "trips", nil},
		{"more trips than rows used", func(s *Store) { s.Edges[0].Trips += int(s.Meta.Quality.Used) }, "more trips than", nil},
		{"NaN speed", func(s *Store) { s.Edges[1].SpeedMedian = math.NaN() }, "a measure is NaN", nil},
		{"negative duration", func(s *Store) { s.Edges[2].DurationSum = -1 }, "a measure is -1", nil},
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
			write := s.WriteParquet
			if tc.text != nil {
				write = func(w io.Writer) error {
					opts, err := storeMetadata(s)
					if err != nil {
						return err
					}
					ew := newEdgeWriter(w, rowGroupRows, opts, s.Meta.Windows)
					tc.text(s, ew.text)
					if err := ew.add(s.Edges); err != nil {
						return err
					}
					return ew.close()
				}
			}
			if err := createFile(path, write); err != nil {
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
