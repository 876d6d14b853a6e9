package regiongraph

import (
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
	"time"

	"github.com/parquet-go/parquet-go"
)

// bruteTotals adds up the edges of s that opts selects by day and window,
// whatever their trips, one (day, window) at a time through a map: an
// oracle independent of the store's order and of totalsAdder.
func bruteTotals(s *Store, opts ReadOptions) map[[2]string]DayTotal {
	out := map[[2]string]DayTotal{}
	for _, e := range s.Edges {
		day, window := e.Day.String(), s.Meta.WindowName(e.Window)
		if opts.From != "" && day < opts.From || opts.To != "" && day > opts.To || opts.Window != "" && window != opts.Window {
			continue
		}
		k := [2]string{day, window}
		t := out[k]
		t.Day, t.Window = e.Day, e.Window
		t.Edges++
		t.Trips += int64(e.Trips)
		t.DistanceSum += e.DistanceSum
		t.StraightSum += e.StraightSum
		t.DurationSum += e.DurationSum
		out[k] = t
	}
	return out
}

// sameSum reports whether a and b agree to 12 significant digits: the
// oracle adds in another order.
func sameSum(a, b float64) bool { return math.Abs(a-b) <= 1e-12*math.Max(math.Abs(a), math.Abs(b)) }

// TestDayTotalsRecorded writes a store in both layouts and reads every
// selection from each: the day totals read are those of every edge of the
// days and window selected, whatever minimum of trips the read applied,
// against a brute-force sum; a store written without them (an earlier
// build's) has none known once a read drops edges, unless the read asks
// for the whole store then (WholeWithoutTotals), which a store with
// totals does not change.
func TestDayTotalsRecorded(t *testing.T) {
	s, file, ds := bothLayouts(t)
	days := s.Days(testWindow(s, "all"))
	legacy := filepath.Join(t.TempDir(), "legacy")
	if err := s.WriteDataset(legacy); err != nil {
		t.Fatal(err)
	}
	stripTotals(t, legacy)
	legacyFile := filepath.Join(t.TempDir(), "legacy.parquet")
	writeLegacy(t, legacyFile, s, 1<<20)
	for _, opts := range []ReadOptions{
		{}, {MinTrips: 2}, {MinTrips: 3, Window: "am"}, {MinTrips: 1 << 20},
		{From: days[1].String(), To: days[2].String()}, {MinTrips: 4, From: days[1].String()}, {To: days[0].String(), Window: "all"},
		{MinTrips: 2, Columns: []string{"trips"}},
	} {
		want := bruteTotals(s, opts)
		if len(want) == 0 {
			t.Fatalf("%+v: %d days and windows: too few to show anything", opts, len(want))
		}
		for _, path := range []string{file, ds} {
			got, err := ReadFileOptions(path, opts)
			if err != nil {
				t.Fatal(err)
			}
			totals, ok := got.DayTotals()
			if !ok || len(totals) != len(want) {
				t.Fatalf("%s %+v: known %t, %d totals, want %d", filepath.Base(path), opts, ok, len(totals), len(want))
			}
			order := edgeOrderOf(got.Meta.Windows)
			for i, tt := range totals {
				w := want[[2]string{tt.Day.String(), got.Meta.WindowName(tt.Window)}]
				if tt.Edges != w.Edges || tt.Trips != w.Trips || !sameSum(tt.DistanceSum, w.DistanceSum) ||
					!sameSum(tt.StraightSum, w.StraightSum) || !sameSum(tt.DurationSum, w.DurationSum) {
					t.Errorf("%s %+v: %+v, want %+v", filepath.Base(path), opts, tt, w)
				}
				if i > 0 && order.compareTotals(totals[i-1], tt) >= 0 {
					t.Errorf("%s %+v: totals out of store order at %d", filepath.Base(path), opts, i)
				}
			}
		}
		for _, path := range []string{legacy, legacyFile} {
			old, err := ReadFileOptions(path, opts)
			if err != nil {
				t.Fatal(err)
			}
			if _, ok := old.DayTotals(); ok != (opts.MinTrips <= 1) {
				t.Errorf("%s, no totals recorded %+v: known %t", filepath.Base(path), opts, ok)
			}
			every := opts
			every.MinTrips = 0
			all, err := ReadFileOptions(path, every)
			if err != nil {
				t.Fatal(err)
			}
			whole := opts
			whole.WholeWithoutTotals = true
			for _, p := range []string{path, ds, file} {
				got, err := ReadFileOptions(p, whole)
				if err != nil {
					t.Fatal(err)
				}
				totals, ok := got.DayTotals()
				kept := len(old.Edges) // the minimum applies
				if p == path {
					kept = len(all.Edges) // but not to a store without totals
				}
				if !ok || len(totals) != len(want) || len(got.Edges) != kept {
					t.Errorf("%s %+v, whole without totals: known %t, %d totals, want %d; %d edges kept, want %d", filepath.Base(p), whole, ok, len(totals), len(want), len(got.Edges), kept)
				}
				// A read a day at a time keeps the same edges.
				r, err := OpenDays(p, whole)
				if err != nil {
					t.Fatal(err)
				}
				if _, edges := eachDay(t, r); len(edges) != kept {
					t.Errorf("%s %+v, a day at a time: %d edges, want %d", filepath.Base(p), whole, len(edges), kept)
				}
			}
		}
	}
}

