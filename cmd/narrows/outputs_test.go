package main

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// fileBytes returns a file's bytes, failing the test when it cannot be read.
func fileBytes(t *testing.T, path string) []byte {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// No step writes over one of its own inputs: each refuses with a message
// naming the file, and the input keeps its bytes.
func TestOutputNeverOverwritesAnInput(t *testing.T) {
	dir, regions := simulatedTown(t, "--days", "2", "--trips-per-day", "300", "--no-study")
	osmPath := filepath.Join(dir, "town", "quillhaven-before.osm")
	trips := filepath.Join(dir, "town", "trips.csv")
	store := filepath.Join(dir, "graphs.parquet")
	mustRunCLI(t, "ingest", "--regions", regions, "--trips", trips, "--tz", "Etc/GMT-1", "--out", store)
	theirRegions := filepath.Join(dir, "regions-regions.geojson")
	if err := os.WriteFile(theirRegions, fileBytes(t, regions), 0o644); err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name   string
		args   []string
		victim string
		code   int
	}{
		{"ingest over its trips", []string{"ingest", "--regions", regions, "--trips", trips, "--out", trips}, trips, exitError},
		{"ingest over its regions", []string{"ingest", "--regions", regions, "--trips", trips, "--out", regions}, regions, exitError},
		{"ingest over a merged store", []string{"ingest", "--regions", regions, "--trips", trips, "--merge", store, "--out", store}, store, exitError},
		{"regions over the extract", []string{"regions", "--osm", osmPath, "--out", osmPath}, osmPath, exitError},
		{"regions over the extract, forced", []string{"regions", "--osm", osmPath, "--force", "--out", osmPath}, osmPath, exitError},
		{"scan over its store", []string{"scan", "--graphs", store, "--out", store}, store, exitUsage},
		{"scan's layer over its JSON", []string{"scan", "--graphs", store, "--out", filepath.Join(dir, "f.geojson")}, store, exitUsage},
		{"compare's layer over its regions", []string{"compare", "--graphs", store, "--before", "2026-03-02..2026-03-02", "--after", "2026-03-03..2026-03-03", "--out", filepath.Join(dir, "regions.xlsx"), "--regions", theirRegions}, theirRegions, exitError},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			before := fileBytes(t, tc.victim)
			code, _, stderr := runCLI(t, tc.args...)
			if code != tc.code {
				t.Errorf("exit %d, want %d\n%s", code, tc.code, stderr)
			}
			if tc.code == exitError && !strings.Contains(stderr, "refusing") {
				t.Errorf("message does not say it refuses: %s", stderr)
			}
			if !bytes.Equal(fileBytes(t, tc.victim), before) {
				t.Errorf("%s was changed", tc.victim)
			}
		})
	}
}

