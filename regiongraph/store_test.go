package regiongraph

import (
	"bytes"
	"context"
	"math/rand/v2"
	"os"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/parquet-go/parquet-go"
)

func sampleStore(t *testing.T, seed uint64, day0 time.Time, n int) *Store {
	t.Helper()
	rng := rand.New(rand.NewPCG(seed, seed+1))
	loc, _ := time.LoadLocation("Europe/Berlin")
	trips := genTrips(rng, n, day0)
	opts := DefaultOptions()
	opts.TimeZone = "Europe/Berlin"
	opts.Windows = []Window{{"all", 0, 1440}, {"am", 420, 600}}
	s, err := ingestString(t, gridPartition(gNX, gNY, gLon0, gLat0, gStep), FormatTrips, tripsCSV(trips, loc, rng), opts)
	if err != nil {
		t.Fatal(err)
	}
	s.Meta.RegionsSHA256 = "4f2a"
	return s
}

func TestStoreRoundTrip(t *testing.T) {
	loc, _ := time.LoadLocation("Europe/Berlin")
	s := sampleStore(t, 31, time.Date(2024, 1, 10, 0, 0, 0, 0, loc), 5000)
	if len(s.Edges) < 100 {
		t.Fatalf("only %d edges", len(s.Edges))
	}
	path := filepath.Join(t.TempDir(), "graphs.parquet")
	if err := createFile(path, s.WriteParquet); err != nil {
		t.Fatal(err)
	}
	back, err := ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(s, withoutTotals(t, s, back)) {
		t.Fatalf("round trip changed the store:\n%+v\n%+v", s.Meta, back.Meta)
	}
	// The store carries its regions.
	regions, err := back.Regions()
	if err != nil {
		t.Fatal(err)
	}
	grid := gridPartition(gNX, gNY, gLon0, gLat0, gStep)
	if len(regions.Regions) != len(grid.Regions) {
		t.Fatalf("%d regions in the store, %d ingested", len(regions.Regions), len(grid.Regions))
	}
	for i, r := range regions.Regions {
		if r.ID != grid.Regions[i].ID || !reflect.DeepEqual(r.Polygon, grid.Regions[i].Polygon) {
			t.Fatalf("region %d: %+v, ingested %+v", i, r, grid.Regions[i])
		}
	}
	if _, err := (&Store{}).Regions(); err == nil || !strings.Contains(err.Error(), "no regions") {
		t.Errorf("store without regions: %v", err)
	}
	// Deterministic bytes: writing again gives the same file.
	path2 := filepath.Join(t.TempDir(), "again.parquet")
	if err := createFile(path2, back.WriteParquet); err != nil {
		t.Fatal(err)
	}
	a, _ := os.ReadFile(path)
	b, _ := os.ReadFile(path2)
	if !bytes.Equal(a, b) {
		t.Error("writing the same store twice gave different bytes")
	}
	// Plain column types that other tools read as they are.
	f, _ := os.Open(path)
	defer f.Close()
	fi, _ := f.Stat()
	pf, err := parquet.OpenFile(f, fi.Size())
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct{ name, kind string }{{"day", "BYTE_ARRAY"}, {"from_region", "INT32"}, {"trips", "INT64"}, {"speed_median_mps", "DOUBLE"}} {
		leaf, ok := pf.Schema().Lookup(c.name)
		if !ok || leaf.Node.Type().Kind().String() != c.kind {
			t.Errorf("column %s: %v, want %s", c.name, leaf.Node, c.kind)
		}
	}
	if lt := func() string { l, _ := pf.Schema().Lookup("day"); return l.Node.Type().LogicalType().String() }(); lt != "STRING" {
		t.Errorf("day logical type %q, want STRING", lt)
	}
	for _, key := range []string{"regions_sha256", "time_zone", "windows", "quality", "sources", "schema_version"} {
		if _, ok := pf.Lookup(key); !ok {
			t.Errorf("metadata %q missing", key)
		}
	}
	if v, _ := pf.Lookup("windows"); v != `[{"name":"all","start":"00:00","end":"24:00"},{"name":"am","start":"07:00","end":"10:00"}]` {
		t.Errorf("windows metadata %s", v)
	}
}

