package main

import (
	"path/filepath"
	"regexp"
	"strconv"
	"testing"
)

// The simulated GPS points and GPX traces go through ingest like the trip
// table: each input kind yields used rows on the town's regions.
func TestSimulatedGPSAndGPXIngest(t *testing.T) {
	if testing.Short() {
		t.Skip("simulation and three ingests")
	}
	dir, regions := simulatedTown(t, "--days", "2", "--trips-per-day", "2000", "--gps-every", "20", "--no-study")
	used := regexp.MustCompile(`(?m)^\s+used\s+(\d+)`)

	// The quality thresholds are settable: a speed ceiling of 20 km/h
	// rejects trips of the town's arterials that the default 150 km/h keeps.
	badSpeed := regexp.MustCompile(`(?m)^\s+rejected: bad speed\s+(\d+)`)
	for _, tc := range []struct {
		args    []string
		rejects bool
	}{{nil, false}, {[]string{"--max-speed", "20"}, true}} {
		args := append([]string{"ingest", "--regions", regions, "--tz", "Etc/GMT-1",
			"--trips", filepath.Join(dir, "town", "trips.csv"), "--out", filepath.Join(dir, "speed.parquet")}, tc.args...)
		stdout := mustRunCLI(t, args...)
		if got := badSpeed.MatchString(stdout); got != tc.rejects {
			t.Errorf("ingest %v: a bad-speed line is %v, want %v:\n%s", tc.args, got, tc.rejects, stdout)
		}
	}
	for _, tc := range []struct{ format, file string }{
		{"trips", "trips.csv"},
		{"points", "points.csv"},
		{"gpx", "traces.gpx"},
	} {
		t.Run(tc.format, func(t *testing.T) {
			stdout := mustRunCLI(t, "ingest", "--regions", regions, "--format", tc.format, "--tz", "Etc/GMT-1",
				"--trips", filepath.Join(dir, "town", tc.file), "--out", filepath.Join(dir, tc.format+".parquet"))
			m := used.FindStringSubmatch(stdout)
			if m == nil {
				t.Fatalf("no 'used' line in the summary:\n%s", stdout)
			}
			if n, _ := strconv.Atoi(m[1]); n == 0 {
				t.Errorf("no %s row used:\n%s", tc.format, stdout)
			}
		})
	}
}