// A step replaces its own earlier output, but a file of another kind, or
// one narrows did not write, only with --force.
func TestOutputOfAnotherKindNeedsForce(t *testing.T) {
	dir, regions := simulatedTown(t, "--days", "2", "--trips-per-day", "300", "--no-study")
	osmPath := filepath.Join(dir, "town", "quillhaven-before.osm")
	trips := filepath.Join(dir, "town", "trips.csv")
	store := filepath.Join(dir, "graphs.parquet")
	mustRunCLI(t, "ingest", "--regions", regions, "--trips", trips, "--tz", "Etc/GMT-1", "--out", store)
	mustRunCLI(t, "ingest", "--regions", regions, "--trips", trips, "--tz", "Etc/GMT-1", "--out", store) // its own kind
	notes := filepath.Join(dir, "notes.geojson")
	if err := os.WriteFile(notes, []byte("mine"), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, victim := range []string{store, notes} {
		before := fileBytes(t, victim)
		code, _, stderr := runCLI(t, "regions", "--osm", osmPath, "--barriers", "rail,river", "--out", victim)
		if code != exitError || !strings.Contains(stderr, "--force") {
			t.Errorf("regions over %s: exit %d, %q; want a refusal that names --force", victim, code, stderr)
		}
		if !bytes.Equal(fileBytes(t, victim), before) {
			t.Errorf("%s was changed", victim)
		}
		mustRunCLI(t, "regions", "--osm", osmPath, "--barriers", "rail,river", "--force", "--out", victim)
		if !bytes.Equal(fileBytes(t, victim), fileBytes(t, regions)) {
			t.Errorf("regions --force over %s did not write the regions", victim)
		}
	}
}

// The README's steps run twice in one folder give the same files, and
// every step re-runs; no step's file is replaced by another's.
func TestStepsTwiceInOneFolder(t *testing.T) {
	dir, _ := simulatedTown(t, "--days", "2", "--trips-per-day", "300", "--no-study")
	osmPath := filepath.Join(dir, "town", "quillhaven-before.osm")
	trips := filepath.Join(dir, "town", "trips.csv")
	in := func(name string) string { return filepath.Join(dir, name) }
	steps := [][]string{
		{"regions", "--osm", osmPath, "--barriers", "rail,river", "--out", in("regions.geojson")},
		{"ingest", "--regions", in("regions.geojson"), "--trips", trips, "--tz", "Etc/GMT-1", "--out", in("graphs.parquet")},
		{"scan", "--graphs", in("graphs.parquet"), "--min-trips", "2", "--support", "0.5", "--out", in("findings.json")},
		{"compare", "--graphs", in("graphs.parquet"), "--min-trips", "2", "--support", "0.5", "--before", "2026-03-02..2026-03-02", "--after", "2026-03-03..2026-03-03", "--out", in("report.xlsx")},
	}
	snapshot := func() map[string][]byte {
		files := map[string][]byte{}
		entries, _ := os.ReadDir(dir)
		for _, e := range entries {
			if !e.IsDir() {
				files[e.Name()] = fileBytes(t, in(e.Name()))
			}
		}
		return files
	}
	var first map[string][]byte
	for round := range 2 {
		for _, s := range steps {
			mustRunCLI(t, s...)
		}
		got := snapshot()
		for _, name := range []string{"regions.geojson", "graphs.parquet", "findings.json", "findings.geojson",
			"report.xlsx", "report-regions.geojson", "report-findings.geojson", "report.html"} {
			if _, ok := got[name]; !ok {
				t.Errorf("round %d: no %s", round+1, name)
			}
		}
		if round == 0 {
			first = got
			continue
		}
		for name, b := range got {
			if name != "report.xlsx" && !bytes.Equal(b, first[name]) { // the workbook records when it was made
				t.Errorf("%s differs between the two rounds", name)
			}
		}
		if len(got) != len(first) {
			t.Errorf("round 2 left %d files, round 1 %d", len(got), len(first))
		}
	}
}

// A study file cannot send its outputs outside its folder; the command line
// can.
func TestStudyCannotEscapeItsFolder(t *testing.T) {
	root := t.TempDir()
	dir := filepath.Join(root, "study")
	if err := os.MkdirAll(dir, 0o755); err != nil {
		t.Fatal(err)
	}
	study := string(fileBytes(t, filepath.Join("..", "..", "testdata", "study.toml")))
	tests := []struct{ name, from, to string }{
		{"name with parent folders", `name = "report"`, `name = "../../escaped"`},
		{"name with a folder", `name = "report"`, `name = "sub/report"`},
		{"name dot-dot", `name = "report"`, `name = ".."`},
		{"absolute output", `output = "out"`, `output = "` + filepath.ToSlash(filepath.Join(root, "elsewhere")) + `"`},
		{"output upwards", `output = "out"`, `output = "../elsewhere"`},
		{"output upwards inside", `output = "out"`, `output = "out/../../elsewhere"`},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			path := filepath.Join(dir, "study.toml")
			if err := os.WriteFile(path, []byte(strings.Replace(study, tc.from, tc.to, 1)), 0o644); err != nil {
				t.Fatal(err)
			}
			code, _, stderr := runCLI(t, "run", path)
			if code != exitError || !strings.Contains(stderr, path) {
				t.Errorf("exit %d, %q; want 1 and an error naming the study file", code, stderr)
			}
			entries, _ := os.ReadDir(root)
			if len(entries) != 1 {
				t.Errorf("%d entries beside the study folder, want only it", len(entries))
			}
		})
	}
}

