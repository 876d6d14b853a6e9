package main

import (
	"path/filepath"
	"strings"
	"testing"
)

// TestCompareNetworkCountsEveryPair runs the link scenario's study, then
// the compare command on the study's store with the study's settings: the
// network's change must read the same, since it counts every pair with
// trips, also those under the scan's minimum (the study holds its store in
// memory; the command reads it from the file).
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
	got := network(mustRunCLI(t, "compare", "--graphs", filepath.Join(dir, "out", "steps", "graphs.parquet"),
		"--before", "2026-03-02..2026-03-29", "--after", "2026-03-30..2026-04-26",
		"--min-trips", "10", "--days", "weekdays", "--support", "0.3", "--focus", "0.86049,0.64426@800",
		"--out", filepath.Join(dir, "compare", "report.xlsx")))
	if got != want {
		t.Errorf("compare command:\n%s\nthe study:\n%s", got, want)
	}
}
