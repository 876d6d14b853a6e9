package regiongraph

import (
	"cmp"
	"context"
	"fmt"
	"io"
	"math/rand/v2"
	"os"
	"path/filepath"
	"reflect"
	"slices"
	"strings"
	"testing"
	"time"
	"unsafe"

	"github.com/parquet-go/parquet-go"
)

// part returns a copy of s with the edges keep selects, in the order
// given (nil: store order).
func part(s *Store, keep func(e *Edge) bool) *Store {
	out := &Store{Meta: s.Meta, regionsGeoJSON: s.regionsGeoJSON}
	for i := range s.Edges {
		if keep(&s.Edges[i]) {
			out.Edges = append(out.Edges, s.Edges[i])
		}
	}
	return out
}

// TestMergeDatasetStreamsEachLayout merges stores of both layouts, and in
// memory, day by day into a dataset and compares the result with the
// in-memory Merge of the same stores (the oracle: it holds every edge and
// sorts them). Single files are also written with small row groups and
// read in small stretches, so that a day spans row groups and stretches.
func TestMergeDatasetStreamsEachLayout(t *testing.T) {
	full := syntheticStore(12, 60, 150, "am", "all")
	dayIndex := map[Day]int{}
	for _, e := range full.Edges {
		if _, ok := dayIndex[e.Day]; !ok {
			dayIndex[e.Day] = len(dayIndex)
		}
	}
	even := func(e *Edge) bool { return dayIndex[e.Day]%2 == 0 }
	odd := func(e *Edge) bool { return dayIndex[e.Day]%2 == 1 }
	am := func(e *Edge) bool { return e.Window == testWindow(full, "am") }
	notAM := func(e *Edge) bool { return e.Window != testWindow(full, "am") }
	all := func(*Edge) bool { return true }
	day3 := func(e *Edge) bool { return dayIndex[e.Day] == 3 }

	// An input: how it is given (file, small file, unsorted file,
	// dataset, memory) and which edges.
	type input struct {
		how  string
		keep func(*Edge) bool
	}
	for _, tc := range []struct {
		name     string
		inputs   []input
		stretch  int64  // stretch rows of single files
		conflict string // the error wanted, "" for none
	}{
		{name: "one file", inputs: []input{{"file", all}}, stretch: stretchRows},
		{name: "file in small groups and stretches", inputs: []input{{"small", all}}, stretch: 37},
		{name: "file and dataset, days interleaved", inputs: []input{{"small", even}, {"dataset", odd}}, stretch: 50},
		{name: "memory and file, windows of the same days", inputs: []input{{"memory", am}, {"small", notAM}}, stretch: 64},
		{name: "dataset, file and memory", inputs: []input{{"dataset", am}, {"file", func(e *Edge) bool { return !am(e) && even(e) }}, {"memory", func(e *Edge) bool { return !am(e) && odd(e) }}}, stretch: stretchRows},
		{name: "file whose days are not ascending", inputs: []input{{"unsorted", even}, {"file", odd}}, stretch: stretchRows},
		{name: "a day in two stores", inputs: []input{{"file", all}, {"dataset", day3}}, stretch: 41, conflict: "is in both store 1 and store 2"},
		{name: "a day in a file and in memory", inputs: []input{{"memory", day3}, {"small", all}}, stretch: stretchRows, conflict: "is in both store 1 and store 2"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			dir := t.TempDir()
			var srcs []mergeSource
			var metas, parts []*Store
			defer func() {
				for _, s := range srcs {
					s.close()
				}
			}()
			for i, in := range tc.inputs {
				p := part(full, in.keep)
				parts = append(parts, p)
				path := filepath.Join(dir, "in"+string(rune('a'+i)))
				var src mergeSource
				var meta Meta
				var regions []byte
				var err error
				switch in.how {
				case "memory":
					src, meta, regions = &memoryDays{edges: p.Edges}, p.Meta, p.regionsGeoJSON
				case "dataset":
					if err := p.WriteDataset(path); err != nil {
						t.Fatal(err)
					}
					src, meta, regions, err = openMergeInput(path)
				case "file", "small", "unsorted":
					groups := rowGroupRows
					w := p
					switch in.how {
					case "small":
						groups = 45
					case "unsorted":
						// Days descending, as a tool other than narrows
						// might write them.
						w = &Store{Meta: p.Meta, Edges: slices.Clone(p.Edges)}
						slices.SortStableFunc(w.Edges, func(a, b Edge) int { return cmp.Compare(b.Day, a.Day) })
					}
					path += ".parquet"
					if err := createFile(path, func(f io.Writer) error {
						return writeParquet(f, w, groups, parquet.PageBufferSize(1<<10))
					}); err != nil {
						t.Fatal(err)
					}
					src, meta, regions, err = openMergeFile(path, tc.stretch)
					if _, whole := src.(*memoryDays); err == nil && whole != (in.how == "unsorted") {
						t.Errorf("%s: read whole %t", in.how, whole)
					}
				}
				if err != nil {
					t.Fatal(err)
				}
				srcs = append(srcs, src)
				metas = append(metas, &Store{Meta: meta, regionsGeoJSON: regions})
			}
			out := filepath.Join(dir, "merged")
			got, _, err := mergeDays(out, srcs, metas)
			want, werr := Merge(parts...)
			if tc.conflict != "" {
				if err == nil || !strings.Contains(err.Error(), tc.conflict) {
					t.Fatalf("merge: %v, want %q", err, tc.conflict)
				}
				if werr == nil {
					t.Fatal("the oracle merged a conflict")
				}
				if _, err := os.Stat(out); !os.IsNotExist(err) {
					t.Errorf("a refused merge left %s: %v", out, err)
				}
				return
			}
			if err != nil || werr != nil {
				t.Fatal(err, werr)
			}
			back, err := ReadFile(out)
			if err != nil {
				t.Fatal(err)
			}
			if !slices.Equal(back.Edges, want.Edges) {
				t.Fatalf("merged dataset has %d edges, the in-memory merge %d, or they differ", len(back.Edges), len(want.Edges))
			}
			if !reflect.DeepEqual(back.Meta, want.Meta) || !reflect.DeepEqual(got.Meta, want.Meta) {
				t.Errorf("metadata differs:\n%+v\n%+v", back.Meta, want.Meta)
			}
		})
	}
}

