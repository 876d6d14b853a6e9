package main

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"narrows/patterns"
	"narrows/regiongraph"
)

// The town ingested as one Parquet file and as a dataset folder gives the
// same store, edge for edge, and the same scan findings and comparison
// map layer; an ingest that merges a dataset and a single-file store into
// a dataset gives the store of one ingest of all the trips.
func TestDatasetLayoutEqualsSingleFile(t *testing.T) {
	if testing.Short() {
		t.Skip("simulation and several ingests")
	}
	dir, regions := simulatedTown(t, "--days", "28", "--trips-per-day", "3000", "--no-study")
	trips := filepath.Join(dir, "town", "trips.csv")
	ingest := []string{"ingest", "--regions", regions, "--tz", "Etc/GMT-1", "--window", "all=00:00-24:00", "--window", "am=07:00-10:00"}
	file := filepath.Join(dir, "graphs.parquet")
	ds := filepath.Join(dir, "graphs")
	mustRunCLI(t, append(ingest, "--trips", trips, "--out", file)...)
	mustRunCLI(t, append(ingest, "--trips", trips, "--out", ds)...)
	if _, err := os.Stat(filepath.Join(ds, regiongraph.ManifestName)); err != nil {
		t.Fatalf("--out without .parquet wrote no dataset: %v", err)
	}
	a, err := regiongraph.ReadFile(file)
	if err != nil {
		t.Fatal(err)
	}
	b, err := regiongraph.ReadFile(ds)
	if err != nil {
		t.Fatal(err)
	}
	if len(a.Edges) == 0 || !reflect.DeepEqual(a, b) {
		t.Fatalf("single file %d edges, dataset %d; equal: %t", len(a.Edges), len(b.Edges), reflect.DeepEqual(a, b))
	}

	same := func(name string, args ...string) {
		t.Helper()
		var outs [2][]byte
		for i, g := range []string{file, ds} {
			out := filepath.Join(dir, name+[]string{"-file", "-dataset"}[i])
			mustRunCLI(t, append(append([]string{}, args...), "--graphs", g, "--out", out+map[bool]string{true: ".json", false: ".xlsx"}[args[0] == "scan"])...)
			read := out + ".json"
			if args[0] != "scan" {
				read = out + "-findings.geojson"
			}
			var err error
			if outs[i], err = os.ReadFile(read); err != nil {
				t.Fatal(err)
			}
		}
		if len(outs[0]) < 50 || string(outs[0]) != string(outs[1]) {
			t.Errorf("%s: the layouts give different findings (%d and %d bytes)", name, len(outs[0]), len(outs[1]))
		}
	}
	// The analysis reads only patterns.StoreColumns: a scan and a
	// comparison of the store so read equal those of every column.
	regionsP, err := b.Regions()
	if err != nil {
		t.Fatal(err)
	}
	some, err := regiongraph.ReadFileOptions(ds, regiongraph.ReadOptions{Columns: patterns.StoreColumns()})
	if err != nil {
		t.Fatal(err)
	}
	if reflect.DeepEqual(some.Edges, b.Edges) {
		t.Fatal("reading some columns gave every value: nothing tested")
	}
	sopts := patterns.DefaultScanOptions()
	sopts.Skyline.MinTrips, sopts.Support = 5, 0.3
	before, after := sopts, sopts
	before.From, before.To, after.From, after.To = "2026-03-02", "2026-03-15", "2026-03-16", "2026-03-29"
	var results [2][2]any
	for i, st := range []*regiongraph.Store{b, some} {
		scan, err := patterns.ScanStore(context.Background(), st, sopts)
		if err != nil {
			t.Fatal(err)
		}
		cmp, err := patterns.Compare(context.Background(), st, regionsP, before, after, patterns.DefaultCompareOptions())
		if err != nil {
			t.Fatal(err)
		}
		results[i] = [2]any{
			[]any{scan.Days, scan.CandidatesPerDay, scan.Findings, fmt.Sprint(scan.EdgeDaily)},
			[]any{cmp.Assessments, cmp.Counts, cmp.Network, cmp.BarSpeed, cmp.PoolSize, cmp.Before.Findings, cmp.After.Findings, fmt.Sprint(cmp.After.EdgeDaily)},
		}
	}
	// Compared as text (DeepEqual would also compare the NaN of an
	// undefined statistic, never equal to itself).
	var texts [2][]byte
	for i, r := range results {
		texts[i] = []byte(fmt.Sprintf("%+v", r))
	}
	if len(texts[0]) < 1000 || string(texts[0]) != string(texts[1]) {
		t.Errorf("scan or comparison differs when only patterns.StoreColumns are read (%d and %d bytes of JSON)", len(texts[0]), len(texts[1]))
	}

	same("scan", "scan", "--min-trips", "5", "--support", "0.3")
	same("scan-period", "scan", "--min-trips", "5", "--support", "0.3", "--from", "2026-03-09", "--to", "2026-03-22")
	same("compare", "compare", "--min-trips", "5", "--support", "0.3", "--before", "2026-03-02..2026-03-15", "--after", "2026-03-16..2026-03-29")

	// Merge: the first fortnight's trips as a dataset, the second's as a
	// file, merged into a dataset, equal the store of all trips but for
	// the sources.
	data, err := os.ReadFile(trips)
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.SplitAfter(string(data), "\n")
	var first, second strings.Builder
	first.WriteString(lines[0])
	second.WriteString(lines[0])
	for _, l := range lines[1:] {
		if strings.Contains(l, "2026-03-0") || strings.Contains(l, "2026-03-1") {
			first.WriteString(l)
		} else {
			second.WriteString(l)
		}
	}
	t1, t2 := filepath.Join(dir, "first.csv"), filepath.Join(dir, "second.csv")
	os.WriteFile(t1, []byte(first.String()), 0o644)
	os.WriteFile(t2, []byte(second.String()), 0o644)
	part := filepath.Join(dir, "part1")
	mustRunCLI(t, append(ingest, "--trips", t1, "--out", part)...)
	merged := filepath.Join(dir, "merged")
	if code, _, stderr := runCLI(t, append(ingest, "--trips", t2, "--merge", part, "--merge", file, "--out", merged)...); code == exitOK || !strings.Contains(stderr, "is in both") {
		t.Errorf("merging the whole store with its halves: exit %d, %s", code, stderr)
	}
	code, _, stderr := runCLI(t, append(ingest, "--trips", t2, "--merge", part, "--out", merged+"2")...)
	if code != exitOK {
		t.Fatalf("merge of two halves: %s", stderr)
	}
	m, err := regiongraph.ReadFile(merged + "2")
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(m.Edges, a.Edges) || m.Meta.Quality.Used != a.Meta.Quality.Used || len(m.Meta.Sources) != 2 {
		t.Errorf("merged halves: %d edges, %d used, %d sources; whole: %d edges, %d used", len(m.Edges), m.Meta.Quality.Used, len(m.Meta.Sources), len(a.Edges), a.Meta.Quality.Used)
	}
	// The store of the whole holds every day of the halves: merging it
	// too is refused, naming a day.
	if _, err := os.Stat(merged); err == nil {
		t.Errorf("a refused merge left %s", merged)
	}
}
