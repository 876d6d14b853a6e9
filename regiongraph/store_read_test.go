package regiongraph

import (
	"bytes"
	"io"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
	"time"

	"github.com/parquet-go/parquet-go"
	"github.com/parquet-go/parquet-go/format"
)

// writeLegacy writes s in the layout of the first stores (one row group,
// plain-encoded strings), with pages of about pageBytes bytes, and the
// metadata WriteParquet gives it.
func writeLegacy(t *testing.T, path string, s *Store, pageBytes int) {
	t.Helper()
	current := filepath.Join(t.TempDir(), "current.parquet")
	if err := createFile(current, s.WriteParquet); err != nil {
		t.Fatal(err)
	}
	plain := storeSchema(func(c *storeColumn) parquet.Node {
		if c.kind() == parquet.ByteArray {
			return parquet.String()
		}
		return c.node
	})
	opts := []parquet.WriterOption{plain, parquet.Compression(&parquet.Zstd), parquet.PageBufferSize(pageBytes)}
	for _, kv := range openParquetFile(t, current).Metadata().KeyValueMetadata {
		if kv.Key != metaDayTotals { // the first stores recorded none
			opts = append(opts, parquet.KeyValueMetadata(kv.Key, kv.Value))
		}
	}
	f, err := os.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	w := parquet.NewWriter(f, opts...)
	rows := make([]parquet.Row, len(s.Edges))
	for i := range s.Edges {
		rows[i] = appendRow(nil, &s.Edges[i], newStoreText(s.Meta.Windows))
	}
	if _, err := w.WriteRows(rows); err != nil {
		t.Fatal(err)
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
}

func openParquetFile(t *testing.T, path string) *parquet.File {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { f.Close() })
	fi, _ := f.Stat()
	pf, err := parquet.OpenFile(f, fi.Size())
	if err != nil {
		t.Fatal(err)
	}
	return pf
}

// columnChunk returns the named column's chunk in row group g.
func columnChunk(t *testing.T, pf *parquet.File, g int, name string) format.ColumnChunk {
	t.Helper()
	leaf, ok := pf.Schema().Lookup(name)
	if !ok {
		t.Fatalf("no column %s", name)
	}
	return pf.Metadata().RowGroups[g].Columns[leaf.ColumnIndex]
}

// keptEdges is the brute-force oracle of ReadOptions: the edges of s that
// opts selects.
func keptEdges(s *Store, opts ReadOptions) []Edge {
	var kept []Edge
	for _, e := range s.Edges {
		if e.Trips >= opts.MinTrips && (opts.Window == "" || s.Meta.WindowName(e.Window) == opts.Window) &&
			(opts.From == "" || e.Day >= testDay(opts.From)) && (opts.To == "" || e.Day <= testDay(opts.To)) {
			kept = append(kept, e)
		}
	}
	return kept
}