// TestDayTotalsStreamed ingests trips straight into a single file and a
// dataset, as the command does: the totals a read with a minimum of trips
// finds are those of the store ingested in memory, to the bit.
func TestDayTotalsStreamed(t *testing.T) {
	s := sampleStore(t, 7, time.Date(2024, 3, 4, 0, 0, 0, 0, mustZone(t, "Europe/Berlin")), 4000)
	want, ok := s.DayTotals()
	if !ok || len(want) < 4 {
		t.Fatalf("known %t, %d totals", ok, len(want))
	}
	dir := t.TempDir()
	file, ds := filepath.Join(dir, "graphs.parquet"), filepath.Join(dir, "graphs")
	// A merge writes each day through the writers of an ingest.
	if _, _, err := MergeDataset(ds, []*Store{s}, nil); err != nil {
		t.Fatal(err)
	}
	if err := createFile(file, s.WriteParquet); err != nil {
		t.Fatal(err)
	}
	for _, path := range []string{file, ds} {
		got, err := ReadFileOptions(path, ReadOptions{MinTrips: 3})
		if err != nil {
			t.Fatal(err)
		}
		if totals, ok := got.DayTotals(); !ok || !slices.Equal(totals, want) {
			t.Errorf("%s: known %t, equal %t", filepath.Base(path), ok, slices.Equal(totals, want))
		}
	}
}

// TestDayTotalsKeptThroughMergeAndWithout merges stores read with a
// minimum of trips, and drops edges from one: the totals stay known only
// where they still describe every edge.
func TestDayTotalsKeptThroughMergeAndWithout(t *testing.T) {
	s, file, _ := bothLayouts(t)
	want, _ := s.DayTotals()
	days := s.Days(testWindow(s, "all"))
	cut := days[len(days)/2]
	read := func(opts ReadOptions) *Store {
		t.Helper()
		opts.MinTrips = 3
		got, err := ReadFileOptions(file, opts)
		if err != nil {
			t.Fatal(err)
		}
		return got
	}
	early, late := read(ReadOptions{To: cut.AddDays(-1).String()}), read(ReadOptions{From: cut.String()})
	merged, err := Merge(late, early)
	if err != nil {
		t.Fatal(err)
	}
	if got, ok := merged.DayTotals(); !ok || !slices.Equal(got, want) {
		t.Errorf("merge of two reads with a minimum: known %t, equal to the store's %t", ok, slices.Equal(got, want))
	}
	if _, err := Merge(early, early); err == nil {
		t.Error("a store merged with itself")
	}
	if got, ok := merged.Without(func(*Edge) bool { return false }).DayTotals(); !ok || !slices.Equal(got, want) {
		t.Errorf("nothing dropped: known %t", ok)
	}
	drop := func(e *Edge) bool { return e.From == 1 }
	if _, ok := merged.Without(drop).DayTotals(); ok {
		t.Error("edges dropped from a store read with a minimum: its totals are not known")
	}
	whole := s.Without(drop)
	if got, ok := whole.DayTotals(); !ok || slices.Equal(got, want) || !slices.Equal(got, totalsOf(s.Meta.Windows, whole.Edges)) {
		t.Errorf("edges dropped from a whole store: known %t; its totals are those of the edges left", ok)
	}
	// A store made from one read with a minimum but not the other.
	if _, ok := (&Store{Meta: s.Meta, partial: true}).DayTotals(); ok {
		t.Error("a partial store without totals")
	}
	mixed, err := Merge(early, &Store{Meta: late.Meta, Edges: late.Edges, partial: true})
	if err != nil {
		t.Fatal(err)
	}
	if _, ok := mixed.DayTotals(); ok {
		t.Error("a merge with a store of unknown totals")
	}
}

