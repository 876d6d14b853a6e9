package regiongraph

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"reflect"
	"slices"
	"strings"
	"testing"
)

// TestDatasetMatchesSingleFile writes one store in both layouts and reads
// every selection from each: the dataset must give the single file's
// store, edge for edge, and both must equal filtering every edge.
func TestDatasetMatchesSingleFile(t *testing.T) {
	s, file, ds := bothLayouts(t)
	whole, err := ReadFile(ds)
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(s, withoutTotals(t, s, whole)) {
		t.Fatalf("dataset round trip changed the store:\n%+v\n%+v", s.Meta, whole.Meta)
	}
	days := s.Days(testWindow(s, "all"))
	for _, opts := range []ReadOptions{
		{}, {MinTrips: 2}, {MinTrips: 3, Window: "am"},
		{From: days[1].String(), To: days[2].String()}, {MinTrips: 2, From: days[1].String()}, {To: days[0].String(), Window: "all"},
		{From: "2030-01-01"}, {MinTrips: 1 << 20},
		{MinTrips: 2, Columns: []string{"speed_median_mps", "duration_sum_s"}}, {Columns: []string{}},
	} {
		a, err := ReadFileOptions(file, opts)
		if err != nil {
			t.Fatal(err)
		}
		b, err := ReadFileOptions(ds, opts)
		if err != nil {
			t.Fatal(err)
		}
		want := keptEdges(s, opts)
		if opts.Columns != nil {
			// The columns not named stay zero.
			for i := range want {
				e := &want[i]
				for c := storeTrips + 1; c < numStoreColumns; c++ {
					if !slices.Contains(opts.Columns, storeColumns[c].name) {
						*storeColumns[c].double(e) = 0
					}
				}
			}
			if len(want) == 0 || want[0].SpeedP25 != 0 || want[0].Trips == 0 {
				t.Fatalf("%+v: the test selects no columns", opts)
			}
		}
		if !slices.Equal(a.Edges, want) || !slices.Equal(b.Edges, want) {
			t.Errorf("%+v: file %d edges, dataset %d, filter %d", opts, len(a.Edges), len(b.Edges), len(want))
		}
		if !reflect.DeepEqual(a.Meta, b.Meta) {
			t.Errorf("%+v: metadata differs", opts)
		}
	}
	first, last, err := ReadDayRange(ds)
	if err != nil || first != days[0].String() || last != s.Edges[len(s.Edges)-1].Day.String() {
		t.Errorf("ReadDayRange(dataset) = %s, %s, %v", first, last, err)
	}
	// The hive layout: one file per day, named by its day.
	for _, d := range days {
		if _, err := os.Stat(filepath.Join(ds, "day="+d.String(), "part-0.parquet")); err != nil {
			t.Error(err)
		}
	}
}