// TestReadFileOptionsMatchesFilter reads stores of every layout (the
// current one, one with many small row groups and pages, and the first
// stores' single row group of plain strings) in stretches of several
// sizes, and compares each selection with filtering every edge.
func TestReadFileOptionsMatchesFilter(t *testing.T) {
	s := syntheticStore(9, 30, 120, "pm", "am")
	dir := t.TempDir()
	layouts := []struct {
		name  string
		write func(path string) error
	}{
		{"current", func(path string) error { return createFile(path, s.WriteParquet) }},
		{"small row groups and pages", func(path string) error {
			return createFile(path, func(w io.Writer) error { return writeParquet(w, s, 100, parquet.PageBufferSize(512)) })
		}},
		{"first stores", func(path string) error { writeLegacy(t, path, s, 700); return nil }},
	}
	options := []ReadOptions{
		{},
		{MinTrips: 1},
		{MinTrips: 4},
		{MinTrips: 12},
		{MinTrips: 1 << 30},
		{Window: "am"},
		{From: "2024-01-03", To: "2024-01-05"},
		{From: "2024-01-08"},
		{To: "2024-01-01"},
		{From: "2024-01-04", To: "2024-01-04", Window: "pm", MinTrips: 3},
		{From: "2024-02-01"},
	}
	for _, layout := range layouts {
		path := filepath.Join(dir, strings.ReplaceAll(layout.name, " ", "-")+".parquet")
		if err := layout.write(path); err != nil {
			t.Fatal(err)
		}
		for _, opts := range options {
			want := keptEdges(s, opts)
			if reflect.DeepEqual(opts, ReadOptions{MinTrips: 4}) && (len(want) == 0 || len(want) == len(s.Edges)) {
				t.Fatalf("MinTrips 4 keeps %d of %d edges: the test store does not test the filter", len(want), len(s.Edges))
			}
			for _, stretch := range []int64{stretchRows, 333, 37, 1} {
				got, err := readFile(path, opts, stretch)
				if err != nil {
					t.Fatalf("%s, %+v, stretches of %d: %v", layout.name, opts, stretch, err)
				}
				if !reflect.DeepEqual(got.Edges, want) {
					t.Errorf("%s, %+v, stretches of %d: %d edges, filtering every edge gives %d",
						layout.name, opts, stretch, len(got.Edges), len(want))
				}
				if !reflect.DeepEqual(got.Meta, s.Meta) {
					t.Errorf("%s, %+v: meta %+v, want %+v", layout.name, opts, got.Meta, s.Meta)
				}
			}
		}
	}
}

// TestWriteParquetRowGroups writes an ingested store in row groups of at
// least 150 rows ended at a change of day, and reads it back unchanged.
func TestWriteParquetRowGroups(t *testing.T) {
	loc, _ := time.LoadLocation("Europe/Berlin")
	s := sampleStore(t, 41, time.Date(2024, 5, 2, 0, 0, 0, 0, loc), 6000)
	const groupRows = 150
	path := filepath.Join(t.TempDir(), "graphs.parquet")
	if err := createFile(path, func(w io.Writer) error { return writeParquet(w, s, groupRows) }); err != nil {
		t.Fatal(err)
	}
	back, err := ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(s, withoutTotals(t, s, back)) {
		t.Fatal("round trip through several row groups changed the store")
	}
	pf := openParquetFile(t, path)
	groups := pf.Metadata().RowGroups
	if len(groups) < 3 {
		t.Fatalf("%d row groups of %d edges", len(groups), len(s.Edges))
	}
	row := 0
	for g, rg := range groups {
		n := int(rg.NumRows)
		last := g == len(groups)-1
		switch {
		case n == 2*groupRows:
			// A day of more than 2 groupRows rows is split.
		case n < groupRows && !last:
			t.Errorf("row group %d has %d rows, want at least %d", g, n, groupRows)
		case !last && s.Edges[row+n].Day == s.Edges[row+n-1].Day:
			t.Errorf("row group %d ends inside day %s", g, s.Edges[row+n].Day)
		}
		row += n
		for _, c := range []string{"day", "window"} {
			if enc := columnChunk(t, pf, g, c).MetaData.Encoding; !strings.Contains(fmtEncodings(enc), "RLE_DICTIONARY") {
				t.Errorf("row group %d, column %s: encodings %v, want a dictionary", g, c, enc)
			}
		}
	}
	if row != len(s.Edges) {
		t.Errorf("row groups hold %d rows, the store %d", row, len(s.Edges))
	}
}

func fmtEncodings(encs []format.Encoding) string {
	var b strings.Builder
	for _, e := range encs {
		b.WriteString(e.String() + " ")
	}
	return b.String()
}