// Temporary files that a killed write left behind are removed by the next
// run of the step that writes the same output.
func TestStaleTemporaryFilesRemoved(t *testing.T) {
	dir, regions := simulatedTown(t, "--days", "2", "--trips-per-day", "300", "--no-study")
	osmPath := filepath.Join(dir, "town", "quillhaven-before.osm")
	stale := filepath.Join(dir, ".regions.geojson.tmp-123456789")
	other := filepath.Join(dir, ".graphs.parquet.tmp-42")
	for _, p := range []string{stale, other} {
		if err := os.WriteFile(p, []byte("half"), 0o600); err != nil {
			t.Fatal(err)
		}
	}
	code, _, stderr := runCLI(t, "regions", "--osm", osmPath, "--barriers", "rail,river", "--out", regions)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if _, err := os.Stat(stale); !os.IsNotExist(err) {
		t.Errorf("%s is still there", stale)
	}
	if !strings.Contains(stderr, stale) {
		t.Errorf("the run does not report removing %s: %q", stale, stderr)
	}
	if _, err := os.Stat(other); err != nil {
		t.Errorf("another output's temporary file was removed: %v", err)
	}
}

// A --days that ends before the study's periods is refused, naming the
// days it would need.
func TestSimulateDaysOutsideTheStudy(t *testing.T) {
	dir := t.TempDir()
	code, _, stderr := runCLI(t, "simulate", "--days", "14", "--out", dir)
	if code != exitUsage || !strings.Contains(stderr, "2026-03-15") || !strings.Contains(stderr, "--days 56") {
		t.Errorf("exit %d, %q; want 2 naming the last simulated day and --days 56", code, stderr)
	}
	if entries, _ := os.ReadDir(dir); len(entries) != 0 {
		t.Errorf("a refused simulation wrote %d files", len(entries))
	}
}

// An interrupt, even one that comes after all reading is done, ends the
// run with one line and exit 130, and writes nothing.
func TestInterruptWritesNothing(t *testing.T) {
	dir, regions := simulatedTown(t, "--days", "2", "--trips-per-day", "300", "--no-study")
	osmPath := filepath.Join(dir, "town", "quillhaven-before.osm")
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	var out, errOut bytes.Buffer
	env := &environment{stdout: &out, stderr: &errOut}
	out2 := filepath.Join(dir, "again.geojson")
	code := dispatch(ctx, env, []string{"regions", "--osm", osmPath, "--out", out2})
	if code != exitInterrupted || strings.TrimSpace(errOut.String()) != "narrows regions: interrupted; nothing written" {
		t.Errorf("exit %d, %q; want 130 and one line", code, errOut.String())
	}
	if _, err := os.Stat(out2); !os.IsNotExist(err) {
		t.Errorf("%s written after the interrupt", out2)
	}
	_ = regions
}

// Names from a file cannot drive the terminal.
func TestTerminalText(t *testing.T) {
	for in, want := range map[string]string{
		"High Street":              "High Street",
		"Evil\x1b]0;owned\x07Road": "Evil?]0;owned?Road",
		"Clear\x1b[2J":             "Clear?[2J",
		"C1\u009b31m":              "C1?31m",
		"bidi\u202eteS":            "bidi?teS",
		"Straße":                   "Straße",
	} {
		if got := terminalText(in); got != want {
			t.Errorf("terminalText(%q) = %q, want %q", in, got, want)
		}
	}
}