func TestReadFileRejectsOtherFiles(t *testing.T) {
	for name, content := range map[string]string{"text.parquet": "day,window\n", "empty.parquet": ""} {
		path := writeTemp(t, name, content)
		if _, err := ReadFile(path); err == nil || !strings.Contains(err.Error(), name) {
			t.Errorf("%s: %v", name, err)
		}
	}
	// A Parquet file without the store metadata.
	path := filepath.Join(t.TempDir(), "other.parquet")
	type row struct {
		A int64 `parquet:"a"`
	}
	if err := parquet.WriteFile(path, []row{{1}}); err != nil {
		t.Fatal(err)
	}
	if _, err := ReadFile(path); err == nil || !strings.Contains(err.Error(), "not a day-graph store") {
		t.Errorf("foreign parquet: %v", err)
	}
}

func TestMergeKeepsEveryValue(t *testing.T) {
	loc, _ := time.LoadLocation("Europe/Berlin")
	rng := rand.New(rand.NewPCG(41, 42))
	jan := genTrips(rng, 4000, time.Date(2024, 1, 29, 0, 0, 0, 0, loc)) // Jan 29-31
	feb := genTrips(rng, 4000, time.Date(2024, 2, 1, 0, 0, 0, 0, loc))  // Feb 1-3
	p := gridPartition(gNX, gNY, gLon0, gLat0, gStep)
	opts := DefaultOptions()
	opts.TimeZone = "Europe/Berlin"
	dir := t.TempDir()
	write := func(name string, trips []genTrip) string {
		path := filepath.Join(dir, name)
		if err := os.WriteFile(path, []byte(tripsCSV(trips, loc, rng)), 0o644); err != nil {
			t.Fatal(err)
		}
		return path
	}
	janPath, febPath := write("jan.csv", jan), write("feb.csv", feb)
	// The two months' trip ids differ, as in one system's exports (ids
	// repeated across the files would be duplicates of one ingest).
	if text, err := os.ReadFile(febPath); err != nil {
		t.Fatal(err)
	} else if err := os.WriteFile(febPath, []byte(strings.ReplaceAll(string(text), "\nt", "\nfeb-t")), 0o644); err != nil {
		t.Fatal(err)
	}
	ingest := func(paths ...string) *Store {
		var in []Input
		for _, p := range paths {
			in = append(in, Input{Path: p})
		}
		s, err := Ingest(context.Background(), p, "r", in, opts)
		if err != nil {
			t.Fatal(err)
		}
		return s
	}
	a, b, both := ingest(janPath), ingest(febPath), ingest(janPath, febPath)

	// Through files, as the command line does it.
	pa, pb := filepath.Join(dir, "a.parquet"), filepath.Join(dir, "b.parquet")
	if err := createFile(pa, a.WriteParquet); err != nil {
		t.Fatal(err)
	}
	if err := createFile(pb, b.WriteParquet); err != nil {
		t.Fatal(err)
	}
	ra, err := ReadFile(pa)
	if err != nil {
		t.Fatal(err)
	}
	rb, err := ReadFile(pb)
	if err != nil {
		t.Fatal(err)
	}
	merged, err := Merge(ra, rb)
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(merged, both) {
		t.Fatalf("merge of January and February differs from one ingest of both:\n%+v\n%+v", merged.Meta, both.Meta)
	}
	checkQuality(t, merged.Meta.Quality)
	if days := merged.Days(testWindow(merged, "all")); len(days) != 6 || days[0] != testDay("2024-01-29") || days[5] != testDay("2024-02-03") {
		t.Errorf("days %v", days)
	}
	if names := merged.WindowNames(); !reflect.DeepEqual(names, []string{"all"}) {
		t.Errorf("windows %v", names)
	}

	// Conflicts.
	if _, err := Merge(a, a); err == nil || !strings.Contains(err.Error(), "is in both store 1 and store 2") {
		t.Errorf("overlapping days: %v", err)
	}
	other := *b
	other.Meta.RegionsSHA256 = "different"
	if _, err := Merge(a, &other); err == nil || !strings.Contains(err.Error(), "other regions") {
		t.Errorf("regions: %v", err)
	}
	other = *b
	other.Meta.TimeZone = "UTC"
	if _, err := Merge(a, &other); err == nil || !strings.Contains(err.Error(), "time zone") {
		t.Errorf("time zone: %v", err)
	}
	other = *b
	other.Meta.Windows = []Window{{"am", 420, 600}}
	if _, err := Merge(a, &other); err == nil || !strings.Contains(err.Error(), "windows") {
		t.Errorf("windows: %v", err)
	}
	if _, err := Merge(); err == nil {
		t.Error("merge of nothing succeeded")
	}
}

