package main

import (
	"context"
	"flag"
	"fmt"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"github.com/apache/beam/sdks/v2/go/pkg/beam"
	"github.com/apache/beam/sdks/v2/go/pkg/beam/runners/prism"

	"narrows/regiongraph"
)

var citySample = flag.Int("city-trips", 0, "also run the pipeline on a simulated city day of this many trips (slow)")

func TestMain(m *testing.M) {
	flag.Parse()
	beam.Init()
	os.Exit(m.Run())
}

// narrowsCLI builds the narrows command of the main module once.
func narrowsCLI(t *testing.T) string {
	t.Helper()
	bin := filepath.Join(t.TempDir(), "narrows")
	cmd := exec.Command("go", "build", "-o", bin, "./cmd/narrows")
	cmd.Dir = "../.."
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("building narrows: %v\n%s", err, out)
	}
	return bin
}

func runNarrows(t *testing.T, bin string, args ...string) {
	t.Helper()
	if out, err := exec.Command(bin, args...).CombinedOutput(); err != nil {
		t.Fatalf("narrows %s: %v\n%s", strings.Join(args, " "), err, out)
	}
}

// splitRows cuts a CSV file's data rows at random into n shards.
func splitRows(t *testing.T, path, dir string, n int, seed uint64) []string {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.SplitAfter(string(data), "\n")
	parts := make([]strings.Builder, n)
	for k := range parts {
		parts[k].WriteString(lines[0])
	}
	rng := rand.New(rand.NewPCG(seed, seed))
	for _, l := range lines[1:] {
		if l != "" {
			parts[rng.IntN(n)].WriteString(l)
		}
	}
	var out []string
	for k := range parts {
		p := filepath.Join(dir, fmt.Sprintf("shard-%02d.csv", k))
		if err := os.WriteFile(p, []byte(parts[k].String()), 0o644); err != nil {
			t.Fatal(err)
		}
		out = append(out, p)
	}
	return out
}

// runPipeline runs the pipeline on prism in this process.
func runPipeline(cfg Config, shards []string) error {
	return run(context.Background(), cfg, shards, func(ctx context.Context, p *beam.Pipeline) error {
		_, err := prism.Execute(ctx, p)
		return err
	})
}

// sameStore fails unless the stores hold the same metadata and edges.
func sameStore(t *testing.T, what string, got, want *regiongraph.Store) {
	t.Helper()
	if !reflect.DeepEqual(got.Meta, want.Meta) {
		t.Errorf("%s: metadata\n%+v\nwant\n%+v", what, got.Meta, want.Meta)
	}
	if len(got.Edges) != len(want.Edges) {
		t.Fatalf("%s: %d edges, ingest %d", what, len(got.Edges), len(want.Edges))
	}
	for i := range got.Edges {
		if got.Edges[i] != want.Edges[i] {
			t.Fatalf("%s: edge %d\n%+v\ningest\n%+v", what, i, got.Edges[i], want.Edges[i])
		}
	}
}

