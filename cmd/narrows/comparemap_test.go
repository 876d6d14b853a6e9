package main

import (
	"path/filepath"
	"testing"
)

// TestCompareMapNetwork checks that compare draws the network on its map
// only when given the extract (--osm): the regions GeoJSON carries no
// linework. The scheme given as the after extract is the one way that
// extract adds, highlighted.
func TestCompareMapNetwork(t *testing.T) {
	if testing.Short() {
		t.Skip("end-to-end simulation")
	}
	dir, regions := simulatedTown(t, "--days", "2", "--trips-per-day", "300", "--no-study")
	in := func(name string) string { return filepath.Join(dir, name) }
	mustRunCLI(t, "ingest", "--regions", regions, "--trips", in("town/trips.csv"), "--tz", "Etc/GMT-1", "--out", in("graphs.parquet"))
	compare := func(out string, extra ...string) []svgElement {
		args := []string{"compare", "--graphs", in("graphs.parquet"), "--min-trips", "2", "--support", "0.5",
			"--before", "2026-03-02..2026-03-02", "--after", "2026-03-03..2026-03-03", "--out", in(out + ".xlsx")}
		mustRunCLI(t, append(args, extra...)...)
		_, els := pageMap(t, in(out+".html"))
		return els
	}
	network := []string{"rivers", "major-roads-primary", "minor-roads", "railways"}
	tests := []struct {
		name     string
		args     []string
		drawn    []string
		notDrawn []string
	}{
		{"without --osm", nil, []string{"regions"}, append(network, "scheme")},
		{"with --osm", []string{"--osm", in("town/quillhaven-before.osm")}, append([]string{"regions"}, network...), []string{"scheme"}},
		{"with --osm and --scheme", []string{"--osm", in("town/quillhaven-before.osm"), "--scheme", in("town/quillhaven-after.osm")}, append([]string{"regions", "scheme"}, network...), nil},
		{"scheme as a line, no --osm", []string{"--scheme", "0.85,0.655 0.86,0.66"}, []string{"regions", "scheme"}, network},
	}
	for i, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			els := compare("report"+string(rune('a'+i)), tc.args...)
			for _, id := range tc.drawn {
				if drawnIn(els, id) == 0 {
					t.Errorf("layer %s: nothing drawn", id)
				}
			}
			for _, id := range tc.notDrawn {
				if n := drawnIn(els, id); n > 0 {
					t.Errorf("layer %s: %d elements drawn, want none", id, n)
				}
			}
		})
	}
	code, _, stderr := runCLI(t, "compare", "--graphs", in("graphs.parquet"), "--before", "2026-03-02..2026-03-02",
		"--after", "2026-03-03..2026-03-03", "--scheme", "way/12", "--out", in("x.xlsx"))
	if code != exitUsage {
		t.Errorf("--scheme way/12 without --osm: exit %d, want %d (usage)\n%s", code, exitUsage, stderr)
	}
}
