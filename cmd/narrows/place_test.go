package main

import (
	"bytes"
	"fmt"
	"math/rand/v2"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"narrows/regiongraph"
)

// splitCSV writes the data rows of a CSV file into shards by key(row),
// each with the header, and returns the shard paths in key order.
func splitCSV(t *testing.T, path, dir string, keys int, key func(i int, row string) int) []string {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.SplitAfter(string(data), "\n")
	header, rows := lines[0], lines[1:]
	parts := make([]strings.Builder, keys)
	for k := range parts {
		parts[k].WriteString(header)
	}
	for i, r := range rows {
		if r != "" {
			parts[key(i, r)].WriteString(r)
		}
	}
	var out []string
	for k := range parts {
		p := filepath.Join(dir, fmt.Sprintf("%s-%02d.csv", strings.TrimSuffix(filepath.Base(path), ".csv"), k))
		if err := os.WriteFile(p, []byte(parts[k].String()), 0o644); err != nil {
			t.Fatal(err)
		}
		out = append(out, p)
	}
	return out
}

// The two halves of ingest, run shard by shard through the command line,
// give the store ingest gives, edge for edge, on the simulated town: trip
// shards cut by day and by random rows, GPS points cut by vehicle.
func TestPlaceAggregateEqualsIngestOnTheTown(t *testing.T) {
	if testing.Short() {
		t.Skip("simulation and several ingests")
	}
	dir, regions := simulatedTown(t, "--days", "4", "--trips-per-day", "2000", "--gps-every", "10", "--no-study")
	town := filepath.Join(dir, "town")
	tz := "Etc/GMT-1"
	ingest := func(t *testing.T, format, out string, files ...string) *regiongraph.Store {
		args := []string{"ingest", "--regions", regions, "--format", format, "--tz", tz, "--window", "am=07:00-10:00",
			"--window", "all=00:00-24:00", "--out", out, "--trips"}
		mustRunCLI(t, append(args, files...)...)
		s, err := regiongraph.ReadFile(out)
		if err != nil {
			t.Fatal(err)
		}
		return s
	}
	placeAll := func(t *testing.T, format string, shards []string) *regiongraph.Store {
		placed := t.TempDir()
		for _, s := range shards {
			mustRunCLI(t, "place", "--regions", regions, "--format", format, "--tz", tz, "--window", "am=07:00-10:00",
				"--window", "all=00:00-24:00", "--trips", s, "--out", placed)
		}
		out := filepath.Join(t.TempDir(), "graphs.parquet")
		mustRunCLI(t, "aggregate", "--regions", regions, "--placed", placed, "--out", out)
		s, err := regiongraph.ReadFile(out)
		if err != nil {
			t.Fatal(err)
		}
		// The dataset layout holds the same store.
		ds := filepath.Join(t.TempDir(), "graphs")
		mustRunCLI(t, "aggregate", "--regions", regions, "--placed", placed, "--out", ds)
		d, err := regiongraph.ReadFile(ds)
		if err != nil {
			t.Fatal(err)
		}
		same(t, "dataset", d, s, true)
		return s
	}
	trips := filepath.Join(town, "trips.csv")
	want := ingest(t, "trips", filepath.Join(dir, "whole.parquet"), trips)
	if want.Meta.Quality.Used < 4000 || len(want.Edges) < 200 {
		t.Fatalf("town too thin: %d trips used, %d edges", want.Meta.Quality.Used, len(want.Edges))
	}

	t.Run("trips by day", func(t *testing.T) {
		days := map[string]int{}
		shards := splitCSV(t, trips, t.TempDir(), 5, func(_ int, row string) int {
			d := strings.Split(row, ",")[1][:10] // start time, +01:00: the local day
			if _, ok := days[d]; !ok {
				days[d] = len(days)
			}
			return days[d]
		})
		if len(days) != 4 {
			t.Fatalf("%d days in the town's trips, want 4", len(days))
		}
		same(t, "by day", placeAll(t, "trips", shards[:4]), want, false)
	})
	t.Run("trips by random rows", func(t *testing.T) {
		rng := rand.New(rand.NewPCG(3, 4))
		shards := splitCSV(t, trips, t.TempDir(), 7, func(int, string) int { return rng.IntN(7) })
		same(t, "random rows", placeAll(t, "trips", shards), want, false)
	})
	t.Run("points by vehicle", func(t *testing.T) {
		points := filepath.Join(town, "points.csv")
		wantGPS := ingest(t, "points", filepath.Join(t.TempDir(), "gps.parquet"), points)
		if wantGPS.Meta.Quality.Used == 0 || len(wantGPS.Edges) < 20 {
			t.Fatalf("GPS too thin: %+v, %d edges", wantGPS.Meta.Quality, len(wantGPS.Edges))
		}
		vehicles := map[string]int{}
		shards := splitCSV(t, points, t.TempDir(), 3, func(_ int, row string) int {
			v, _, _ := strings.Cut(row, ",")
			if _, ok := vehicles[v]; !ok {
				vehicles[v] = len(vehicles)
			}
			return vehicles[v] % 3
		})
		same(t, "points by vehicle", placeAll(t, "points", shards), wantGPS, false)
	})
}