// TestTotalsOfAnyOrder: the totals do not depend on the order the edges
// are given in.
func TestTotalsOfAnyOrder(t *testing.T) {
	s, _, _ := bothLayouts(t)
	want := totalsOf(s.Meta.Windows, s.Edges)
	shuffled := slices.Clone(s.Edges)
	slices.Reverse(shuffled)
	if got := totalsOf(s.Meta.Windows, shuffled); !slices.Equal(got, want) {
		t.Error("reversed edges give other totals")
	}
	if a := newTotalsAdder(s.Meta.Windows); func() bool { a.add(shuffled); return !a.outOfOrder }() {
		t.Error("reversed edges not noticed")
	}
}

// TestDayTotalsDamage refuses a dataset whose manifest's totals are
// damaged, naming the file and the day.
func TestDayTotalsDamage(t *testing.T) {
	s, _, _ := bothLayouts(t)
	day := s.Edges[0].Day.String()
	for _, c := range []struct {
		name string
		edit func(totals []any)
		opts ReadOptions
		want string
	}{
		{"trips", func(ts []any) { ts[0].(map[string]any)["trips"] = ts[0].(map[string]any)["trips"].(float64) - 1 }, ReadOptions{}, "its edges hold"},
		{"edges", func(ts []any) { ts[0].(map[string]any)["edges"] = ts[0].(map[string]any)["edges"].(float64) + 1 }, ReadOptions{MinTrips: 3}, "its totals count"},
		{"windows swapped", func(ts []any) {
			a, b := ts[0].(map[string]any), ts[1].(map[string]any)
			a["window"], b["window"] = b["window"], a["window"]
		}, ReadOptions{MinTrips: 2}, "its edges hold"},
		{"window", func(ts []any) { ts[0].(map[string]any)["window"] = "pm" }, ReadOptions{}, `no window "pm"`},
		{"negative", func(ts []any) { ts[0].(map[string]any)["duration_sum_s"] = -1 }, ReadOptions{}, "a sum is -1"},
		{"twice", func(ts []any) { ts[1].(map[string]any)["window"] = ts[0].(map[string]any)["window"] }, ReadOptions{}, "twice"},
		{"other day", func(ts []any) { ts[0].(map[string]any)["day"] = "2001-01-01" }, ReadOptions{}, `a total of day "2001-01-01"`},
	} {
		t.Run(c.name, func(t *testing.T) {
			ds := filepath.Join(t.TempDir(), "graphs")
			if err := s.WriteDataset(ds); err != nil {
				t.Fatal(err)
			}
			editManifest(t, ds, func(m map[string]any) {
				first := m["days"].([]any)[0].(map[string]any)
				if first["day"] != day {
					t.Fatalf("first day %v, want %s", first["day"], day)
				}
				totals := first["totals"].([]any)
				if len(totals) < 2 {
					t.Fatalf("%d totals on the first day", len(totals))
				}
				c.edit(totals)
			})
			_, err := ReadFileOptions(ds, c.opts)
			if err == nil || !strings.Contains(err.Error(), c.want) || !strings.Contains(err.Error(), ds) {
				t.Errorf("got %v, want %q naming %s", err, c.want, ds)
			}
		})
	}
}

// TestDayTotalsSingleFileDamage refuses a single file whose day totals
// are not those of its edges.
func TestDayTotalsSingleFileDamage(t *testing.T) {
	s, _, _ := bothLayouts(t)
	bad := *s
	bad.Edges = slices.Clone(s.Edges)
	i := slices.IndexFunc(bad.Edges, func(e Edge) bool { return e.Trips > 1 })
	bad.Edges[i].Trips-- // written with the totals of s
	totals, _ := s.DayTotals()
	text, err := dayTotalsJSON(s.Meta.Windows, totals)
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(t.TempDir(), "graphs.parquet")
	f, err := os.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	ew := newEdgeWriter(f, rowGroupRows, mustMetadata(t, &bad), bad.Meta.Windows)
	if err := ew.add(bad.Edges); err != nil {
		t.Fatal(err)
	}
	ew.pw.SetKeyValueMetadata(metaDayTotals, text)
	if err := ew.close(); err != nil {
		t.Fatal(err)
	}
	f.Close()
	if _, err := ReadFile(path); err == nil || !strings.Contains(err.Error(), "its edges hold") || !strings.Contains(err.Error(), path) {
		t.Errorf("got %v", err)
	}
	if _, err := ReadFileOptions(path, ReadOptions{MinTrips: 2}); err != nil {
		t.Errorf("a read with a minimum sees at most the totals: %v", err)
	}
}

func mustMetadata(t *testing.T, s *Store) []parquet.WriterOption {
	t.Helper()
	opts, err := storeMetadata(s)
	if err != nil {
		t.Fatal(err)
	}
	return opts
}