// The pipeline on prism writes the store narrows ingest writes from the
// same shards: the town's trips cut into random shards.
func TestPipelineEqualsIngestOnTheTown(t *testing.T) {
	bin := narrowsCLI(t)
	dir := t.TempDir()
	runNarrows(t, bin, "simulate", "--out", dir, "--days", "3", "--trips-per-day", "2000", "--no-study")
	regions := filepath.Join(dir, "regions.geojson")
	runNarrows(t, bin, "regions", "--osm", filepath.Join(dir, "town", "quillhaven-before.osm"), "--barriers", "rail,river", "--out", regions)
	shards := splitRows(t, filepath.Join(dir, "town", "trips.csv"), t.TempDir(), 5, 7)
	// Two copies of one shard's rows in another: repeats across shards.
	first, _ := os.ReadFile(shards[0])
	lines := strings.SplitAfter(string(first), "\n")
	f, _ := os.OpenFile(shards[3], os.O_APPEND|os.O_WRONLY, 0)
	f.WriteString(strings.Join(lines[1:40], ""))
	f.Close()

	whole := filepath.Join(dir, "ingest.parquet")
	runNarrows(t, bin, append([]string{"ingest", "--regions", regions, "--tz", "Etc/GMT-1", "--window", "all=00:00-24:00",
		"--window", "am=07:00-10:00", "--out", whole, "--trips"}, shards...)...)
	want, err := regiongraph.ReadFile(whole)
	if err != nil {
		t.Fatal(err)
	}
	if want.Meta.Quality.Rejected[string(regiongraph.ReasonDuplicateRow)] != 39 || len(want.Edges) < 100 {
		t.Fatalf("test data: %d repeated rows (want 39), %d edges", want.Meta.Quality.Rejected[string(regiongraph.ReasonDuplicateRow)], len(want.Edges))
	}
	out := filepath.Join(t.TempDir(), "graphs")
	cfg := Config{Regions: regions, Format: "trips", TimeZone: "Etc/GMT-1", Windows: []string{"all=00:00-24:00", "am=07:00-10:00"},
		MinUsedShare: 0.01, Out: out}
	if err := runPipeline(cfg, shards); err != nil {
		t.Fatal(err)
	}
	got, err := regiongraph.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	sameStore(t, "town", got, want)
	if !reflect.DeepEqual(got.RegionsGeoJSON(), want.RegionsGeoJSON()) {
		t.Error("the dataset's regions differ from the store's")
	}

	// A bad row in a strict run fails its shard, and the pipeline, naming
	// the file and line; no dataset is written.
	data, _ := os.ReadFile(shards[2])
	bad := strings.SplitAfter(string(data), "\n")
	bad[7] = strings.Replace(bad[7], ",", ",x", 3)
	os.WriteFile(shards[2], []byte(strings.Join(bad, "")), 0o644)
	cfg.Strict = true
	cfg.Out = filepath.Join(t.TempDir(), "bad")
	err = runPipeline(cfg, shards)
	if err == nil || !strings.Contains(err.Error(), shards[2]+":8:") {
		t.Fatalf("error %v; want one naming %s:8", err, shards[2])
	}
	if _, serr := os.Stat(cfg.Out); !os.IsNotExist(serr) {
		t.Errorf("a failed run left %s: %v", cfg.Out, serr)
	}
}

// The same on a day of the simulated city, cut into shards of random
// rows, when -city-trips is given (the city's network takes a while to
// simulate).
func TestPipelineEqualsIngestOnACityDay(t *testing.T) {
	if *citySample <= 0 {
		t.Skip("give -city-trips N to run the pipeline on a simulated city day of N trips")
	}
	bin := narrowsCLI(t)
	dir := t.TempDir()
	runNarrows(t, bin, "simulate", "--size", "city", "--out", dir, "--days", "1", "--trips-per-day", fmt.Sprint(*citySample), "--no-study")
	regions := filepath.Join(dir, "regions.geojson")
	runNarrows(t, bin, "regions", "--osm", filepath.Join(dir, "town", "ostravel-before.osm"), "--out", regions)
	shards := splitRows(t, filepath.Join(dir, "town", "trips.csv"), t.TempDir(), 4, 9)
	whole := filepath.Join(dir, "ingest.parquet")
	runNarrows(t, bin, append([]string{"ingest", "--regions", regions, "--tz", "Etc/GMT-1", "--window", "am=07:00-10:00",
		"--window", "pm=16:00-19:00", "--out", whole, "--trips"}, shards...)...)
	want, err := regiongraph.ReadFile(whole)
	if err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(t.TempDir(), "graphs")
	cfg := Config{Regions: regions, TimeZone: "Etc/GMT-1", Windows: []string{"am=07:00-10:00", "pm=16:00-19:00"},
		MinUsedShare: 0.01, Out: out}
	if err := runPipeline(cfg, shards); err != nil {
		t.Fatal(err)
	}
	got, err := regiongraph.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	if want.Meta.Quality.Used < int64(*citySample)/2 {
		t.Fatalf("city day too thin: %+v", want.Meta.Quality)
	}
	sameStore(t, "city day", got, want)
}

func TestUnquoteWorkerID(t *testing.T) {
	for _, tc := range []struct{ in, want string }{
		{`--id="job-1_go"`, `--id=job-1_go`},
		{`--id=job-1_go`, `--id=job-1_go`},
		{`--id="`, `--id="`},
		{`--idx="a"`, `--idx="a"`},
	} {
		if got := unquoteWorkerID([]string{"x", tc.in})[1]; got != tc.want {
			t.Errorf("%s: %s, want %s", tc.in, got, tc.want)
		}
	}
}
