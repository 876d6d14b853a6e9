package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"time"

	"narrows/cmd/internal/atomicfile"
	"narrows/regiongraph"
)

// placedSuffix ends the name of a placed-trip file.
const placedSuffix = ".placed.parquet"

// runPlace places one shard of trips: the heavy half of ingest, run once
// per shard on any machine, in any order, as often as a scheduler retries.
func runPlace(ctx context.Context, env *environment, args []string) error {
	fs := newFlagSet(env, "place", "--regions R.geojson --trips SHARD [--format trips|points|gpx] [ingest options] --out DIR [--name NAME]")
	var regionsPath, shard, out, name string
	var force bool
	fs.StringVar(&regionsPath, "regions", "", "regions GeoJSON written by 'narrows regions'")
	fs.StringVar(&shard, "trips", "", "one shard: a trip table (CSV or Parquet), GPS points of whole vehicles, or a GPX file or folder")
	fs.StringVar(&out, "out", "", "folder to write the placed trips into, as NAME"+placedSuffix)
	fs.StringVar(&name, "name", "", "name of the output (default: the shard's file name without its extension)")
	fs.BoolVar(&force, "force", false, "replace a file at the output path that is not a placed-trip file")
	opts, format := regiongraph.DefaultOptions(), regiongraph.FormatTrips
	optFlags := bindOptions(fs, func(fs *flag.FlagSet) { bindIngest(fs, &opts, &format) })
	if err := parseFlags(env, fs, args); err != nil {
		return err
	}
	if regionsPath == "" || shard == "" || out == "" {
		return usagef("--regions, --trips and --out are required")
	}
	if err := optFlags.check(opts.Validate()); err != nil {
		return err
	}
	if name == "" {
		base := filepath.Base(filepath.Clean(shard))
		name = strings.TrimSuffix(base, filepath.Ext(base))
	}
	if name == "" || name == "." || strings.ContainsAny(name, `/\`) || strings.ContainsFunc(name, isControl) {
		return usagef("--name %q: want a plain file name", name)
	}
	path := filepath.Join(out, name+placedSuffix)
	if err := claimPlaced(path, shard, force); err != nil {
		return err
	}
	regions, sum, err := readRegions(regionsPath)
	if err != nil {
		return err
	}
	if err := os.MkdirAll(out, 0o755); err != nil {
		return err
	}
	start := time.Now()
	update, finish := progress(env, "place")
	opts.Progress = update
	var meta regiongraph.PlacedMeta
	var n int64
	// Written to a temporary file and renamed: a retried or killed run
	// leaves the whole file or none, never one counted twice.
	err = atomicfile.Write(path, func(w io.Writer) error {
		var err error
		meta, n, err = regiongraph.PlaceTo(ctx, regions, sum, []regiongraph.Input{{Path: shard, Format: format}}, opts, w)
		return err
	})
	finish()
	if err != nil {
		return err
	}
	var rows int64
	for _, s := range meta.Sources {
		rows += s.Rows
	}
	fmt.Fprintf(env.stdout, "%d placed trips of %d rows (%d rows counted apart) in %.2f s -> %s\n",
		n, rows, meta.Quality.Read, time.Since(start).Seconds(), path)
	return nil
}

// claimPlaced checks that path may be written: absent, a placed-trip file
// (placing a shard again replaces its file), or --force; and not the shard.
func claimPlaced(path, shard string, force bool) error {
	info, err := os.Stat(path)
	if err != nil {
		return nil
	}
	if si, err := os.Stat(shard); err == nil && os.SameFile(info, si) {
		return fmt.Errorf("refusing to write %s: it is the shard being placed", path)
	}
	if info.IsDir() {
		return fmt.Errorf("cannot write %s: it is a folder", path)
	}
	if force {
		return nil
	}
	if _, err := regiongraph.ReadPlaced(path, func(regiongraph.PlacedMeta) error { return errHeadOnly }, nil); err != errHeadOnly {
		return fmt.Errorf("refusing to replace %s: it is not a placed-trip file (pass --force to replace it)", path)
	}
	return nil
}

// errHeadOnly stops a read of a placed-trip file after its metadata.
var errHeadOnly = fmt.Errorf("metadata read")

// runAggregate aggregates placed trips into the day-graph store.
func runAggregate(ctx context.Context, env *environment, args []string) error {
	fs := newFlagSet(env, "aggregate", "--regions R.geojson --placed FILE|DIR... [--min-used-share S] [--strict] --out graphs.parquet|DIR")
	var regionsPath, out string
	var placed listFlag
	fs.StringVar(&regionsPath, "regions", "", "regions GeoJSON the trips were placed on")
	fs.Var(&placed, "placed", "placed-trip file, or a folder of them (read in name order) (repeatable; more may follow the options)")
	fs.StringVar(&out, "out", "", "day-graph store: a .parquet file, or a folder for the day-partitioned dataset")
	env.files.bindForce(fs)
	opts := regiongraph.DefaultOptions()
	fs.Float64Var(&opts.MinUsedShare, "min-used-share", opts.MinUsedShare, "fail when fewer than this `share` of the rows read are used")
	fs.BoolVar(&opts.Strict, "strict", opts.Strict, "fail when times carry a UTC offset other than the time zone's")
	fs.IntVar(&opts.MemoryMB, "memory", 0, "`MB` of trips held before they go to a temporary file (default 128)")
	fs.StringVar(&opts.SpillDir, "spill-dir", "", "`folder` of that temporary file (default: the system's)")
	if err := parseFlagsWithRest(env, fs, args, func(rest []string) { placed = append(placed, rest...) }); err != nil {
		return err
	}
	if regionsPath == "" || out == "" || len(placed) == 0 {
		return usagef("--regions, --placed and --out are required")
	}
	files, err := placedFiles(placed)
	if err != nil {
		return err
	}
	env.files.read(regionsPath)
	env.files.read(files...)
	dataset := !strings.EqualFold(filepath.Ext(out), ".parquet")
	if !dataset {
		if err := env.files.claim(out, kindStore); err != nil {
			return err
		}
	}
	regions, sum, err := readRegions(regionsPath)
	if err != nil {
		return err
	}
	start := time.Now()
	a, err := regiongraph.NewAggregator(regions, sum, opts)
	if err != nil {
		return err
	}
	defer a.Close()
	update, finish := progress(env, "aggregate")
	var total, done int64
	sizes := make([]int64, len(files))
	for i, f := range files {
		if fi, err := os.Stat(f); err == nil {
			sizes[i] = fi.Size()
			total += fi.Size()
		}
	}
	for i, f := range files {
		if err := ctx.Err(); err != nil {
			finish()
			return err
		}
		if err := a.AddFile(f); err != nil {
			finish()
			return err
		}
		if done += sizes[i]; update != nil {
			update(done, total)
		}
	}
	finish()
	var meta regiongraph.Meta
	var written regiongraph.Written
	if dataset {
		s, w, err := a.WriteDataset(ctx, out, nil)
		if err != nil {
			return err
		}
		meta, written = s.Meta, w
	} else {
		err = env.files.write(out, kindStore, func(w io.Writer) error {
			s, n, err := a.WriteTo(ctx, w, nil)
			if err != nil {
				return err
			}
			meta, written = s.Meta, n
			return nil
		})
		if err != nil {
			return err
		}
	}
	printQuality(env, meta.Quality)
	if q := meta.Quality; q.OffsetMismatch > 0 && !opts.Strict {
		fmt.Fprintf(env.stderr, "warning: %v (--tz of place; --strict makes this an error)\n", regiongraph.OffsetMismatchError(q, meta.TimeZone))
	}
	fmt.Fprintf(env.stdout, "%d edges on %d days from %d placed-trip files in %.2f s -> %s\n",
		written.Edges, written.Days, len(files), time.Since(start).Seconds(), out)
	return nil
}

// placedFiles expands folders into their placed-trip files in name order.
func placedFiles(args []string) ([]string, error) {
	var files []string
	for _, p := range args {
		fi, err := os.Stat(p)
		if err != nil {
			return nil, err
		}
		if !fi.IsDir() {
			files = append(files, p)
			continue
		}
		entries, err := os.ReadDir(p)
		if err != nil {
			return nil, err
		}
		var names []string
		for _, e := range entries {
			if !e.IsDir() && strings.HasSuffix(e.Name(), placedSuffix) && !strings.HasPrefix(e.Name(), ".") {
				names = append(names, e.Name())
			}
		}
		slices.Sort(names)
		if len(names) == 0 {
			return nil, fmt.Errorf("%s: no *%s files in the folder", p, placedSuffix)
		}
		for _, n := range names {
			files = append(files, filepath.Join(p, n))
		}
	}
	return files, nil
}