// TestMergeSingleFileBounded merges single-file stores of 15 and 60 days
// into datasets and samples the heap: the streamed merge holds about a
// day at a time, so its peak does not grow with the days, while reading
// the file whole (what the merge did before) grows fourfold. All are
// measured in the same run. (The streamed merge's own buffers, the day
// files' writers and the file's reader, are about 20-40 MB whatever the
// days.)
func TestMergeSingleFileBounded(t *testing.T) {
	if testing.Short() {
		t.Skip("writes a 60-day store")
	}
	dir := t.TempDir()
	measure := func(days int) (whole, streamed uint64) {
		s := syntheticStore(days, 500, 8000, "all")
		file := filepath.Join(dir, fmt.Sprintf("graphs%d.parquet", days))
		if err := createFile(file, s.WriteParquet); err != nil {
			t.Fatal(err)
		}
		edges := len(s.Edges)
		s = nil
		var err error
		var read *Store
		whole = heapPeak(func() { read, err = ReadFile(file) })
		if err != nil || len(read.Edges) != edges {
			t.Fatalf("read whole: %v", err)
		}
		read = nil
		out := filepath.Join(dir, fmt.Sprintf("graphs%d", days))
		var n Written
		streamed = heapPeak(func() { _, n, err = MergeDataset(out, nil, []string{file}) })
		if err != nil || n.Edges != edges || n.Days != days {
			t.Fatalf("merge: %v, %+v of %d edges", err, n, edges)
		}
		t.Logf("%d days: peak heap reading the file whole %.1f MB, streamed merge %.1f MB (a day's edges %.1f MB)",
			days, float64(whole)/1e6, float64(streamed)/1e6, float64(edges/days)*float64(unsafe.Sizeof(Edge{}))/1e6)
		return whole, streamed
	}
	whole15, stream15 := measure(15)
	whole60, stream60 := measure(60)
	if whole60 < 3*whole15 {
		t.Errorf("reading the file whole: %d bytes at 15 days, %d at 60: the test does not load memory", whole15, whole60)
	}
	// Heap samples of goroutines at work vary by a few MB; reading the
	// whole file grows by 3.5x here.
	if float64(stream60) > 1.5*float64(stream15) {
		t.Errorf("the streamed merge peaked at %d bytes at 15 days, %d at 60: it grows with the days", stream15, stream60)
	}
	if stream60 >= whole60 {
		t.Errorf("the streamed merge of 60 days peaked at %d bytes, reading the file whole at %d", stream60, whole60)
	}
}