// TestReadFileFirstStores reads an ingested store in the first stores'
// layout, as the files already written hold it.
func TestReadFileFirstStores(t *testing.T) {
	loc, _ := time.LoadLocation("Europe/Berlin")
	s := sampleStore(t, 43, time.Date(2024, 6, 2, 0, 0, 0, 0, loc), 4000)
	path := filepath.Join(t.TempDir(), "graphs.parquet")
	writeLegacy(t, path, s, 1024)
	pf := openParquetFile(t, path)
	if enc := fmtEncodings(columnChunk(t, pf, 0, "day").MetaData.Encoding); strings.Contains(enc, "DICTIONARY") {
		t.Fatalf("first-store layout has day encodings %s", enc)
	}
	if oi := pf.OffsetIndexes(); len(oi) == 0 || len(oi[0].PageLocations) < 3 {
		t.Fatal("first-store layout has too few pages to test seeking")
	}
	back, err := ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if back.totalsRecorded {
		t.Error("the first stores' layout records day totals")
	}
	if !reflect.DeepEqual(s, back) {
		t.Fatal("reading the first-store layout changed the store")
	}
}

func TestReadOptionsErrors(t *testing.T) {
	path := filepath.Join(t.TempDir(), "graphs.parquet")
	if err := createFile(path, syntheticStore(2, 5, 4, "am").WriteParquet); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		opts ReadOptions
		want string
	}{
		{ReadOptions{From: "2024-1-5"}, "From day \"2024-1-5\" is not YYYY-MM-DD"},
		{ReadOptions{To: "yesterday"}, "To day \"yesterday\" is not YYYY-MM-DD"},
		{ReadOptions{Window: "night"}, "no window \"night\" in the store (it has am)"},
	} {
		if _, err := ReadFileOptions(path, c.opts); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%+v: %v, want %s", c.opts, err, c.want)
		}
	}
	// An empty store reads back as one without edges.
	empty := &Store{Meta: Meta{Quality: Quality{Rejected: map[string]int64{}}}}
	if err := createFile(path, empty.WriteParquet); err != nil {
		t.Fatal(err)
	}
	back, err := ReadFile(path)
	if err != nil || back.Edges != nil {
		t.Errorf("empty store: %v, %d edges", err, len(back.Edges))
	}
}

// FuzzReadFile reads damaged stores: an error, never a panic.
// FuzzReadFile reads a small store with bytes written over at a place
// and the file cut at a place. The fuzzer's input is the patch, not the
// whole file: new inputs minimise in a few steps, where a whole Parquet
// file (8 kB of footer and page indexes even for a handful of edges) would
// keep the fuzzer minimising for most of its time.
func FuzzReadFile(f *testing.F) {
	var buf bytes.Buffer
	if err := writeParquet(&buf, syntheticStore(2, 2, 2, "am", "pm"), 4, parquet.PageBufferSize(512)); err != nil {
		f.Fatal(err)
	}
	seed := buf.Bytes()
	f.Add(uint16(0), []byte(nil), uint16(0))
	f.Add(uint16(0), []byte(nil), uint16(len(seed)/2))
	for _, at := range []int{4, 40, 200, len(seed) / 3, len(seed) - 600, len(seed) - 20} {
		f.Add(uint16(at), []byte{0x5a}, uint16(0))
		f.Add(uint16(at), []byte{0xff, 0xff, 0xff, 0x7f}, uint16(0))
	}
	// One file per process, rewritten for each input: a folder per input
	// costs more than the read.
	path := filepath.Join(f.TempDir(), "graphs.parquet")
	f.Fuzz(func(t *testing.T, at uint16, patch []byte, cut uint16) {
		data := append([]byte(nil), seed...)
		if len(patch) > 64 {
			patch = patch[:64]
		}
		copy(data[int(at)%len(data):], patch)
		if cut > 0 {
			data = data[:int(cut)%len(data)]
		}
		if err := os.WriteFile(path, data, 0o644); err != nil {
			t.Fatal(err)
		}
		for _, opts := range []ReadOptions{{}, {MinTrips: 3, Window: "pm"}} {
			s, err := ReadFileOptions(path, opts)
			if err == nil && s == nil {
				t.Fatal("no store and no error")
			}
		}
	})
}
