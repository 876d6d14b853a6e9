package main

import (
	"bytes"
	"context"
	"flag"
	"os"
	"path/filepath"
	"testing"
)

var (
	scanCityStore = flag.String("scan-city", "", "day-graph store (either layout) of a city for BenchmarkScanCityCommand (see regiongraph's TestWriteRepeatedStore)")
	scanCityFrom  = flag.String("scan-city-from", "", "first day of BenchmarkScanCityCommand's period (default: the store's first)")
	scanCityTo    = flag.String("scan-city-to", "", "last day of BenchmarkScanCityCommand's period (default: the store's last)")
)

// BenchmarkScanCityCommand times the whole scan command on a city's store
// at --min-trips 3 --support 0.1: reading the period's kept edges, the
// scan, and writing the findings and their map layer. Skipped without
// -scan-city.
func BenchmarkScanCityCommand(b *testing.B) {
	if *scanCityStore == "" {
		b.Skip("no -scan-city STORE (write one with: go test ./regiongraph -run TestWriteRepeatedStore -repeat-from DIR -repeat-out OUT)")
	}
	out := filepath.Join(b.TempDir(), "findings.json")
	args := []string{"scan", "--graphs", *scanCityStore, "--min-trips", "3", "--support", "0.1", "--force", "--out", out}
	if *scanCityFrom != "" {
		args = append(args, "--from", *scanCityFrom)
	}
	if *scanCityTo != "" {
		args = append(args, "--to", *scanCityTo)
	}
	for b.Loop() {
		var buf bytes.Buffer
		env := &environment{stdout: &buf, stderr: &buf}
		if code := dispatch(context.Background(), env, args); code != exitOK {
			b.Fatalf("exit %d: %s", code, buf.String())
		}
	}
	if _, err := os.Stat(out); err != nil {
		b.Fatal(err)
	}
}
