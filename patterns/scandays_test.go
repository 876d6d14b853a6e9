package patterns

import (
	"context"
	"errors"
	"fmt"
	"path/filepath"
	"reflect"
	"runtime"
	"sync"
	"testing"

	"narrows/regiongraph"
)

// TestScanDaysEqualsScanStore scans a store written as a dataset a day at
// a time, read with the scan's minimum trips as the scan command reads it,
// and the same store held whole in memory: the scans must be equal in
// every field, for every window, day selector, exclusion and period, on
// one worker or several.
func TestScanDaysEqualsScanStore(t *testing.T) {
	store := scanTestStore(5, 14, 63, 300, []scanPlant{scanPlantA, scanPlantB})
	// A file's region ids start at 1.
	for i := range store.Edges {
		store.Edges[i].From++
		store.Edges[i].To++
	}
	ds := filepath.Join(t.TempDir(), "graphs")
	if err := store.WriteDataset(ds); err != nil {
		t.Fatal(err)
	}
	first := store.Edges[0].Day.String()
	cases := []func(*ScanOptions){
		func(*ScanOptions) {},
		func(o *ScanOptions) { o.Window = "pm" },
		func(o *ScanOptions) { o.Days = Weekdays; o.Exclude = []string{"2025-01-08", "2025-02-11"} },
		func(o *ScanOptions) { o.Days = Weekends },
		func(o *ScanOptions) { o.From, o.To = "2025-01-20", "2025-02-16" },
		func(o *ScanOptions) { o.Skyline.MinTrips = 9; o.Support = 0.1 },
		func(o *ScanOptions) { o.To = first },
	}
	for _, procs := range []int{1, 2} {
		for i, change := range cases {
			t.Run(fmt.Sprintf("procs %d case %d", procs, i), func(t *testing.T) {
				defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(procs))
				opts := DefaultScanOptions()
				change(&opts)
				want, err := ScanStore(context.Background(), store, opts)
				if err != nil {
					t.Fatal(err)
				}
				days, err := regiongraph.OpenDays(ds, regiongraph.ReadOptions{MinTrips: opts.Skyline.MinTrips, From: opts.From, To: opts.To, Columns: ScanColumns()})
				if err != nil {
					t.Fatal(err)
				}
				var mu sync.Mutex
				progress := 0
				opts.Progress = func(stage string, done, total int) {
					mu.Lock()
					defer mu.Unlock()
					if stage == "candidates" {
						if done != progress+1 || done > total {
							t.Errorf("progress %d of %d after %d", done, total, progress)
						}
						progress = done
					}
				}
				got, err := ScanDays(context.Background(), days, opts)
				if err != nil {
					t.Fatal(err)
				}
				got.Options.Progress = nil
				if !reflect.DeepEqual(got, want) {
					t.Errorf("a day at a time: %d findings over %d days, in memory: %d over %d", len(got.Findings), len(got.Days), len(want.Findings), len(want.Days))
				}
				if progress < len(want.Days) {
					t.Errorf("progress reached %d days, the scan analysed %d", progress, len(want.Days))
				}
			})
		}
	}
	// The fixture plants findings, so the equality compares something.
	if s, _ := ScanStore(context.Background(), store, DefaultScanOptions()); s == nil || len(s.Findings) == 0 {
		t.Fatal("the fixture's scan has no findings")
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	days, err := regiongraph.OpenDays(ds, regiongraph.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if _, err := ScanDays(ctx, days, DefaultScanOptions()); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled: %v, want context.Canceled", err)
	}
}