// TestDatasetReadsOnlyItsDays reads a month of a year's dataset with a
// minimum of trips and counts the files opened and the bytes read.
func TestDatasetReadsOnlyItsDays(t *testing.T) {
	s := syntheticStore(365, 40, 60, "am", "pm")
	ds := filepath.Join(t.TempDir(), "year")
	if err := s.WriteDataset(ds); err != nil {
		t.Fatal(err)
	}
	var total int64
	for _, d := range s.Days(testWindow(s, "am")) {
		fi, err := os.Stat(filepath.Join(ds, filepath.FromSlash(dayFileName(d.String()))))
		if err != nil {
			t.Fatal(err)
		}
		total += fi.Size()
	}
	read := func(ds string, s *Store, opts ReadOptions) (*Store, *readCounter) {
		t.Helper()
		opts.counter = new(readCounter)
		got, err := ReadFileOptions(ds, opts)
		if err != nil {
			t.Fatal(err)
		}
		if want := keptEdges(s, opts); !slices.Equal(got.Edges, want) {
			t.Fatalf("%+v: %d edges, want %d", opts, len(got.Edges), len(want))
		}
		return got, opts.counter
	}
	_, year := read(ds, s, ReadOptions{})
	if year.files.Load() != 365 {
		t.Errorf("the whole year opened %d files, want 365", year.files.Load())
	}
	_, month := read(ds, s, ReadOptions{From: "2024-03-01", To: "2024-03-30"})
	if month.files.Load() != 30 {
		t.Errorf("30 days opened %d files, want 30", month.files.Load())
	}
	// The month's share of the bytes, with slack for the files' sizes
	// and their footers, read in both passes of the reader.
	if b := month.bytes.Load(); b > total*30/365*2 || b > year.bytes.Load()/6 {
		t.Errorf("30 days read %d bytes of %d", b, total)
	}
	// A day at a time (the scan's read), the month opens its 30 files
	// once each and reads at most the whole read's bytes of them.
	byDay := ReadOptions{From: "2024-03-01", To: "2024-03-30", counter: new(readCounter)}
	r, err := OpenDays(ds, byDay)
	if err != nil {
		t.Fatal(err)
	}
	if _, edges := eachDay(t, r); !slices.Equal(edges, keptEdges(s, byDay)) {
		t.Errorf("the month a day at a time: %d edges, want %d", len(edges), len(keptEdges(s, byDay)))
	}
	if n, b := byDay.counter.files.Load(), byDay.counter.bytes.Load(); n != 30 || b > month.bytes.Load() {
		t.Errorf("the month a day at a time opened %d files, read %d bytes (the whole read %d)", n, b, month.bytes.Load())
	}
	// With a minimum of trips, pages of the trips column under it are
	// skipped and the other columns read only where an edge is kept: days
	// of 10,000 edges in pages of about 500 values.
	s = syntheticStore(3, 200, 5000, "am", "pm")
	ds = filepath.Join(t.TempDir(), "days")
	if err := s.writeDataset(ds, 4096); err != nil {
		t.Fatal(err)
	}
	_, all := read(ds, s, ReadOptions{})
	_, some := read(ds, s, ReadOptions{MinTrips: 8})
	if b := some.bytes.Load(); b > all.bytes.Load()/3 {
		t.Errorf("min trips 8 read %d bytes, every edge %d", b, all.bytes.Load())
	}
	t.Logf("bytes read: year %d, month %d; all %d, min trips 8 %d", year.bytes.Load(), month.bytes.Load(), all.bytes.Load(), some.bytes.Load())
}

// TestDatasetDamage: a dataset whose writing did not finish or whose files
// were changed is an error naming the path.
func TestDatasetDamage(t *testing.T) {
	s := syntheticStore(5, 20, 50, "am")
	days := s.Days(testWindow(s, "am"))
	cases := []struct {
		name   string
		damage func(ds string) error
		want   string
	}{
		{"no manifest", func(ds string) error { return os.Remove(filepath.Join(ds, ManifestName)) }, "without manifest.json"},
		{"missing day", func(ds string) error { return os.RemoveAll(filepath.Join(ds, "day="+days[2].String())) }, "day=" + days[2].String() + "/part-0.parquet is missing"},
		{"cut day", func(ds string) error {
			p := filepath.Join(ds, filepath.FromSlash(dayFileName(days[1].String())))
			fi, _ := os.Stat(p)
			return os.Truncate(p, fi.Size()/2)
		}, "cut short"},
		{"bad manifest", func(ds string) error {
			return os.WriteFile(filepath.Join(ds, ManifestName), []byte(`{"format":"narrows day-graph dataset","schema_version":1,"days":[{"day":"2024-01-01","file":"../x","edges":1,"bytes":20}]}`), 0o644)
		}, "want \"day=2024-01-01/part-0.parquet\""},
		{"regions changed", func(ds string) error {
			return os.WriteFile(filepath.Join(ds, datasetRegionsName), []byte("{}"), 0o644)
		}, "regions.geojson: 2 bytes"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			ds := filepath.Join(t.TempDir(), "graphs")
			s.regionsGeoJSON = []byte(`{"type":"FeatureCollection","features":[]}`)
			if err := s.WriteDataset(ds); err != nil {
				t.Fatal(err)
			}
			if err := c.damage(ds); err != nil {
				t.Fatal(err)
			}
			_, err := ReadFile(ds)
			if err == nil || !strings.Contains(err.Error(), c.want) || !strings.Contains(err.Error(), ds) {
				t.Fatalf("got %v, want an error naming %s with %q", err, ds, c.want)
			}
			// Read a day at a time: refused when opened or when the day is reached.
			r, err := OpenDays(ds, ReadOptions{})
			if err == nil {
				err = r.Each(context.Background(), func(Day, []Edge) error { return nil })
			}
			if err == nil || !strings.Contains(err.Error(), c.want) || !strings.Contains(err.Error(), ds) {
				t.Fatalf("a day at a time: got %v, want an error naming %s with %q", err, ds, c.want)
			}
		})
	}
}

