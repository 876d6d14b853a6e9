package main

import (
	"bytes"
	"os"
	"path/filepath"
	"reflect"
	"slices"
	"testing"

	"github.com/paulmach/orb"

	"narrows/partition"
	"narrows/patterns"
	"narrows/report"
)

// smallReport is a scan of two regions with one weak link between them.
func smallReport() report.Input {
	square := func(x0 float64) orb.Polygon {
		return orb.Polygon{{{x0, 50}, {x0 + 0.01, 50}, {x0 + 0.01, 50.01}, {x0, 50.01}, {x0, 50}}}
	}
	regions := &partition.Partition{
		Bound: orb.Bound{Min: orb.Point{10, 50}, Max: orb.Point{10.02, 50.01}},
		Regions: []partition.Region{
			{ID: 1, Polygon: square(10), Point: orb.Point{10.005, 50.005}},
			{ID: 2, Polygon: square(10.01), Point: orb.Point{10.015, 50.005}},
		},
	}
	days := []string{"2026-03-02", "2026-03-03"}
	daily := []patterns.DailyValue{{Day: days[0], Trips: 24, Speed: 4.2, Detour: 2.3, Candidate: true}}
	edge := patterns.FindingEdge{From: 1, To: 2, TripsMedian: 24, SpeedMedian: 4.2, DetourMedian: 2.3, Daily: daily}
	scan := &patterns.Scan{
		Days:      days,
		EdgeDaily: map[patterns.EdgeKey][]patterns.DailyValue{{From: 1, To: 2}: daily},
		Findings:  []patterns.Finding{{Rank: 1, ID: "1>2", Regions: []int{1, 2}, Edges: []patterns.FindingEdge{edge}, Days: days[:1], Share: 0.5}},
	}
	return report.Input{Title: "Small", Regions: regions, Scan: scan}
}

func TestWriteReport(t *testing.T) {
	dir := t.TempDir()
	paths, err := writeReportFiles(newRunFiles(nil), dir, "lowmere", smallReport())
	if err != nil {
		t.Fatal(err)
	}
	want := []string{"lowmere.xlsx", "lowmere-regions.geojson", "lowmere-findings.geojson", "lowmere.html"}
	for i := range want {
		want[i] = filepath.Join(dir, want[i])
	}
	if !reflect.DeepEqual(paths, want) {
		t.Errorf("paths = %q, want %q", paths, want)
	}
	entries, _ := os.ReadDir(dir)
	entries = slices.DeleteFunc(entries, func(e os.DirEntry) bool { return e.Name() == manifestName })
	if len(entries) != len(want) {
		var names []string
		for _, e := range entries {
			names = append(names, e.Name())
		}
		t.Errorf("directory holds %q, want only the four outputs", names)
	}
	for _, p := range paths {
		if fi, err := os.Stat(p); err != nil || fi.Size() == 0 {
			t.Errorf("%s: %v", p, err)
		}
	}
	// Same bytes as the single writer.
	var single bytes.Buffer
	if err := report.WriteWorkbook(&single, smallReport()); err != nil {
		t.Fatal(err)
	}
	if a, _ := os.ReadFile(paths[0]); !bytes.Equal(a, single.Bytes()) {
		t.Error("writeReportFiles's workbook differs from WriteWorkbook's")
	}

	// A folder that cannot be made fails without leaving anything.
	if _, err := writeReportFiles(newRunFiles(nil), filepath.Join(paths[0], "sub"), "x", smallReport()); err == nil {
		t.Error("writeReportFiles below a file: no error")
	}
	for _, base := range []string{"", "../up", "a/b"} {
		if _, err := writeReportFiles(newRunFiles(nil), dir, base, smallReport()); err == nil {
			t.Errorf("writeReport with base %q: no error", base)
		}
	}
	if after, _ := os.ReadDir(dir); len(after) != len(want)+1 {
		t.Errorf("failed writes left files: %d entries, want %d", len(after), len(want))
	}
}

// An input the report rejects fails on the first file and leaves nothing.
func TestWriteReportInvalidInput(t *testing.T) {
	dir := t.TempDir()
	in := smallReport()
	in.Scan = nil
	if _, err := writeReportFiles(newRunFiles(nil), dir, "study", in); err == nil {
		t.Fatal("writeReportFiles without a scan: no error")
	}
	if left, _ := os.ReadDir(dir); len(left) != 0 {
		t.Errorf("failed writes left %d files", len(left))
	}
}