// TestIngestMergeDataset ingests trips while merging a store of other
// days, given as a single file and as a dataset: the dataset equals the
// ingest of all the trips merged in memory, and a merge that fails stops
// the ingest and leaves nothing.
func TestIngestMergeDataset(t *testing.T) {
	loc := mustZone(t, "Europe/Berlin")
	old := sampleStore(t, 5, time.Date(2024, 1, 10, 0, 0, 0, 0, loc), 3000)
	p := gridPartition(gNX, gNY, gLon0, gLat0, gStep)
	opts := DefaultOptions()
	opts.TimeZone = "Europe/Berlin"
	opts.Windows = []Window{{"all", 0, 1440}, {"am", 420, 600}}
	dir := t.TempDir()
	trips := filepath.Join(dir, "new.csv")
	rng := rand.New(rand.NewPCG(9, 10))
	if err := os.WriteFile(trips, []byte(tripsCSV(genTrips(rng, 3000, time.Date(2024, 2, 10, 0, 0, 0, 0, loc)), loc, rng)), 0o644); err != nil {
		t.Fatal(err)
	}
	fresh, err := Ingest(context.Background(), p, "4f2a", []Input{{Path: trips}}, opts)
	if err != nil {
		t.Fatal(err)
	}
	want, err := Merge(fresh, old)
	if err != nil {
		t.Fatal(err)
	}
	file, ds := filepath.Join(dir, "old.parquet"), filepath.Join(dir, "old")
	if err := createFile(file, old.WriteParquet); err != nil {
		t.Fatal(err)
	}
	if err := old.WriteDataset(ds); err != nil {
		t.Fatal(err)
	}
	for _, path := range []string{file, ds} {
		out := filepath.Join(dir, "merged-"+filepath.Base(path))
		s, n, err := IngestMergeDataset(context.Background(), p, "4f2a", []Input{{Path: trips}}, opts, out, []string{path}, nil)
		if err != nil {
			t.Fatal(err)
		}
		back, err := ReadFile(out)
		if err != nil {
			t.Fatal(err)
		}
		if !slices.Equal(back.Edges, want.Edges) || n.Edges != len(want.Edges) {
			t.Errorf("%s: %d edges written, %d read back, want %d", path, n.Edges, len(back.Edges), len(want.Edges))
		}
		if !reflect.DeepEqual(back.Meta, want.Meta) || !reflect.DeepEqual(s.Meta, want.Meta) {
			t.Errorf("%s: metadata differs:\n%+v\n%+v", path, back.Meta, want.Meta)
		}
		// The days written as they came record the totals of every
		// edge, kept by a read with a minimum of trips.
		wantTotals, _ := want.DayTotals()
		partial, err := ReadFileOptions(out, ReadOptions{MinTrips: 3})
		if err != nil {
			t.Fatal(err)
		}
		if got, ok := partial.DayTotals(); !back.totalsRecorded || !ok || !slices.Equal(got, wantTotals) {
			t.Errorf("%s: day totals recorded %t, read with a minimum %t, equal to the merge's %t", path, back.totalsRecorded, ok, slices.Equal(got, wantTotals))
		}
	}
	// The new trips' days are already in the store merged: refused, and
	// the ingest stops.
	out := filepath.Join(dir, "twice")
	if _, _, err := IngestMergeDataset(context.Background(), p, "4f2a", []Input{{Path: trips}}, opts, out, []string{filepath.Join(dir, "merged-old")}, nil); err == nil || !strings.Contains(err.Error(), "is in both store 1 and store 2") {
		t.Errorf("merge into a store that has the days: %v", err)
	}
	if _, err := os.Stat(out); !os.IsNotExist(err) {
		t.Errorf("a refused merge left %s: %v", out, err)
	}
}