func TestParquetTripTable(t *testing.T) {
	// The same trips as CSV and as Parquet (with TIMESTAMP, Unix seconds and
	// text time columns) give the same edges.
	rng := rand.New(rand.NewPCG(51, 52))
	trips := genTrips(rng, 3000, time.Date(2024, 6, 1, 0, 0, 0, 0, time.UTC))
	type tsRow struct {
		TripID   string    `parquet:"trip_id"`
		Start    time.Time `parquet:"start_time,timestamp(millisecond)"`
		End      int64     `parquet:"end_time"`
		StartLon float64   `parquet:"start_lon"`
		StartLat float64   `parquet:"start_lat"`
		EndLon   float32   `parquet:"end_lon"`
		EndLat   float64   `parquet:"end_lat"`
		Distance float64   `parquet:"distance_m"`
	}
	var rows []tsRow
	var csv strings.Builder
	csv.WriteString(tripHeader)
	for i, tr := range trips {
		if tr.bad != "" {
			continue
		}
		endLon := float32(tr.d[0])
		rows = append(rows, tsRow{TripID: "t", Start: tr.start.UTC(), End: tr.end.Unix(), StartLon: tr.o[0], StartLat: tr.o[1],
			EndLon: endLon, EndLat: tr.d[1], Distance: tr.distance})
		csv.WriteString("t" + strconv.Itoa(i) + "," + tr.start.UTC().Format(time.RFC3339) + "," + tr.end.UTC().Format(time.RFC3339) + "," +
			fmtF(tr.o[0]) + "," + fmtF(tr.o[1]) + "," + fmtF(float64(endLon)) + "," + fmtF(tr.d[1]) + "," + fmtF(tr.distance) + "\n")
	}
	path := filepath.Join(t.TempDir(), "trips.parquet")
	if err := parquet.WriteFile(path, rows); err != nil {
		t.Fatal(err)
	}
	p := gridPartition(gNX, gNY, gLon0, gLat0, gStep)
	fromParquet, err := Ingest(context.Background(), p, "", []Input{{Path: path}}, DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	fromCSV, err := ingestString(t, p, FormatTrips, csv.String(), DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("parquet: %d rows, %d used, %d edges", len(rows), fromParquet.Meta.Quality.Used, len(fromParquet.Edges))
	if fromParquet.Meta.Quality.Used < 500 || fromParquet.Meta.Quality.Read != int64(len(rows)) || !reflect.DeepEqual(fromParquet.Edges, fromCSV.Edges) ||
		!reflect.DeepEqual(fromParquet.Meta.Quality, fromCSV.Meta.Quality) {
		t.Fatalf("parquet and csv differ: %+v vs %+v", fromParquet.Meta.Quality, fromCSV.Meta.Quality)
	}

	// Missing column in a Parquet table.
	type short struct {
		A string `parquet:"trip_id"`
	}
	bad := filepath.Join(t.TempDir(), "short.parquet")
	if err := parquet.WriteFile(bad, []short{{"x"}}); err != nil {
		t.Fatal(err)
	}
	if _, err := Ingest(context.Background(), p, "", []Input{{Path: bad}}, DefaultOptions()); err == nil ||
		!strings.Contains(err.Error(), `missing column "start_time"`) {
		t.Errorf("short parquet: %v", err)
	}
}

func fmtF(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