// TestDatasetWriterAtomic: nothing is at the path until Close; Abort
// leaves the dataset that was there; a directory of other files is not
// replaced.
func TestDatasetWriterAtomic(t *testing.T) {
	s := syntheticStore(3, 20, 50, "am")
	dir := t.TempDir()
	ds := filepath.Join(dir, "graphs")
	dw, err := CreateDataset(ds, s.Meta, nil)
	if err != nil {
		t.Fatal(err)
	}
	if err := dw.WriteDay(s.Edges[0].Day, s.Edges[:10]); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(ds); !os.IsNotExist(err) {
		t.Fatalf("the dataset is visible before Close: %v", err)
	}
	if err := dw.WriteDay(testDay("2023-01-01"), nil); err == nil {
		t.Error("a day before the last written was accepted")
	}
	dw.Abort()
	entries, _ := os.ReadDir(dir)
	if len(entries) != 0 {
		t.Fatalf("Abort left %v", entries)
	}
	if err := s.WriteDataset(ds); err != nil {
		t.Fatal(err)
	}
	dw, err = CreateDataset(ds, s.Meta, nil)
	if err != nil {
		t.Fatal(err)
	}
	dw.Abort()
	back, err := ReadFile(ds)
	if err != nil || len(back.Edges) != len(s.Edges) {
		t.Fatalf("after an aborted rewrite: %v", err)
	}
	// Replacing a dataset leaves only the new one.
	if err := (&Store{Meta: s.Meta}).WriteDataset(ds); err != nil {
		t.Fatal(err)
	}
	if back, err = ReadFile(ds); err != nil || len(back.Edges) != 0 {
		t.Fatalf("replaced dataset: %d edges, %v", len(back.Edges), err)
	}
	if entries, _ = os.ReadDir(dir); len(entries) != 1 {
		t.Fatalf("replacing left %v", entries)
	}
	other := filepath.Join(dir, "other")
	os.Mkdir(other, 0o755)
	os.WriteFile(filepath.Join(other, "notes.txt"), []byte("x"), 0o644)
	if _, err := CreateDataset(other, s.Meta, nil); err == nil || !strings.Contains(err.Error(), "refusing") {
		t.Errorf("a directory of other files: %v", err)
	}
}

// FuzzManifest: no manifest makes the parser panic, and one it accepts
// lists distinct ascending days whose files are inside the dataset, and
// day totals, when it records them, in store order adding up to each
// day's edges.
func FuzzManifest(f *testing.F) {
	s := syntheticStore(3, 10, 20, "am", "pm")
	ds := filepath.Join(f.TempDir(), "graphs")
	if err := s.WriteDataset(ds); err != nil {
		f.Fatal(err)
	}
	good, err := os.ReadFile(filepath.Join(ds, ManifestName))
	if err != nil {
		f.Fatal(err)
	}
	f.Add(good)
	f.Add([]byte(`{"format":"narrows day-graph dataset","schema_version":1,"days":[]}`))
	f.Add([]byte(`{"format":"narrows day-graph dataset","schema_version":1,"windows":[{"name":"x","start":"25:00","end":"01:00"}]}`))
	f.Add([]byte(`{} {}`))
	f.Add(bytes.ReplaceAll(good, []byte(`"trips": `), []byte(`"trips": 1e400`)))
	f.Fuzz(func(t *testing.T, data []byte) {
		m, meta, err := parseManifest("manifest.json", data)
		if err != nil {
			if !strings.HasPrefix(err.Error(), "regiongraph: manifest.json: ") {
				t.Fatalf("error without the path: %v", err)
			}
			return
		}
		for i, d := range m.Days {
			if d.File != "day="+d.Day+"/part-0.parquet" || (i > 0 && d.Day <= m.Days[i-1].Day) {
				t.Fatalf("accepted day %+v", d)
			}
		}
		if !m.totalsRecorded {
			return
		}
		order := edgeOrderOf(meta.Windows)
		edges := map[Day]int64{}
		for i, tt := range m.totals {
			if i > 0 && order.compareTotals(m.totals[i-1], tt) >= 0 {
				t.Fatalf("totals out of order at %d", i)
			}
			edges[tt.Day] += tt.Edges
		}
		for _, d := range m.Days {
			if day, _ := ParseDay(d.Day); edges[day] != d.Edges {
				t.Fatalf("day %s: totals count %d edges, the day %d", d.Day, edges[day], d.Edges)
			}
		}
	})
}
