package regiongraph

import (
	"context"
	"errors"
	"fmt"
	"path/filepath"
	"reflect"
	"runtime"
	"slices"
	"strings"
	"sync"
	"testing"
	"time"

	"narrows/partition"
)

// bothLayouts writes a sample store of 31 days in both layouts: a single
// file and a dataset.
func bothLayouts(t *testing.T) (s *Store, file, ds string) {
	t.Helper()
	loc, _ := time.LoadLocation("Europe/Berlin")
	s = sampleStore(t, 31, time.Date(2024, 1, 10, 0, 0, 0, 0, loc), 5000)
	dir := t.TempDir()
	file = filepath.Join(dir, "graphs.parquet")
	if err := createFile(file, s.WriteParquet); err != nil {
		t.Fatal(err)
	}
	ds = filepath.Join(dir, "graphs")
	if err := s.WriteDataset(ds); err != nil {
		t.Fatal(err)
	}
	return s, file, ds
}

// eachDay collects what r.Each hands out, each day's edges copied, and
// checks that every day comes once with edges of that day only.
func eachDay(t *testing.T, r *DayReader) (days []Day, edges []Edge) {
	t.Helper()
	var mu sync.Mutex
	byDay := map[Day][]Edge{}
	err := r.Each(context.Background(), func(day Day, es []Edge) error {
		if len(es) == 0 {
			return fmt.Errorf("day %s handed out without edges", day)
		}
		for _, e := range es {
			if e.Day != day {
				return fmt.Errorf("day %s holds an edge of %s", day, e.Day)
			}
		}
		mu.Lock()
		defer mu.Unlock()
		if _, ok := byDay[day]; ok {
			return fmt.Errorf("day %s handed out twice", day)
		}
		byDay[day] = slices.Clone(es)
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	for d := range byDay {
		days = append(days, d)
	}
	slices.Sort(days)
	for _, d := range days {
		edges = append(edges, byDay[d]...)
	}
	return days, edges
}

// TestDayReaderMatchesReadFile reads every selection a day at a time from
// a dataset, a single file and a store in memory: the days put together
// must be the store read whole (ReadFileOptions), edge for edge, and each
// day in store order, whatever the number of workers and however the day
// files are cut into pieces.
func TestDayReaderMatchesReadFile(t *testing.T) {
	s, file, ds := bothLayouts(t)
	days := s.Days(testWindow(s, "all"))
	for _, procs := range []int{1, 3} {
		for _, opts := range []ReadOptions{
			{}, {MinTrips: 2}, {MinTrips: 3, Window: "am"},
			{From: days[1].String(), To: days[2].String()}, {MinTrips: 2, From: days[1].String()},
			{From: "2030-01-01"}, {MinTrips: 1 << 20},
			{MinTrips: 2, Columns: []string{"speed_median_mps", "duration_sum_s"}},
		} {
			t.Run(fmt.Sprintf("procs %d %+v", procs, opts), func(t *testing.T) {
				defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(procs))
				whole, err := ReadFileOptions(ds, opts)
				if err != nil {
					t.Fatal(err)
				}
				for _, path := range []string{ds, file} {
					r, err := OpenDays(path, opts)
					if err != nil {
						t.Fatal(err)
					}
					if !reflect.DeepEqual(r.Store().Meta, whole.Meta) {
						t.Errorf("%s: metadata differs from the whole read", path)
					}
					for _, rows := range []int64{stretchRows, 97} {
						r.stretchRows = rows
						got, edges := eachDay(t, r)
						if !slices.Equal(edges, whole.Edges) {
							t.Errorf("%s, pieces of %d rows: %d edges, the whole read %d", path, rows, len(edges), len(whole.Edges))
						}
						if want := distinctEdgeDays(whole.Edges); !slices.Equal(got, want) {
							t.Errorf("%s: days %v, want %v", path, got, want)
						}
					}
				}
			})
		}
	}
	// A store in memory hands out all its edges, by day.
	_, edges := eachDay(t, s.ByDay())
	if !slices.Equal(edges, s.Edges) {
		t.Errorf("in memory: %d edges, want %d", len(edges), len(s.Edges))
	}
	if n := s.ByDay().DayCount(); n != len(distinctEdgeDays(s.Edges)) {
		t.Errorf("DayCount %d, want %d", n, len(distinctEdgeDays(s.Edges)))
	}
}

func distinctEdgeDays(edges []Edge) []Day {
	var days []Day
	for _, e := range edges {
		if !slices.Contains(days, e.Day) {
			days = append(days, e.Day)
		}
	}
	slices.Sort(days)
	return days
}

// TestDayReaderChecks: the edges handed out pass the checks of a whole
// read, the regions given and the rows used; an error of visit or a
// cancellation ends the reading.
func TestDayReaderChecks(t *testing.T) {
	s := syntheticStore(6, 20, 50, "am")
	ds := filepath.Join(t.TempDir(), "graphs")
	if err := s.WriteDataset(ds); err != nil {
		t.Fatal(err)
	}
	open := func() *DayReader {
		t.Helper()
		r, err := OpenDays(ds, ReadOptions{})
		if err != nil {
			t.Fatal(err)
		}
		return r
	}
	none := func(Day, []Edge) error { return nil }

	// Regions 1 to 19 of the store's 20: the edges naming 20 are refused.
	r := open()
	var p partition.Partition
	for id := 1; id < 20; id++ {
		p.Regions = append(p.Regions, partition.Region{ID: id})
	}
	if err := r.CheckRegions(&p); err != nil {
		t.Fatal(err)
	}
	err := r.Each(context.Background(), none)
	if err == nil || !strings.Contains(err.Error(), "region 20 is not among the 19 regions") || !strings.Contains(err.Error(), ds) {
		t.Errorf("regions: got %v, want region 20 refused, naming the dataset", err)
	}
	p.Regions = append(p.Regions, partition.Region{ID: 20})
	if err := r.CheckRegions(&p); err != nil {
		t.Fatal(err)
	}
	if err := r.Each(context.Background(), none); err != nil {
		t.Errorf("all regions: %v", err)
	}

	boom := errors.New("boom")
	if err := open().Each(context.Background(), func(Day, []Edge) error { return boom }); !errors.Is(err, boom) {
		t.Errorf("visit's error: got %v", err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if err := open().Each(ctx, none); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled: got %v", err)
	}

	// Each day holds fewer trips than the rows used, the store more: the
	// sum over the days is checked too.
	over := *s
	over.Meta.Quality.Used = 0
	for _, e := range s.Edges {
		if e.Day == s.Edges[0].Day {
			over.Meta.Quality.Used += int64(e.Trips)
		}
	}
	over.Meta.Quality.Used += 5
	over.Meta.Quality.Read = over.Meta.Quality.Used
	ds2 := filepath.Join(t.TempDir(), "graphs")
	if err := over.WriteDataset(ds2); err != nil {
		t.Fatal(err)
	}
	// The day totals of the manifest show it at once; a dataset written
	// before them shows it as the days are read.
	if _, err := OpenDays(ds2, ReadOptions{}); err == nil || !strings.Contains(err.Error(), "more trips than the") || !strings.Contains(err.Error(), ds2) {
		t.Errorf("trips over the rows used, by the day totals: got %v", err)
	}
	stripTotals(t, ds2)
	r, err = OpenDays(ds2, ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	err = r.Each(context.Background(), none)
	if err == nil || !strings.Contains(err.Error(), "more trips than the") || !strings.Contains(err.Error(), ds2) {
		t.Errorf("trips over the rows used: got %v", err)
	}
	if _, err := ReadFile(ds2); err == nil || !strings.Contains(err.Error(), "more trips than the") {
		t.Errorf("the whole read of the same store: got %v", err)
	}
}