// same fails unless two stores hold the same edges and quality counts
// (and, with sources, the same sources and regions).
func same(t *testing.T, what string, got, want *regiongraph.Store, sources bool) {
	t.Helper()
	if !reflect.DeepEqual(got.Meta.Quality, want.Meta.Quality) {
		t.Errorf("%s: quality %+v\nwant %+v", what, got.Meta.Quality, want.Meta.Quality)
	}
	if got.Meta.TimeZone != want.Meta.TimeZone || !reflect.DeepEqual(got.Meta.Windows, want.Meta.Windows) ||
		got.Meta.RegionsSHA256 != want.Meta.RegionsSHA256 {
		t.Errorf("%s: metadata %+v\nwant %+v", what, got.Meta, want.Meta)
	}
	if sources && (!reflect.DeepEqual(got.Meta.Sources, want.Meta.Sources) || !bytes.Equal(got.RegionsGeoJSON(), want.RegionsGeoJSON())) {
		t.Errorf("%s: sources or regions differ", what)
	}
	if len(got.Edges) != len(want.Edges) {
		t.Fatalf("%s: %d edges, want %d", what, len(got.Edges), len(want.Edges))
	}
	for i := range got.Edges {
		if got.Edges[i] != want.Edges[i] {
			t.Fatalf("%s: edge %d %+v\nwant %+v", what, i, got.Edges[i], want.Edges[i])
		}
	}
}

// Placing a shard twice writes the same bytes; a bad row in a strict run
// fails the shard naming file and line and leaves no output.
func TestPlaceIsIdempotentAndFailsWhole(t *testing.T) {
	if testing.Short() {
		t.Skip("simulation")
	}
	dir, regions := simulatedTown(t, "--days", "1", "--trips-per-day", "500", "--no-study")
	trips := filepath.Join(dir, "town", "trips.csv")
	out := t.TempDir()
	mustRunCLI(t, "place", "--regions", regions, "--tz", "Etc/GMT-1", "--trips", trips, "--out", out)
	path := filepath.Join(out, "trips.placed.parquet")
	first, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	mustRunCLI(t, "place", "--regions", regions, "--tz", "Etc/GMT-1", "--trips", trips, "--out", out)
	again, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(first, again) {
		t.Fatal("placing the same shard twice gave different bytes")
	}

	data, _ := os.ReadFile(trips)
	lines := strings.SplitAfter(string(data), "\n")
	lines[5] = strings.Replace(lines[5], ",", ",x", 3) // line 6: a start time that does not parse
	bad := filepath.Join(t.TempDir(), "shard-9.csv")
	os.WriteFile(bad, []byte(strings.Join(lines, "")), 0o644)
	code, _, stderr := runCLI(t, "place", "--regions", regions, "--tz", "Etc/GMT-1", "--strict", "--trips", bad, "--out", out)
	if code != exitError || !strings.Contains(stderr, bad+":6:") {
		t.Fatalf("exit %d, stderr %q; want exit %d naming %s:6", code, stderr, exitError, bad)
	}
	if _, err := os.Stat(filepath.Join(out, "shard-9.placed.parquet")); !os.IsNotExist(err) {
		t.Errorf("a failed shard left its output: %v", err)
	}
	// A file that is not a placed-trip file is not replaced.
	other := filepath.Join(out, "notes.placed.parquet")
	os.WriteFile(other, []byte("mine"), 0o644)
	code, _, stderr = runCLI(t, "place", "--regions", regions, "--tz", "Etc/GMT-1", "--trips", trips, "--out", out, "--name", "notes")
	if code != exitError || !strings.Contains(stderr, "not a placed-trip file") {
		t.Fatalf("exit %d, stderr %q; want a refusal", code, stderr)
	}
}
