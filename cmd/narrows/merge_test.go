package main

import (
	"bufio"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"narrows/regiongraph"
)

// Two ingests of separate weeks, merged with --merge, give the same day
// graphs and the same quality accounting as one ingest of both weeks.
func TestIngestMergeEqualsOneIngest(t *testing.T) {
	if testing.Short() {
		t.Skip("simulation and three ingests")
	}
	dir, regions := simulatedTown(t, "--days", "14", "--trips-per-day", "3000", "--no-study")
	// Split the trips by start day: the first week, then the second.
	all := filepath.Join(dir, "town", "trips.csv")
	weeks := [2]string{filepath.Join(dir, "week1.csv"), filepath.Join(dir, "week2.csv")}
	splitTrips(t, all, weeks, "2026-03-09")

	ingest := func(out string, files []string, extra ...string) *regiongraph.Store {
		t.Helper()
		args := append([]string{"ingest", "--regions", regions, "--tz", "Etc/GMT-1", "--out", out}, extra...)
		for _, f := range files {
			args = append(args, "--trips", f)
		}
		if code, stdout, stderr := runCLI(t, args...); code != exitOK {
			t.Fatalf("ingest %v: exit %d\n%s\n%s", files, code, stdout, stderr)
		}
		s, err := regiongraph.ReadFile(out)
		if err != nil {
			t.Fatal(err)
		}
		return s
	}
	whole := ingest(filepath.Join(dir, "whole.parquet"), []string{all})
	ingest(filepath.Join(dir, "week1.parquet"), weeks[:1])
	merged := ingest(filepath.Join(dir, "merged.parquet"), weeks[1:], "--merge", filepath.Join(dir, "week1.parquet"))

	if len(whole.Edges) == 0 {
		t.Fatal("no edges: nothing was compared")
	}
	if !reflect.DeepEqual(whole.Edges, merged.Edges) {
		t.Errorf("merged store has %d edges, one ingest %d; they differ", len(merged.Edges), len(whole.Edges))
	}
	// The header line of each week's file is not a trip, so the merged
	// count of rows read equals one ingest's.
	if !reflect.DeepEqual(whole.Meta.Quality, merged.Meta.Quality) {
		t.Errorf("quality: merged %+v, one ingest %+v", merged.Meta.Quality, whole.Meta.Quality)
	}
	if len(merged.Meta.Sources) != 2 {
		t.Errorf("merged store lists %d sources, want both weeks", len(merged.Meta.Sources))
	}
	// Merging a week into itself overlaps days: an error, not a silent sum.
	code, _, stderr := runCLI(t, "ingest", "--regions", regions, "--tz", "Etc/GMT-1", "--trips", weeks[0],
		"--merge", filepath.Join(dir, "week1.parquet"), "--out", filepath.Join(dir, "twice.parquet"))
	if code != exitError || !strings.Contains(stderr, "2026-03-0") {
		t.Errorf("merging overlapping days: exit %d, stderr %q; want an error naming the day", code, stderr)
	}
}

// splitTrips writes the trips starting before day to parts[0] and the rest
// to parts[1], each with the header.
func splitTrips(t *testing.T, path string, parts [2]string, day string) {
	t.Helper()
	in, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer in.Close()
	var outs [2]*bufio.Writer
	for i, p := range parts {
		f, err := os.Create(p)
		if err != nil {
			t.Fatal(err)
		}
		defer f.Close()
		outs[i] = bufio.NewWriter(f)
		defer outs[i].Flush()
	}
	sc := bufio.NewScanner(in)
	sc.Buffer(make([]byte, 1<<20), 1<<20)
	sc.Scan()
	header := sc.Text()
	for _, w := range outs {
		w.WriteString(header + "\n")
	}
	for sc.Scan() {
		line := sc.Text()
		fields := strings.SplitN(line, ",", 3)
		i := 0
		if len(fields) > 1 && fields[1][:10] >= day {
			i = 1
		}
		outs[i].WriteString(line + "\n")
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
}
