package main

import (
	"bytes"
	"encoding/xml"
	"image/png"
	"os"
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

	// --map exports the map alone: the page's SVG, or the workbook's PNG.
	base := []string{"compare", "--graphs", in("graphs.parquet"), "--min-trips", "2", "--support", "0.5",
		"--before", "2026-03-02..2026-03-02", "--after", "2026-03-03..2026-03-03", "--osm", in("town/quillhaven-before.osm")}
	mustRunCLI(t, append(base, "--out", in("m1.xlsx"), "--map", in("m1-map.svg"))...)
	svg, err := os.ReadFile(in("m1-map.svg"))
	if err != nil {
		t.Fatal(err)
	}
	var root struct {
		XMLName xml.Name
	}
	if err := xml.Unmarshal(svg, &root); err != nil || root.XMLName.Local != "svg" {
		t.Errorf("--map m1-map.svg: root %q, %v; want one svg element", root.XMLName.Local, err)
	}
	page, err := os.ReadFile(in("m1.html"))
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Contains(page, bytes.TrimSpace(svg)) {
		t.Error("the exported SVG is not the map drawn on the page")
	}
	mustRunCLI(t, append(base, "--out", in("m2.xlsx"), "--map", in("m2-map.png"))...)
	f, err := os.Open(in("m2-map.png"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	img, err := png.Decode(f)
	if err != nil {
		t.Fatalf("--map m2-map.png: %v", err)
	}
	if b := img.Bounds(); b.Dx() < 200 || b.Dy() < 200 {
		t.Errorf("--map PNG is %v, want a map-sized picture", b)
	}
	if code, _, stderr := runCLI(t, append(base, "--out", in("m3.xlsx"), "--map", in("m3-map.pdf"))...); code != exitUsage {
		t.Errorf("--map .pdf: exit %d, want %d (usage)\n%s", code, exitUsage, stderr)
	}
}
