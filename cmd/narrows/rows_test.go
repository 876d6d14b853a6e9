package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"narrows/regiongraph"
)

// TestIngestThatUsesTooFewRowsFails: a header-only file or a wrong
// distance unit exits 1 with the top reasons and a hint, and writes no
// store; a store without its regions hash is refused unless its regions
// are given and trusted.
func TestIngestThatUsesTooFewRowsFails(t *testing.T) {
	dir, regions := simulatedTown(t, "--days", "2", "--trips-per-day", "2000", "--no-study")
	trips := filepath.Join(dir, "town", "trips.csv")
	header := filepath.Join(dir, "header.csv")
	if err := os.WriteFile(header, []byte("trip_id,start_time,end_time,start_lon,start_lat,end_lon,end_lat,distance_m\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "g.parquet")
	for _, tc := range []struct {
		name string
		args []string
		want []string
	}{
		{"header only", []string{header}, []string{"no row of 0 used", "header.csv"}},
		{"wrong unit", []string{trips, "--distance-unit", "km"}, []string{"trips.csv: no row of", "bad speed", "Check the distance unit"}},
	} {
		code, _, stderr := runCLI(t, append([]string{"ingest", "--regions", regions, "--out", out, "--trips"}, tc.args...)...)
		if code != exitError {
			t.Errorf("%s: exit %d, want %d\n%s", tc.name, code, exitError, stderr)
		}
		for _, w := range tc.want {
			if !strings.Contains(stderr, w) {
				t.Errorf("%s: stderr does not say %q:\n%s", tc.name, w, stderr)
			}
		}
		if _, err := os.Stat(out); !os.IsNotExist(err) {
			t.Errorf("%s: a store was written", tc.name)
		}
	}

	mustRunCLI(t, "ingest", "--regions", regions, "--out", out, "--trips", trips)
	s, err := regiongraph.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	s.Meta.RegionsSHA256 = ""
	f, err := os.Create(out)
	if err != nil {
		t.Fatal(err)
	}
	if err := s.WriteParquet(f); err != nil {
		t.Fatal(err)
	}
	f.Close()
	findings := filepath.Join(dir, "f.json")
	code, _, stderr := runCLI(t, "scan", "--graphs", out, "--out", findings)
	if code != exitError || !strings.Contains(stderr, "records no regions hash") {
		t.Errorf("store without regions hash: exit %d\n%s", code, stderr)
	}
	if code, _, stderr = runCLI(t, "scan", "--graphs", out, "--regions", regions, "--out", findings); code != exitError {
		t.Errorf("regions given, not trusted: exit %d\n%s", code, stderr)
	}
	mustRunCLI(t, "scan", "--graphs", out, "--regions", regions, "--trust-regions", "--out", findings)
}
