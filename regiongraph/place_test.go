package regiongraph

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"math/rand/v2"
	"os"
	"path/filepath"
	"reflect"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"
)

// placeAndAggregate places each shard into a placed-trip file and
// aggregates the files in order.
func placeAndAggregate(t *testing.T, shards []Input, opts Options) (*Store, []PlacedMeta) {
	t.Helper()
	p := gridPartition(gNX, gNY, gLon0, gLat0, gStep)
	dir := t.TempDir()
	var metas []PlacedMeta
	a, err := NewAggregator(p, "x", opts)
	if err != nil {
		t.Fatal(err)
	}
	defer a.Close()
	for i, in := range shards {
		out := filepath.Join(dir, fmt.Sprintf("shard-%d.placed.parquet", i))
		var buf bytes.Buffer
		m, _, err := PlaceTo(context.Background(), p, "x", []Input{in}, opts, &buf)
		if err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(out, buf.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
		metas = append(metas, m)
		if err := a.AddFile(out); err != nil {
			t.Fatal(err)
		}
	}
	s, err := a.Store(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	return s, metas
}

// sameStore fails unless two stores have the same metadata and edges.
func sameStore(t *testing.T, what string, got, want *Store) {
	t.Helper()
	if !reflect.DeepEqual(got.Meta, want.Meta) {
		t.Errorf("%s: metadata\n%+v\nwant\n%+v", what, got.Meta, want.Meta)
	}
	if len(got.Edges) != len(want.Edges) {
		t.Fatalf("%s: %d edges, ingest %d", what, len(got.Edges), len(want.Edges))
	}
	for i := range got.Edges {
		if got.Edges[i] != want.Edges[i] {
			t.Fatalf("%s: edge %d\n%+v\ningest\n%+v", what, i, got.Edges[i], want.Edges[i])
		}
	}
	if !bytes.Equal(got.regionsGeoJSON, want.regionsGeoJSON) {
		t.Errorf("%s: regions differ", what)
	}
}

// tripsWithRepeats is a trip table over three days of Europe/Berlin with
// exact repeats of rows and repeated trip ids with other values, besides
// the broken rows of genTrips.
func tripsWithRepeats(seed uint64, n int) (header string, rows []string) {
	rng := rand.New(rand.NewPCG(seed, seed+1))
	loc, _ := time.LoadLocation("Europe/Berlin")
	trips := genTrips(rng, n, time.Date(2024, 3, 30, 0, 0, 0, 0, loc))
	lines := strings.Split(strings.TrimSuffix(tripsCSV(trips, loc, rng), "\n"), "\n")
	header, rows = lines[0]+"\n", lines[1:]
	for i := 0; i < n/20; i++ {
		j := rng.IntN(len(rows))
		r := rows[j]
		if i%2 == 1 { // the same id, another distance
			r = r[:strings.LastIndexByte(r, ',')] + ",99999.0"
		}
		k := j + 1 + rng.IntN(len(rows)-j)
		rows = slices.Insert(rows, k, r)
	}
	return header, rows
}

// localDay is the local day of a start time as tripsCSV writes it: RFC
// 3339, local "YYYY-MM-DD HH:MM:SS" or Unix seconds.
func localDay(t *testing.T, field string, loc *time.Location) string {
	t.Helper()
	var tm time.Time
	var err error
	switch {
	case strings.Contains(field, "T"):
		tm, err = time.Parse(time.RFC3339, field)
	case strings.Contains(field, " "):
		tm, err = time.ParseInLocation(time.DateTime, field, loc)
	default:
		var sec int64
		sec, err = strconv.ParseInt(field, 10, 64)
		tm = time.Unix(sec, 0)
	}
	if err != nil {
		t.Fatalf("start time %q: %v", field, err)
	}
	return tm.In(loc).Format(time.DateOnly)
}

func berlinOptions() Options {
	o := DefaultOptions()
	o.TimeZone = "Europe/Berlin"
	o.Windows = []Window{{"all", 0, 1440}, {"am", 7 * 60, 10 * 60}, {"night", 22 * 60, 6 * 60}}
	return o
}

func TestPlaceAggregateEqualsIngest(t *testing.T) {
	n := 8000
	if testing.Short() {
		n = 2000
	}
	header, rows := tripsWithRepeats(31, n)
	dir := t.TempDir()
	write := func(name string, rows []string) Input {
		path := filepath.Join(dir, name)
		if err := os.WriteFile(path, []byte(header+strings.Join(rows, "\n")+"\n"), 0o644); err != nil {
			t.Fatal(err)
		}
		return Input{Path: path, Format: FormatTrips}
	}
	opts := berlinOptions()
	p := gridPartition(gNX, gNY, gLon0, gLat0, gStep)
	whole := write("all.csv", rows)
	ref, err := Ingest(context.Background(), p, "x", []Input{whole}, opts)
	if err != nil {
		t.Fatal(err)
	}
	if ref.Meta.Quality.Rejected[string(ReasonDuplicateRow)] == 0 || ref.Meta.Quality.Rejected[string(ReasonDuplicateTripID)] == 0 {
		t.Fatalf("test data holds no repeats: %v", ref.Meta.Quality.Rejected)
	}

	// One shard: the same store, sources included.
	one, _ := placeAndAggregate(t, []Input{whole}, opts)
	sameStore(t, "one shard", one, ref)

	// Shards by local day of the start (rows of a day keep their order;
	// unparseable rows go to the first shard): repeats are judged per
	// day, so the store is the ingest's, edge for edge.
	loc, _ := time.LoadLocation("Europe/Berlin")
	byDay := map[string][]string{}
	var days []string
	for _, r := range rows {
		d := localDay(t, strings.Split(r, ",")[1], loc)
		if _, ok := byDay[d]; !ok {
			days = append(days, d)
		}
		byDay[d] = append(byDay[d], r)
	}
	t.Run("by day", func(t *testing.T) {
		if len(days) < 3 {
			t.Fatalf("days %v: want at least three", days)
		}
		slices.Sort(days)
		var shards []Input
		for i, d := range days {
			shards = append(shards, write(fmt.Sprintf("day-%d.csv", i), byDay[d]))
		}
		got, _ := placeAndAggregate(t, shards, opts)
		want := *ref
		got.Meta.Sources, want.Meta.Sources = nil, nil
		sameStore(t, "by day", got, &want)
	})

	// Shards of random rows: the ingest of the same files in the same
	// order, whose first of two repeated rows is the same row.
	t.Run("random rows", func(t *testing.T) {
		rng := rand.New(rand.NewPCG(5, 6))
		parts := make([][]string, 5)
		for _, r := range rows {
			k := rng.IntN(len(parts))
			parts[k] = append(parts[k], r)
		}
		var shards []Input
		for i, part := range parts {
			shards = append(shards, write(fmt.Sprintf("rows-%d.csv", i), part))
		}
		want, err := Ingest(context.Background(), p, "x", shards, opts)
		if err != nil {
			t.Fatal(err)
		}
		got, metas := placeAndAggregate(t, shards, opts)
		sameStore(t, "random rows", got, want)
		// Every row is counted once: in a shard's metadata or as a
		// placed trip's outcome, and the shards' rows add up to the
		// rows read.
		var rowsOfShards int64
		for _, m := range metas {
			rowsOfShards += m.Sources[0].Rows
		}
		if rowsOfShards != int64(len(rows)) || got.Meta.Quality.Read != int64(len(rows)) {
			t.Errorf("shards hold %d rows, aggregate read %d; the file has %d", rowsOfShards, got.Meta.Quality.Read, len(rows))
		}
		// Which copy of a repeated trip id is kept depends on the order
		// of the rows, but not how many copies are dropped.
		dups := func(q Quality) int64 {
			return q.Rejected[string(ReasonDuplicateRow)] + q.Rejected[string(ReasonDuplicateTripID)]
		}
		if dups(got.Meta.Quality) != dups(ref.Meta.Quality) {
			t.Errorf("%d repeats dropped, one file %d", dups(got.Meta.Quality), dups(ref.Meta.Quality))
		}
	})
}

func TestPlaceGPSByVehicle(t *testing.T) {
	// Ten vehicles, each driving east-west runs with pauses across the
	// grid, with a repeated point and an unparseable row here and there.
	rng := rand.New(rand.NewPCG(41, 42))
	t0 := time.Date(2024, 5, 1, 6, 0, 0, 0, time.UTC)
	var all []string
	byVehicle := map[int][]string{}
	for v := 0; v < 10; v++ {
		tm := t0.Add(time.Duration(v) * time.Minute)
		for run := 0; run < 8; run++ {
			lat := gLat0 + 0.005 + rng.Float64()*(gNY*gStep-0.01)
			lon := gLon0 + 0.005 + rng.Float64()*0.02
			for i := 0; i < 12; i++ {
				row := fmt.Sprintf("car%d,%s,%.6f,%.6f", v, tm.Format(time.RFC3339), lon, lat)
				if rng.IntN(40) == 0 {
					row = fmt.Sprintf("car%d,%s,x%.6f,%.6f", v, tm.Format(time.RFC3339), lon, lat)
				}
				byVehicle[v] = append(byVehicle[v], row)
				all = append(all, row)
				if rng.IntN(30) == 0 {
					byVehicle[v] = append(byVehicle[v], row)
					all = append(all, row)
				}
				lon += 0.004 + rng.Float64()*0.004
				tm = tm.Add(time.Duration(30+rng.IntN(60)) * time.Second)
			}
			tm = tm.Add(time.Duration(10+rng.IntN(600)) * time.Minute)
		}
	}
	rng.Shuffle(len(all), func(i, j int) { all[i], all[j] = all[j], all[i] })
	dir := t.TempDir()
	write := func(name string, rows []string) Input {
		path := filepath.Join(dir, name)
		if err := os.WriteFile(path, []byte("vehicle_id,time,lon,lat\n"+strings.Join(rows, "\n")+"\n"), 0o644); err != nil {
			t.Fatal(err)
		}
		return Input{Path: path, Format: FormatPoints}
	}
	p := gridPartition(gNX, gNY, gLon0, gLat0, gStep)
	opts := DefaultOptions()
	ref, err := Ingest(context.Background(), p, "x", []Input{write("points.csv", all)}, opts)
	if err != nil {
		t.Fatal(err)
	}
	if ref.Meta.Quality.Used == 0 || ref.Meta.Quality.Rejected[string(ReasonDuplicatePoint)] == 0 || len(ref.Edges) < 10 {
		t.Fatalf("test data too thin: %+v, %d edges", ref.Meta.Quality, len(ref.Edges))
	}
	var shards []Input
	for k := 0; k < 3; k++ { // vehicles 0, 3, 6, 9 in shard 0 ...
		var rows []string
		for v := k; v < 10; v += 3 {
			rows = append(rows, byVehicle[v]...)
		}
		shards = append(shards, write(fmt.Sprintf("vehicles-%d.csv", k), rows))
	}
	got, metas := placeAndAggregate(t, shards, opts)
	want := *ref
	got.Meta.Sources, want.Meta.Sources = nil, nil
	sameStore(t, "GPS by vehicle", got, &want)
	var pointsInMeta int64
	for _, m := range metas {
		pointsInMeta += m.Quality.Read
	}
	if pointsInMeta == 0 || pointsInMeta >= ref.Meta.Quality.Read {
		t.Errorf("shard metadata counts %d points of %d: want the points outside trips only", pointsInMeta, ref.Meta.Quality.Read)
	}
}

func TestPlaceTwiceGivesTheSameBytes(t *testing.T) {
	header, rows := tripsWithRepeats(51, 3000)
	path := writeTemp(t, "shard.csv", header+strings.Join(rows, "\n")+"\n")
	p := gridPartition(gNX, gNY, gLon0, gLat0, gStep)
	var first []byte
	for i := 0; i < 2; i++ {
		var buf bytes.Buffer
		_, n, err := PlaceTo(context.Background(), p, "x", []Input{{Path: path}}, berlinOptions(), &buf)
		if err != nil {
			t.Fatal(err)
		}
		if n == 0 {
			t.Fatal("no placed trips")
		}
		if i == 0 {
			first = buf.Bytes()
		} else if !bytes.Equal(first, buf.Bytes()) {
			t.Fatal("placing the shard twice gave different files")
		}
	}
}

func TestPlaceBadInputNamesFileAndPlace(t *testing.T) {
	p := gridPartition(gNX, gNY, gLon0, gLat0, gStep)
	opts := DefaultOptions()
	opts.Strict = true
	good := "t1,2024-05-01T08:00:00Z,2024-05-01T08:10:00Z,13.01,52.01,13.05,52.01,3500\n"
	path := writeTemp(t, "shard-7.csv", tripHeader+good+good[:len(good)-5]+"35x0\n")
	_, err := Place(context.Background(), p, "x", []Input{{Path: path}}, opts, func(*PlacedTrip) error { return nil })
	var re *RowError
	if !errors.As(err, &re) || re.File != path || re.Line != 3 || re.Column != colDistance {
		t.Fatalf("error %v; want a row error at %s:3 distance_m", err, path)
	}

	// An aggregation of a file that is not a placed-trip file fails
	// naming it.
	a, err := NewAggregator(p, "x", DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	defer a.Close()
	bad := writeTemp(t, "broken.placed.parquet", "PAR1 not really")
	if err := a.AddFile(bad); err == nil || !strings.Contains(err.Error(), bad) {
		t.Fatalf("error %v; want one naming %s", err, bad)
	}

	// Shards placed with other options do not aggregate together.
	var b1, b2 bytes.Buffer
	ok := writeTemp(t, "ok.csv", tripHeader+good)
	if _, _, err := PlaceTo(context.Background(), p, "x", []Input{{Path: ok}}, DefaultOptions(), &b1); err != nil {
		t.Fatal(err)
	}
	other := DefaultOptions()
	other.MinSpeedKMH = 5
	if _, _, err := PlaceTo(context.Background(), p, "x", []Input{{Path: ok}}, other, &b2); err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	f1, f2 := filepath.Join(dir, "a.placed.parquet"), filepath.Join(dir, "b.placed.parquet")
	os.WriteFile(f1, b1.Bytes(), 0o644)
	os.WriteFile(f2, b2.Bytes(), 0o644)
	a2, _ := NewAggregator(p, "x", DefaultOptions())
	defer a2.Close()
	if err := a2.AddFile(f1); err != nil {
		t.Fatal(err)
	}
	if err := a2.AddFile(f2); err == nil || !strings.Contains(err.Error(), f2) || !strings.Contains(err.Error(), "min_speed_kmh") {
		t.Fatalf("error %v; want the second file named with its options", err)
	}
	a3, _ := NewAggregator(p, "other regions", DefaultOptions())
	defer a3.Close()
	if err := a3.AddFile(f1); err == nil || !strings.Contains(err.Error(), "other regions") {
		t.Fatalf("error %v; want the regions' hashes named", err)
	}
}

func FuzzPlacedFile(f *testing.F) {
	p := gridPartition(gNX, gNY, gLon0, gLat0, gStep)
	header, rows := tripsWithRepeats(61, 200)
	dir := f.TempDir()
	path := filepath.Join(dir, "seed.csv")
	if err := os.WriteFile(path, []byte(header+strings.Join(rows, "\n")+"\n"), 0o644); err != nil {
		f.Fatal(err)
	}
	var buf bytes.Buffer
	if _, _, err := PlaceTo(context.Background(), p, "x", []Input{{Path: path}}, berlinOptions(), &buf); err != nil {
		f.Fatal(err)
	}
	seed := buf.Bytes()
	f.Add(seed)
	f.Add(seed[:len(seed)/2])
	flipped := bytes.Clone(seed)
	flipped[len(flipped)/3] ^= 0xff
	f.Add(flipped)
	f.Add([]byte("PAR1PAR1"))
	f.Fuzz(func(t *testing.T, data []byte) {
		file := filepath.Join(t.TempDir(), "fuzz.placed.parquet")
		if err := os.WriteFile(file, data, 0o644); err != nil {
			t.Fatal(err)
		}
		var n int
		meta, err := ReadPlaced(file, nil, func(tr *PlacedTrip) error {
			n++
			if e := tr.check(MaxPlacedWindows); e != nil {
				t.Fatalf("reader handed on a trip that fails its check: %v", e)
			}
			return nil
		})
		if err != nil {
			if !strings.Contains(err.Error(), file) {
				t.Fatalf("error %q does not name the file", err)
			}
			return
		}
		if len(meta.Windows) == 0 {
			t.Fatalf("a file read without windows")
		}
	})
}

// Days written in parts, one of them twice (a retried worker), make the
// dataset the store's WriteDataset makes.
func TestDatasetInParts(t *testing.T) {
	header, rows := tripsWithRepeats(71, 3000)
	path := writeTemp(t, "trips.csv", header+strings.Join(rows, "\n")+"\n")
	p := gridPartition(gNX, gNY, gLon0, gLat0, gStep)
	s, err := Ingest(context.Background(), p, "x", []Input{{Path: path}}, berlinOptions())
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	whole := filepath.Join(dir, "whole")
	if err := s.WriteDataset(whole); err != nil {
		t.Fatal(err)
	}
	parts := filepath.Join(dir, "parts")
	staging, err := NewDatasetStaging(parts)
	if err != nil {
		t.Fatal(err)
	}
	byDay := map[Day][]Edge{}
	for _, e := range s.Edges {
		byDay[e.Day] = append(byDay[e.Day], e)
	}
	if len(byDay) < 3 {
		t.Fatalf("%d days", len(byDay))
	}
	var files []DayFile
	for day, es := range byDay { // any order
		df, err := WriteDayFile(staging, s.Meta, day, es)
		if err != nil {
			t.Fatal(err)
		}
		if _, err := WriteDayFile(staging, s.Meta, day, es); err != nil {
			t.Fatalf("writing day %s again: %v", day, err)
		}
		files = append(files, df)
	}
	if err := FinishDataset(staging, parts, s.Meta, s.RegionsGeoJSON(), files); err != nil {
		t.Fatal(err)
	}
	for _, name := range []string{ManifestName, "regions.geojson"} {
		a, _ := os.ReadFile(filepath.Join(whole, name))
		b, _ := os.ReadFile(filepath.Join(parts, name))
		if len(a) == 0 || !bytes.Equal(a, b) {
			t.Errorf("%s differs from the one WriteDataset writes", name)
		}
	}
	got, err := ReadFile(parts)
	if err != nil {
		t.Fatal(err)
	}
	sameStore(t, "parts", got, s)
	if _, err := os.Stat(staging); !os.IsNotExist(err) {
		t.Errorf("staging left behind: %v", err)
	}
}
