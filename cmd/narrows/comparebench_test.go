package main

import (
	"bytes"
	"context"
	"flag"
	"os"
	"path/filepath"
	"testing"
)

var compareCityDir = flag.String("compare-city", "", "`dir` holding graphs.parquet and regions.geojson of two years of a city (see patterns' TestWriteCityStore) for BenchmarkCompareCityCommand")

// BenchmarkCompareCityCommand times the whole compare command, a year
// against a year of a 2,025-region city at --min-trips 3: reading the
// store, both scans, comparison groups, and writing the workbook, map
// layers and HTML page. It runs on the store as one file (file:
// DIR/graphs.parquet) and, when DIR/ds holds it, as a dataset folder of
// day files (dataset), the layout ingest writes. Skipped without
// -compare-city.
func BenchmarkCompareCityCommand(b *testing.B) {
	if *compareCityDir == "" {
		b.Skip("no -compare-city DIR (write it with: go test ./patterns -run TestWriteCityStore -city-store DIR)")
	}
	dir := *compareCityDir
	for _, layout := range []struct{ name, graphs string }{{"file", "graphs.parquet"}, {"dataset", "ds"}} {
		b.Run(layout.name, func(b *testing.B) {
			graphs := filepath.Join(dir, layout.graphs)
			if _, err := os.Stat(graphs); err != nil {
				b.Skipf("no %s: %v", graphs, err)
			}
			out := b.TempDir()
			args := []string{"compare", "--graphs", graphs, "--regions", filepath.Join(dir, "regions.geojson"), "--trust-regions",
				"--before", "2025-01-06..2026-01-05", "--after", "2026-01-06..2027-01-05", "--min-trips", "3", "--force", "--out", filepath.Join(out, "report.xlsx")}
			for b.Loop() {
				var buf bytes.Buffer
				env := &environment{stdout: &buf, stderr: &buf}
				if code := dispatch(context.Background(), env, args); code != exitOK {
					b.Fatalf("exit %d: %s", code, buf.String())
				}
			}
			if _, err := os.Stat(filepath.Join(out, "report.html")); err != nil {
				b.Fatal(err)
			}
		})
	}
}
