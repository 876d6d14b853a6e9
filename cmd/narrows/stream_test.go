package main

import (
	"bytes"
	"context"
	"math/rand/v2"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"narrows/regiongraph"
)

// The streamed ingest (IngestTo, day by day, spilling past a small memory
// bound) writes the very bytes of the store that Ingest holds in memory
// and WriteParquet writes, on the simulated town. With the town's rows
// shuffled (days interleaved) and 200 rows repeated, as two overlapping
// exports would, it gives the same edges, the repeats counted as
// duplicates.
func TestStreamedIngestEqualsInMemory(t *testing.T) {
	if testing.Short() {
		t.Skip("simulation and three ingests")
	}
	dir, regionsPath := simulatedTown(t, "--days", "14", "--trips-per-day", "3000", "--no-study")
	regions, sum, err := readRegions(regionsPath)
	if err != nil {
		t.Fatal(err)
	}
	trips := filepath.Join(dir, "town", "trips.csv")
	opts := regiongraph.DefaultOptions()
	opts.TimeZone = "Etc/GMT-1"
	opts.Windows = nil
	for _, w := range []string{"am=07:00-10:00", "pm=16:00-19:00", "all=00:00-24:00"} {
		pw, err := regiongraph.ParseWindow(w)
		if err != nil {
			t.Fatal(err)
		}
		opts.Windows = append(opts.Windows, pw)
	}
	ctx := context.Background()

	whole, err := regiongraph.Ingest(ctx, regions, sum, []regiongraph.Input{{Path: trips}}, opts)
	if err != nil {
		t.Fatal(err)
	}
	var want bytes.Buffer
	if err := whole.WriteParquet(&want); err != nil {
		t.Fatal(err)
	}
	if len(whole.Edges) == 0 {
		t.Fatal("no edges: nothing compared")
	}

	small := opts
	small.MemoryMB = 1
	small.SpillDir = t.TempDir()
	var got bytes.Buffer
	meta, written, err := regiongraph.IngestTo(ctx, regions, sum, []regiongraph.Input{{Path: trips}}, small, &got, nil)
	if err != nil {
		t.Fatal(err)
	}
	if written.Spilled == 0 {
		t.Errorf("a 1 MB bound on %d trips spilled nothing", whole.Meta.Quality.Used)
	}
	if written.Edges != len(whole.Edges) || !reflect.DeepEqual(meta.Meta, whole.Meta) {
		t.Errorf("streamed: %d edges, meta %+v; in memory %d, %+v", written.Edges, meta.Meta.Quality, len(whole.Edges), whole.Meta.Quality)
	}
	if !bytes.Equal(got.Bytes(), want.Bytes()) {
		t.Errorf("streamed store: %d bytes, in memory %d; they differ", got.Len(), want.Len())
	}
	if left, _ := os.ReadDir(small.SpillDir); len(left) != 0 {
		t.Errorf("spill folder keeps %d files after the ingest", len(left))
	}

	// Shuffled, with repeats.
	data, err := os.ReadFile(trips)
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSuffix(string(data), "\n"), "\n")
	header, rows := lines[0], lines[1:]
	rng := rand.New(rand.NewPCG(1, 2))
	rng.Shuffle(len(rows), func(i, j int) { rows[i], rows[j] = rows[j], rows[i] })
	const repeats = 200
	rows = append(rows, rows[:repeats]...)
	shuffled := filepath.Join(dir, "shuffled.csv")
	if err := os.WriteFile(shuffled, []byte(header+"\n"+strings.Join(rows, "\n")+"\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "shuffled.parquet")
	f, err := os.Create(out)
	if err != nil {
		t.Fatal(err)
	}
	_, written, err = regiongraph.IngestTo(ctx, regions, sum, []regiongraph.Input{{Path: shuffled}}, small, f, nil)
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	if err != nil {
		t.Fatal(err)
	}
	if written.Spilled == 0 {
		t.Error("shuffled input spilled nothing")
	}
	s, err := regiongraph.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(s.Edges, whole.Edges) {
		t.Errorf("shuffled input: %d edges, sorted %d; they differ", len(s.Edges), len(whole.Edges))
	}
	q, wq := s.Meta.Quality, whole.Meta.Quality
	if q.Read != wq.Read+repeats || q.Used != wq.Used || q.Rejected[string(regiongraph.ReasonDuplicateRow)] != wq.Rejected[string(regiongraph.ReasonDuplicateRow)]+repeats {
		t.Errorf("shuffled input: quality %+v, sorted %+v (+%d repeated rows)", q, wq, repeats)
	}
}
