package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"time"

	"narrows/partition"
	"narrows/regiongraph"
)

func runIngest(ctx context.Context, env *environment, args []string) error {
	fs := newFlagSet(env, "ingest", "--regions R.geojson --trips FILE... [--format trips|points|gpx] [--columns ...] [--tz ZONE] [--window NAME=HH:MM-HH:MM] [--strict] --out graphs|graphs.parquet")
	var regionsPath, out string
	var trips, merge listFlag
	fs.StringVar(&regionsPath, "regions", "", "regions GeoJSON written by 'narrows regions'")
	fs.Var(&trips, "trips", "trip or GPS file, or a folder of GPX files (repeatable; more files may follow the options)")
	fs.Var(&merge, "merge", "existing day-graph store to merge into the output (repeatable)")
	fs.StringVar(&out, "out", "", "day-graph store to write: a dataset folder (a Parquet file per day), or one Parquet file if the name ends in .parquet")
	env.files.bindForce(fs)
	opts, format := regiongraph.DefaultOptions(), regiongraph.FormatTrips
	optFlags := bindOptions(fs, func(fs *flag.FlagSet) { bindIngest(fs, &opts, &format) })
	// Trip files may also follow the options, as in "--trips a.csv b.csv".
	if err := parseFlagsWithRest(env, fs, args, func(rest []string) { trips = append(trips, rest...) }); err != nil {
		return err
	}
	if regionsPath == "" || out == "" || len(trips) == 0 {
		return usagef("--regions, --trips and --out are required")
	}
	if err := optFlags.check(opts.Validate()); err != nil {
		return err
	}
	env.files.read(regionsPath)
	env.files.read(trips...)
	env.files.read(merge...)
	if err := env.files.claim(out, kindStore); err != nil {
		return err
	}
	regions, sum, err := readRegions(regionsPath)
	if err != nil {
		return err
	}
	if storeIsDataset(out) {
		return ingestDataset(ctx, env, regions, sum, trips, format, opts, merge, out)
	}
	if len(merge) == 0 {
		return ingestTo(ctx, env, regions, sum, trips, format, opts, out)
	}
	_, err = ingest(ctx, env, regions, sum, trips, nil, format, opts, merge, out)
	return err
}

// ingestDataset builds the day-graph store as a dataset folder, written
// a day at a time. With stores to merge, the new trips' days are merged
// with the stores' as the aggregation finishes them (each store is read a
// day at a time, either layout).
func ingestDataset(ctx context.Context, env *environment, regions *partition.Partition, sum string, trips []string, format regiongraph.Format, opts regiongraph.Options, merge []string, out string) error {
	start := time.Now()
	inputs := tripInputs(trips, format)
	update, finish := progress(env, "ingest")
	opts.Progress = update
	var meta regiongraph.Meta
	var written regiongraph.Written
	err := env.files.writeDataset(out, kindStore, func() error {
		if len(merge) == 0 {
			s, n, err := regiongraph.IngestDataset(ctx, regions, sum, inputs, opts, out, nil)
			if err != nil {
				return err
			}
			meta, written = s.Meta, n
			return nil
		}
		m, n, err := regiongraph.IngestMergeDataset(ctx, regions, sum, inputs, opts, out, merge, nil)
		if err != nil {
			return err
		}
		meta, written = m.Meta, n
		return nil
	})
	finish()
	if err != nil {
		return err
	}
	printIngest(env, meta, written.Edges, written.Days, start, out)
	return nil
}

// ingestTo builds the day-graph store and writes it as it is built,
// holding a day's trips at a time rather than the store.
func ingestTo(ctx context.Context, env *environment, regions *partition.Partition, sum string, trips []string, format regiongraph.Format, opts regiongraph.Options, out string) error {
	start := time.Now()
	inputs := tripInputs(trips, format)
	update, finish := progress(env, "ingest")
	opts.Progress = update
	var meta regiongraph.Meta
	var written regiongraph.Written
	err := env.files.write(out, kindStore, func(w io.Writer) error {
		s, n, err := regiongraph.IngestTo(ctx, regions, sum, inputs, opts, w, nil)
		if err != nil {
			return err
		}
		meta, written = s.Meta, n
		return nil
	})
	finish()
	if err != nil {
		return err
	}
	printIngest(env, meta, written.Edges, written.Days, start, out)
	return nil
}

