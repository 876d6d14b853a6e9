// Command narrows-beam runs the heavy half of narrows ingest on an Apache
// Beam runner: it reads trip shards, places each trip with narrows' own
// code (regions, local day, windows), groups the placed trips by local
// day, aggregates each day and writes the day-partitioned dataset that
// narrows scan, compare and run read.
//
// Usage:
//
//	narrows-beam --regions regions.geojson --tz ZONE [--window NAME=HH:MM-HH:MM]... --out DATASET SHARD...
//
// The runner is chosen with Beam's own --runner flag (prism, in-process,
// by default); see the README, "When one machine is not enough".
package main

import (
	"context"
	"flag"
	"fmt"
	"os"
	"strings"

	"github.com/apache/beam/sdks/v2/go/pkg/beam"
	"github.com/apache/beam/sdks/v2/go/pkg/beam/x/beamx"

	"narrows/regiongraph"
)

type listFlag []string

func (l *listFlag) String() string     { return strings.Join(*l, ",") }
func (l *listFlag) Set(s string) error { *l = append(*l, s); return nil }

func main() {
	os.Args = unquoteWorkerID(os.Args)
	var cfg Config
	var windows listFlag
	flag.StringVar(&cfg.Regions, "regions", "", "regions GeoJSON written by 'narrows regions' (readable by every worker)")
	flag.StringVar(&cfg.Format, "format", "trips", "input kind: trips (CSV or Parquet), points (GPS CSV, shards cut by vehicle) or gpx")
	flag.StringVar(&cfg.TimeZone, "tz", "UTC", "IANA time zone of the study: local days and windows")
	flag.Var(&windows, "window", "named time window `NAME=HH:MM-HH:MM` (repeatable)")
	flag.StringVar(&cfg.Columns, "columns", "", "rename columns: `name=header,...`")
	flag.StringVar(&cfg.DistanceUnit, "distance-unit", "m", "unit of the distance column: m, km or mi")
	flag.BoolVar(&cfg.Strict, "strict", false, "fail a shard at its first bad row, naming file and line")
	flag.Float64Var(&cfg.MinUsedShare, "min-used-share", regiongraph.DefaultOptions().MinUsedShare, "fail when fewer than this `share` of the rows read are used")
	flag.StringVar(&cfg.Out, "out", "", "dataset folder to write (shared by every worker)")
	flag.Parse()
	cfg.Windows = windows
	// A worker started by a runner runs the steps and never gets here
	// with shards; beam.Init hands it over.
	beam.Init()
	if err := run(context.Background(), cfg, flag.Args(), beamx.Run); err != nil {
		fmt.Fprintln(os.Stderr, "narrows-beam:", err)
		os.Exit(1)
	}
}

// run builds the pipeline and has execute run it (beamx.Run: the runner
// of Beam's flags); a failed run leaves no dataset and removes its staging
// folder.
func run(ctx context.Context, cfg Config, shards []string, execute func(context.Context, *beam.Pipeline) error) error {
	if cfg.Regions == "" || cfg.Out == "" || len(shards) == 0 {
		return fmt.Errorf("--regions, --out and shard files are required")
	}
	staging, err := regiongraph.NewDatasetStaging(cfg.Out)
	if err != nil {
		return err
	}
	cfg.Staging = staging
	p, s := beam.NewPipelineWithRoot()
	if err := Build(s, cfg, shards); err != nil {
		os.RemoveAll(staging)
		return err
	}
	if err := execute(ctx, p); err != nil {
		os.RemoveAll(staging)
		return err
	}
	return nil
}

// unquoteWorkerID strips the literal quotes that the prism job server of
// Beam 2.77 puts around the worker id it passes to a worker it starts
// (--id="..."), which the worker would otherwise present as its id and
// be refused.
func unquoteWorkerID(args []string) []string {
	out := make([]string, len(args))
	for i, a := range args {
		for _, prefix := range []string{"--id=", "-id="} {
			if v, ok := strings.CutPrefix(a, prefix); ok && len(v) >= 2 && v[0] == '"' && v[len(v)-1] == '"' {
				a = prefix + v[1:len(v)-1]
			}
		}
		out[i] = a
	}
	return out
}
