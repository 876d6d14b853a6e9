package main

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// runCLI runs the command line in-process and returns exit code and output.
func runCLI(t *testing.T, args ...string) (code int, stdout, stderr string) {
	t.Helper()
	var out, errOut bytes.Buffer
	env := &environment{stdout: &out, stderr: &errOut}
	code = dispatch(context.Background(), env, args)
	return code, out.String(), errOut.String()
}

// mustRunCLI runs the command line in-process, fails the test unless it
// exits 0, and returns what it printed on stdout.
func mustRunCLI(t *testing.T, args ...string) string {
	t.Helper()
	code, stdout, stderr := runCLI(t, args...)
	if code != exitOK {
		t.Fatalf("narrows %s: exit %d\n%s\n%s", strings.Join(args, " "), code, stdout, stderr)
	}
	return stdout
}

// simulatedTown simulates the demo town into a temporary folder with the
// given simulate options and partitions it with the demo's barriers. It
// returns the folder and the regions file.
func simulatedTown(t *testing.T, simulateArgs ...string) (dir, regions string) {
	t.Helper()
	dir = t.TempDir()
	mustRunCLI(t, append([]string{"simulate", "--out", dir}, simulateArgs...)...)
	regions = filepath.Join(dir, "regions.geojson")
	mustRunCLI(t, "regions", "--osm", filepath.Join(dir, "town", "quillhaven-before.osm"), "--barriers", "rail,river", "--out", regions)
	return dir, regions
}

func TestHelpForEveryCommand(t *testing.T) {
	for _, c := range commands() {
		if c.name == "version" {
			continue
		}
		t.Run(c.name, func(t *testing.T) {
			code, stdout, _ := runCLI(t, "help", c.name)
			if code != exitOK {
				t.Fatalf("help %s: exit %d", c.name, code)
			}
			if !strings.Contains(stdout, "Usage: narrows "+c.name) {
				t.Errorf("help %s does not show its usage line:\n%s", c.name, stdout)
			}
		})
	}
	code, stdout, _ := runCLI(t, "help")
	if code != exitOK || !strings.Contains(stdout, "demo") {
		t.Errorf("help: exit %d, output %q", code, stdout)
	}
}

func TestUsageErrors(t *testing.T) {
	tests := []struct {
		name string
		args []string
		want string
	}{
		{"no command", nil, "Usage"},
		{"unknown command", []string{"frobnicate"}, "unknown command"},
		{"regions without osm", []string{"regions", "--out", "x.geojson"}, "--osm and --out are required"},
		{"unknown flag", []string{"regions", "--nope"}, "flag provided but not defined"},
		{"malformed bbox", []string{"regions", "--osm", "a.osm", "--out", "b.geojson", "--bbox", "1,2,3"}, "--bbox"},
		{"bad support", []string{"scan", "--graphs", "g.parquet", "--out", "f.json", "--support", "1.5"}, "--support"},
		{"k below 1", []string{"scan", "--graphs", "g.parquet", "--out", "f.json", "--k", "0"}, "--k"},
		{"unbounded groups", []string{"scan", "--graphs", "g.parquet", "--out", "f.json", "--max-edges", "0"}, "--max-edges"},
		{"bad days", []string{"scan", "--graphs", "g.parquet", "--out", "f.json", "--days", "mondays"}, "--days"},
		{"bad period", []string{"compare", "--graphs", "g", "--before", "2026-01-01", "--after", "2026-02-01..2026-02-10", "--out", "r.xlsx"}, "--before"},
		{"reversed period", []string{"compare", "--graphs", "g", "--before", "2026-01-10..2026-01-01", "--after", "2026-02-01..2026-02-10", "--out", "r.xlsx"}, "ends before it starts"},
		{"bad focus", []string{"compare", "--graphs", "g", "--before", "2026-01-01..2026-01-10", "--after", "2026-02-01..2026-02-10", "--focus", "1,2@x", "--out", "r.xlsx"}, "--focus"},
		{"unknown zone", []string{"ingest", "--regions", "r.geojson", "--trips", "t.csv", "--out", "g.parquet", "--tz", "Mars/Olympus"}, "unknown time zone"},
		{"bad window", []string{"ingest", "--regions", "r.geojson", "--trips", "t.csv", "--out", "g.parquet", "--window", "am=7-10"}, "--window"},
		{"run without file", []string{"run"}, "exactly one study file"},
		{"speed bounds reversed", []string{"ingest", "--regions", "r.geojson", "--trips", "t.csv", "--out", "g.parquet", "--min-speed", "50", "--max-speed", "40"}, "--max-speed, --min-speed: regiongraph: MinSpeedKMH 50 is above MaxSpeedKMH 40"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			code, _, stderr := runCLI(t, tc.args...)
			if code != exitUsage {
				t.Errorf("exit %d, want %d (usage); stderr:\n%s", code, exitUsage, stderr)
			}
			if !strings.Contains(stderr, tc.want) {
				t.Errorf("stderr does not mention %q:\n%s", tc.want, stderr)
			}
		})
	}
}

func TestBadInputFilesExitNonZeroAndNameTheFile(t *testing.T) {
	dir := t.TempDir()
	write := func(name string, data []byte) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, data, 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	empty := write("empty.osm", nil)
	notOSM := write("notes.osm", []byte("this is a shopping list, not map data\n"))
	badStudy := write("study.toml", []byte("title = \"x\"\n[regions]\nosm = \"a.osm\"\nsnap_metre = 3\n[trips]\nfiles=[\"t.csv\"]\n"))
	missing := filepath.Join(dir, "missing.osm.pbf")
	tests := []struct {
		name string
		args []string
		want []string
	}{
		{"empty extract", []string{"regions", "--osm", empty, "--out", filepath.Join(dir, "r.geojson")}, []string{"empty.osm"}},
		{"not OSM", []string{"regions", "--osm", notOSM, "--out", filepath.Join(dir, "r.geojson")}, []string{"notes.osm"}},
		{"missing extract", []string{"regions", "--osm", missing, "--out", filepath.Join(dir, "r.geojson")}, []string{"missing.osm.pbf"}},
		{"misspelt study key", []string{"run", badStudy}, []string{"study.toml", "snap_metre"}},
		{"missing store", []string{"scan", "--graphs", filepath.Join(dir, "none.parquet"), "--out", filepath.Join(dir, "f.json")}, []string{"none.parquet"}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			code, _, stderr := runCLI(t, tc.args...)
			if code != exitError {
				t.Errorf("exit %d, want %d; stderr:\n%s", code, exitError, stderr)
			}
			for _, w := range tc.want {
				if !strings.Contains(stderr, w) {
					t.Errorf("stderr does not name %q:\n%s", w, stderr)
				}
			}
		})
	}
	// Nothing half-written: no output appeared for the failed runs.
	if _, err := os.Stat(filepath.Join(dir, "r.geojson")); !os.IsNotExist(err) {
		t.Errorf("a failed regions run left r.geojson behind (stat err %v)", err)
	}
	entries, _ := os.ReadDir(dir)
	for _, e := range entries {
		if strings.Contains(e.Name(), ".tmp-") {
			t.Errorf("temporary file left behind: %s", e.Name())
		}
	}
}
