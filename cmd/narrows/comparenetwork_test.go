package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"narrows/regiongraph"
)

// TestCompareNetworkCountsEveryPair runs the link scenario's study, then
// the compare command on the study's store with the study's settings: the
// network's change must read the same, since it counts every pair with
// trips, also those under the scan's minimum (the study holds its store in
// memory; the command reads it from the file, dropping the pairs under the
// minimum, and takes the network's totals from the store's day totals).
// A dataset written before day totals, which records none, must read the
// same too.
func TestCompareNetworkCountsEveryPair(t *testing.T) {
	if testing.Short() {
		t.Skip("simulation of eight weeks and a whole study")
	}
	dir := t.TempDir()
	mustRunCLI(t, "simulate", "--scenario", "link", "--out", dir)
	network := func(out string) string {
		t.Helper()
		for _, line := range strings.Split(out, "\n") {
			if strings.HasPrefix(line, "Across the network,") {
				return line
			}
		}
		t.Fatalf("no network line in:\n%s", out)
		return ""
	}
	want := network(mustRunCLI(t, "run", filepath.Join(dir, "study.toml")))
	file := filepath.Join(dir, "out", "steps", "graphs.parquet")
	old := filepath.Join(dir, "old")
	writeWithoutTotals(t, file, old)
	for _, graphs := range []string{file, old} {
		got := network(mustRunCLI(t, "compare", "--graphs", graphs,
			"--before", "2026-03-02..2026-03-29", "--after", "2026-03-30..2026-04-26",
			"--min-trips", "10", "--days", "weekdays", "--support", "0.3", "--focus", "0.86049,0.64426@800",
			"--out", filepath.Join(dir, "compare-"+filepath.Base(graphs), "report.xlsx")))
		if got != want {
			t.Errorf("compare command on %s:\n%s\nthe study:\n%s", filepath.Base(graphs), got, want)
		}
	}
}

// writeWithoutTotals writes the store at path as a dataset at dir whose
// manifest lists no day totals, as one written before them.
func writeWithoutTotals(t *testing.T, path, dir string) {
	t.Helper()
	s, err := regiongraph.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if err := s.WriteDataset(dir); err != nil {
		t.Fatal(err)
	}
	manifest := filepath.Join(dir, regiongraph.ManifestName)
	data, err := os.ReadFile(manifest)
	if err != nil {
		t.Fatal(err)
	}
	var m map[string]any
	if err := json.Unmarshal(data, &m); err != nil {
		t.Fatal(err)
	}
	for _, d := range m["days"].([]any) {
		delete(d.(map[string]any), "totals")
	}
	if data, err = json.Marshal(m); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(manifest, data, 0o644); err != nil {
		t.Fatal(err)
	}
	back, err := regiongraph.ReadFileOptions(dir, regiongraph.ReadOptions{MinTrips: 10})
	if err != nil {
		t.Fatal(err)
	}
	if _, ok := back.DayTotals(); ok {
		t.Fatal("the dataset without totals still records them")
	}
}
