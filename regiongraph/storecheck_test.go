package regiongraph

import (
	"fmt"
	"io"
	"math"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"narrows/partition"
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

// TestWindowIndexBounds: an edge's window is an index into the store's
// windows; writing one outside them is refused, and a store (file or
// dataset) whose metadata lists more windows than an index tells apart
// is refused when read, naming the file.
func TestWindowIndexBounds(t *testing.T) {
	s := syntheticStore(1, 6, 5, "am", "pm")
	if name := s.Meta.WindowName(1); name != "pm" {
		t.Errorf("WindowName(1) = %q", name)
	}
	if name := s.Meta.WindowName(2); name != "" {
		t.Errorf("WindowName(2) = %q, want none", name)
	}
	if w, ok := s.Meta.WindowIndex("pm"); !ok || w != 1 {
		t.Errorf("WindowIndex(pm) = %d, %t", w, ok)
	}
	if _, ok := s.Meta.WindowIndex("night"); ok {
		t.Error("WindowIndex(night) found a window")
	}
	dir := t.TempDir()
	bad := *s
	bad.Edges = slices.Clone(s.Edges)
	bad.Edges[3].Window = 2
	if err := createFile(filepath.Join(dir, "bad.parquet"), bad.WriteParquet); err == nil || !strings.Contains(err.Error(), "window 2, but the store has 2 windows") {
		t.Errorf("writing an edge of window 2 of 2: %v", err)
	}
	if err := bad.WriteDataset(filepath.Join(dir, "bad")); err == nil || !strings.Contains(err.Error(), "window 2, but the store has 2 windows") {
		t.Errorf("writing an edge of window 2 of 2 to a dataset: %v", err)
	}
	many := &Store{Meta: s.Meta}
	many.Meta.Windows = nil
	for i := range MaxWindows + 1 {
		many.Meta.Windows = append(many.Meta.Windows, Window{Name: fmt.Sprintf("w%03d", i), StartMinute: 0, EndMinute: 60})
	}
	path := filepath.Join(dir, "many.parquet")
	if err := createFile(path, many.WriteParquet); err != nil {
		t.Fatal(err)
	}
	if _, err := ReadFile(path); err == nil || !strings.Contains(err.Error(), "256 windows, more than the 255") || !strings.Contains(err.Error(), path) {
		t.Errorf("reading a store of 256 windows: %v", err)
	}
	ds := filepath.Join(dir, "many")
	if err := many.WriteDataset(ds); err != nil {
		t.Fatal(err)
	}
	if _, err := ReadFile(ds); err == nil || !strings.Contains(err.Error(), "256 windows, more than the 255") || !strings.Contains(err.Error(), ds) {
		t.Errorf("reading a dataset of 256 windows: %v", err)
	}
}

// TestRegionSetAgainstMap checks the set of region ids, a slice for small ids
// and a map for the rest, against a plain map of the ids.
func TestRegionSetAgainstMap(t *testing.T) {
	for _, ids := range [][]int{{0, 1, 2}, {5, 9, 4000000, -3}, {1 << 40, 7}, {}, {2, 2, 3}} {
		p := &partition.Partition{}
		want := map[int]bool{}
		for _, id := range ids {
			p.Regions = append(p.Regions, partition.Region{ID: id})
			want[id] = true
		}
		known := newRegionIDs(p)
		for _, id := range []int{-3, -1, 0, 1, 2, 3, 4, 5, 6, 7, 9, 10, 1023, 1024, 1030, 4000000, 4000001, 1 << 40} {
			if got := known.has(id); got != want[id] {
				t.Errorf("regions %v: id %d known %v, want %v", ids, id, got, want[id])
			}
		}
	}
}