// ingest builds and writes the day-graph store of the regions whose
// GeoJSON has the SHA-256 sum. names, when given, maps a
// trip file's path to the name recorded in the store (a study records its
// files relative to the study file, so the store does not depend on where
// the study folder sits).
func ingest(ctx context.Context, env *environment, regions *partition.Partition, sum string, trips []string, names map[string]string, format regiongraph.Format, opts regiongraph.Options, merge []string, out string) (*regiongraph.Store, error) {
	start := time.Now()
	inputs := tripInputs(trips, format)
	store, err := ingestInMemory(ctx, env, regions, sum, inputs, names, opts)
	if err != nil {
		return nil, err
	}
	if len(merge) > 0 {
		stores := []*regiongraph.Store{store}
		for _, m := range merge {
			s, err := regiongraph.ReadFile(m)
			if err != nil {
				return nil, err
			}
			stores = append(stores, s)
		}
		if store, err = regiongraph.Merge(stores...); err != nil {
			return nil, err
		}
	}
	if err := env.files.write(out, kindStore, store.WriteParquet); err != nil {
		return nil, err
	}
	printIngest(env, store.Meta, len(store.Edges), countDays(store), start, out)
	return store, nil
}

// tripInputs returns the trip files as ingest inputs of one format.
func tripInputs(trips []string, format regiongraph.Format) []regiongraph.Input {
	inputs := make([]regiongraph.Input, len(trips))
	for i, t := range trips {
		inputs[i] = regiongraph.Input{Path: t, Format: format}
	}
	return inputs
}

// ingestInMemory builds the day-graph store in memory, with progress on a
// terminal. names, when given, maps a trip file's path to the name
// recorded in the store.
func ingestInMemory(ctx context.Context, env *environment, regions *partition.Partition, sum string, inputs []regiongraph.Input, names map[string]string, opts regiongraph.Options) (*regiongraph.Store, error) {
	update, finish := progress(env, "ingest")
	opts.Progress = update
	store, err := regiongraph.Ingest(ctx, regions, sum, inputs, opts)
	finish()
	if err != nil {
		return nil, err
	}
	for i, src := range store.Meta.Sources {
		if name, ok := names[src.Path]; ok {
			store.Meta.Sources[i].Path = name
		}
	}
	return store, nil
}

// printIngest prints what an ingest read and wrote: the accounting of
// every row, a warning when the times' offsets disagree with the time
// zone, and the edges and days written to out.
func printIngest(env *environment, meta regiongraph.Meta, edges, days int, start time.Time, out string) {
	printQuality(env, meta.Quality)
	if q := meta.Quality; q.OffsetMismatch > 0 {
		fmt.Fprintf(env.stderr, "warning: %v (--tz, time_zone in a study file; --strict makes this an error)\n", regiongraph.OffsetMismatchError(q, meta.TimeZone))
	}
	fmt.Fprintf(env.stdout, "%d edges on %d days in %.2f s -> %s\n", edges, days, time.Since(start).Seconds(), out)
}

func countDays(s *regiongraph.Store) int {
	days := map[regiongraph.Day]bool{}
	for _, e := range s.Edges {
		days[e.Day] = true
	}
	return len(days)
}

// printQuality prints the accounting of every input row.
func printQuality(env *environment, q regiongraph.Quality) {
	pct := func(n int64) float64 {
		if q.Read == 0 {
			return 0
		}
		return 100 * float64(n) / float64(q.Read)
	}
	fmt.Fprintf(env.stdout, "  %-34s %12d\n", "rows read", q.Read)
	fmt.Fprintf(env.stdout, "  %-34s %12d %6.1f %%\n", "used", q.Used, pct(q.Used))
	for _, reason := range regiongraph.RejectReasons() {
		if n := q.Rejected[string(reason)]; n > 0 {
			fmt.Fprintf(env.stdout, "  %-34s %12d %6.1f %%\n", "rejected: "+string(reason), n, pct(n))
		}
	}
}
