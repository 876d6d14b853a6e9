package main

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// TestCheckStudy checks study files against a trip file of 2026-03-02 to
// 2026-03-29, times in +01:00, without running them.
func TestCheckStudy(t *testing.T) {
	dir := t.TempDir()
	var b strings.Builder
	b.WriteString("trip_id,start_time,end_time,start_lon,start_lat,end_lon,end_lat,distance_m\n")
	zone := time.FixedZone("", 3600)
	for d := 0; d < 28; d++ {
		st := time.Date(2026, 3, 2+d, 8, 0, 0, 0, zone)
		fmt.Fprintf(&b, "t%d,%s,%s,0.85,0.64,0.87,0.65,2500\n", d, st.Format(time.RFC3339), st.Add(10*time.Minute).Format(time.RFC3339))
	}
	for name, data := range map[string]string{"trips.csv": b.String(), "town.osm": "<osm></osm>\n"} {
		if err := os.WriteFile(filepath.Join(dir, name), []byte(data), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	study := func(tz, trips, before, after string) string {
		p := filepath.Join(dir, "study.toml")
		text := fmt.Sprintf("time_zone = %q\n[regions]\nosm = \"town.osm\"\n[trips]\nfiles = [%q]\n[compare]\nbefore = %q\nafter = %q\n", tz, trips, before, after)
		if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	for _, tc := range []struct {
		name                     string
		tz, trips, before, after string
		code                     int
		want                     []string
	}{
		{"sound", "Etc/GMT-1", "trips.csv", "2026-03-02..2026-03-15", "2026-03-16..2026-03-29", exitOK,
			[]string{"runs from 2026-03-02 to 2026-03-29", "agree with time zone Etc/GMT-1", "do not overlap", "the study can run"}},
		{"overlap", "Etc/GMT-1", "trips.csv", "2026-03-02..2026-03-20", "2026-03-16..2026-03-29", exitError,
			[]string{"error:", "overlap (2026-03-16 to 2026-03-20)"}},
		{"after past the data", "Etc/GMT-1", "trips.csv", "2026-03-02..2026-03-15", "2026-03-16..2026-04-12", exitError,
			[]string{"after period 2026-03-16..2026-04-12 reaches outside the data, which run from 2026-03-02 to 2026-03-29"}},
		{"time zone not the data's", "UTC", "trips.csv", "2026-03-02..2026-03-15", "2026-03-16..2026-03-29", exitOK,
			[]string{"warning:", "28 of 28 times read carry a UTC offset that is not time zone UTC's"}},
		{"missing trips", "Etc/GMT-1", "none.csv", "2026-03-02..2026-03-15", "2026-03-16..2026-03-29", exitError,
			[]string{"trips", "none.csv cannot be read"}},
		{"unknown zone", "Mars/Olympus", "trips.csv", "2026-03-02..2026-03-15", "2026-03-16..2026-03-29", exitError,
			[]string{"unknown time zone"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			code, stdout, stderr := runCLI(t, "check", study(tc.tz, tc.trips, tc.before, tc.after))
			if code != tc.code {
				t.Errorf("exit %d, want %d\n%s%s", code, tc.code, stdout, stderr)
			}
			for _, w := range tc.want {
				if !strings.Contains(stdout, w) {
					t.Errorf("output lacks %q:\n%s", w, stdout)
				}
			}
		})
	}
}
