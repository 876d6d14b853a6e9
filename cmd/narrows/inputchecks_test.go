package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
	"unicode"

	"narrows/regiongraph"
)

// checkStore writes a store of 28 days, 2026-03-02 to 2026-03-29, one
// pair (1>2) a day with as many trips as the day of the month, and the two
// regions of smallReport at 10 E, 50 N; it returns their paths.
func checkStore(t *testing.T) (graphs, regions string) {
	t.Helper()
	dir := t.TempDir()
	s := &regiongraph.Store{Meta: regiongraph.Meta{TimeZone: "UTC", Windows: []regiongraph.Window{{Name: "all", StartMinute: 0, EndMinute: 24 * 60}},
		Quality: regiongraph.Quality{Rejected: map[string]int64{}}}}
	day := time.Date(2026, 3, 2, 0, 0, 0, 0, time.UTC)
	for d := 0; d < 28; d++ {
		s.Edges = append(s.Edges, regiongraph.Edge{Day: regiongraph.DayOf(day.AddDate(0, 0, d)), Window: 0, From: 1, To: 2, Trips: 2 + d,
			SpeedP25: 4, SpeedMedian: 5, SpeedP75: 6, DetourP25: 1.2, DetourMedian: 1.3, DetourP75: 1.4, DistanceMedian: 2000, DurationMedian: 400,
			DistanceSum: 10000, StraightSum: 8000, DurationSum: 2000})
	}
	graphs, regions = filepath.Join(dir, "graphs.parquet"), filepath.Join(dir, "regions.geojson")
	files := newRunFiles(nil)
	if err := files.write(graphs, kindStore, s.WriteParquet); err != nil {
		t.Fatal(err)
	}
	if err := files.write(regions, kindRegions, smallReport().Regions.WriteGeoJSON); err != nil {
		t.Fatal(err)
	}
	return graphs, regions
}

// TestCompareInputChecks runs compare on settings a planner could get
// wrong: each must stop with exit 1, a message that says what is wrong
// and how to put it right, and no report.
func TestCompareInputChecks(t *testing.T) {
	graphs, regions := checkStore(t)
	out := filepath.Join(t.TempDir(), "report.xlsx")
	base := []string{"compare", "--graphs", graphs, "--regions", regions, "--trust-regions", "--out", out}
	for _, tc := range []struct {
		name string
		args []string
		want []string
	}{
		{"overlapping periods", []string{"--before", "2026-03-02..2026-03-16", "--after", "2026-03-10..2026-03-29"},
			[]string{"overlap (2026-03-10 to 2026-03-16)"}},
		{"after period past the data", []string{"--before", "2026-03-02..2026-03-15", "--after", "2026-03-16..2026-04-12"},
			[]string{"after period 2026-03-16..2026-04-12", "2026-03-02 to 2026-03-29"}},
		{"focus far away", []string{"--before", "2026-03-02..2026-03-15", "--after", "2026-03-16..2026-03-29", "--focus", "10.005,57.65@2000"},
			[]string{"outside the study area", "nearest region is"}},
		{"focus latitude first", []string{"--before", "2026-03-02..2026-03-15", "--after", "2026-03-16..2026-03-29", "--focus", "50.005,10.005@2000"},
			[]string{"outside the study area", "longitude,latitude"}},
		// Before: 2026-03-02..15 has 2..15 trips a day.
		{"min trips above every pair", []string{"--before", "2026-03-02..2026-03-15", "--after", "2026-03-16..2026-03-29", "--min-trips", "20"},
			[]string{"--min-trips", "before period", "most trips of one pair on one day is 15", "minimum of 15 or less"}},
		{"min trips above the whole store", []string{"--before", "2026-03-02..2026-03-15", "--after", "2026-03-16..2026-03-29", "--min-trips", "100"},
			[]string{"--min-trips", "is 15", "minimum of 15 or less"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			code, _, stderr := runCLI(t, append(base, tc.args...)...)
			if code != exitError {
				t.Errorf("exit %d, want %d; stderr:\n%s", code, exitError, stderr)
			}
			for _, w := range tc.want {
				if !strings.Contains(stderr, w) {
					t.Errorf("stderr lacks %q:\n%s", w, stderr)
				}
			}
			if _, err := os.Stat(out); !os.IsNotExist(err) {
				t.Errorf("a refused comparison wrote %s", out)
			}
		})
	}
	// The same store with sound settings passes the checks.
	code, _, stderr := runCLI(t, append(base, "--before", "2026-03-02..2026-03-15", "--after", "2026-03-16..2026-03-29", "--min-trips", "2")...)
	if code != exitOK {
		t.Errorf("sound settings: exit %d:\n%s", code, stderr)
	}
	// scan names the setting too.
	code, _, stderr = runCLI(t, "scan", "--graphs", graphs, "--regions", regions, "--trust-regions", "--min-trips", "50", "--out", filepath.Join(t.TempDir(), "f.json"))
	if code != exitError || !strings.Contains(stderr, "--min-trips") || !strings.Contains(stderr, "minimum of 29 or less") {
		t.Errorf("scan with --min-trips 50: exit %d:\n%s", code, stderr)
	}
}

// TestHostileFilesGiveShortCleanErrors gives the commands files that are
// not what they should be and hold escape sequences and long lines: the
// messages name the file, quote at most a short excerpt and carry no
// control character.
func TestHostileFilesGiveShortCleanErrors(t *testing.T) {
	dir := t.TempDir()
	hostile := "\x1b]0;owned\x07\x1b[2J\u202e" + strings.Repeat("root:x:0:0:root:/root:/bin/bash ", 3000) + "\n"
	write := func(name, data string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(data), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	_, regions := checkStore(t)
	notOSM := write("passwd.osm", hostile)
	xmlOther := write("other.osm", "<?xml version=\"1.0\"?>\n<"+strings.Repeat("a", 5000)+"/>")
	trips := write("trips.csv", hostile+"1,2,3\n")
	for _, tc := range []struct {
		name string
		args []string
		file string
	}{
		{"not OSM", []string{"regions", "--osm", notOSM, "--out", filepath.Join(dir, "r.geojson")}, "passwd.osm"},
		{"XML, not OSM", []string{"regions", "--osm", xmlOther, "--out", filepath.Join(dir, "r.geojson")}, "other.osm"},
		{"trips header", []string{"ingest", "--regions", regions, "--trips", trips, "--out", filepath.Join(dir, "g.parquet")}, "trips.csv"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			code, _, stderr := runCLI(t, tc.args...)
			if code != exitError {
				t.Errorf("exit %d, want %d", code, exitError)
			}
			if !strings.Contains(stderr, tc.file) {
				t.Errorf("stderr does not name %s: %q", tc.file, stderr)
			}
			if i := strings.IndexFunc(stderr, func(r rune) bool { return r != '\n' && (unicode.IsControl(r) || r == '\u202e') }); i >= 0 {
				t.Errorf("stderr holds a control character at %d: %q", i, stderr)
			}
			if len(stderr) > 1000 {
				t.Errorf("stderr is %d bytes: %.300q", len(stderr), stderr)
			}
		})
	}
	// The last line of defence: any message is cleaned and cut.
	msg := errorText(errorString("a\x1b[2Jb\n" + strings.Repeat("y", 5000)))
	if strings.ContainsRune(msg, '\x1b') || len(msg) > maxErrorText+20 || !strings.HasPrefix(msg, "a?[2Jb\ny") {
		t.Errorf("errorText: %d bytes, %.40q", len(msg), msg)
	}
}

type errorString string

func (e errorString) Error() string { return string(e) }
