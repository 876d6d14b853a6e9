package main

import (
	"context"
	"flag"
	"fmt"
	"os"
	"time"

	"narrows/partition"
	"narrows/regiongraph"
)

// ingestFlags are the options of the ingest step.
type ingestFlags struct {
	format, columns, unit, tz string
	windows                   listFlag
	strict                    bool
	minOD                     float64
	maxDuration               time.Duration
	minSpeed, maxSpeed        float64
	minDetour, maxJump        float64
	gapMinutes                float64
	dwellMinutes, dwellMetres float64
}

func (f *ingestFlags) register(fs *flag.FlagSet) {
	d := regiongraph.DefaultOptions()
	fs.StringVar(&f.format, "format", "trips", "input kind: trips (CSV or Parquet table), points (GPS CSV) or gpx")
	fs.StringVar(&f.columns, "columns", "", "rename columns: `name=header,...` (e.g. start_time=pickup_at)")
	fs.StringVar(&f.unit, "distance-unit", d.DistanceUnit, "unit of the distance column: m, km or mi")
	fs.StringVar(&f.tz, "tz", d.TimeZone, "IANA time zone of the study: local days and windows")
	fs.Var(&f.windows, "window", "named time window `NAME=HH:MM-HH:MM` (repeatable; default one window 'all')")
	fs.BoolVar(&f.strict, "strict", false, "stop at the first bad row, naming file and line")
	fs.Float64Var(&f.minOD, "min-od", d.MinStraightMetres, "reject trips whose origin-destination distance is under this many `metres`")
	fs.DurationVar(&f.maxDuration, "max-duration", d.MaxDuration, "reject trips longer than this")
	fs.Float64Var(&f.minSpeed, "min-speed", d.MinSpeedKMH, "reject trips slower than this many `km/h`")
	fs.Float64Var(&f.maxSpeed, "max-speed", d.MaxSpeedKMH, "reject trips faster than this many `km/h`")
	fs.Float64Var(&f.minDetour, "min-detour", d.MinDetour, "reject trips whose travel distance is under this `ratio` of the straight line")
	fs.Float64Var(&f.maxJump, "max-jump-speed", d.MaxJumpKMH, "GPS: reject a trace with a step faster than this many `km/h`")
	fs.Float64Var(&f.gapMinutes, "gap", d.GapMinutes, "GPS without an occupied column: cut trips at time gaps over this many `minutes`")
	fs.Float64Var(&f.dwellMinutes, "dwell-minutes", d.DwellMinutes, "GPS: cut trips where a vehicle stays put longer than this many `minutes`")
	fs.Float64Var(&f.dwellMetres, "dwell-metres", d.DwellMetres, "GPS: the radius of such a dwell, in `metres`")
}

// defaultIngestFlags returns the flag values of the defaults (for study
// files, which set only what they name).
func defaultIngestFlags() ingestFlags {
	d := regiongraph.DefaultOptions()
	return ingestFlags{format: "trips", unit: d.DistanceUnit, tz: d.TimeZone, minOD: d.MinStraightMetres,
		maxDuration: d.MaxDuration, minSpeed: d.MinSpeedKMH, maxSpeed: d.MaxSpeedKMH, minDetour: d.MinDetour,
		maxJump: d.MaxJumpKMH, gapMinutes: d.GapMinutes, dwellMinutes: d.DwellMinutes, dwellMetres: d.DwellMetres}
}

func (f *ingestFlags) options() (regiongraph.Options, error) {
	o := regiongraph.DefaultOptions()
	if f.columns != "" {
		cols, err := regiongraph.ParseColumns(f.columns)
		if err != nil {
			return o, usagef("--columns: %v", err)
		}
		o.Columns = cols
	}
	if _, err := time.LoadLocation(f.tz); err != nil || f.tz == "" || f.tz == "Local" {
		return o, usagef("--tz: unknown time zone %q (use an IANA name such as Etc/GMT-1 or UTC)", f.tz)
	}
	o.TimeZone = f.tz
	o.DistanceUnit = f.unit
	if len(f.windows) > 0 {
		o.Windows = nil
		for _, s := range f.windows {
			w, err := regiongraph.ParseWindow(s)
			if err != nil {
				return o, usagef("--window %q: %v", s, err)
			}
			o.Windows = append(o.Windows, w)
		}
	}
	o.Strict = f.strict
	if f.minOD < 0 || f.maxDuration <= 0 || f.minSpeed < 0 || f.maxSpeed <= f.minSpeed || f.minDetour < 0 ||
		f.maxJump <= 0 || f.gapMinutes <= 0 || f.dwellMinutes <= 0 || f.dwellMetres < 0 {
		return o, usagef("quality thresholds: --min-od, --min-speed, --min-detour and --dwell-metres must be non-negative; --max-duration, --max-jump-speed, --gap and --dwell-minutes positive; --max-speed above --min-speed")
	}
	o.MinStraightMetres = f.minOD
	o.MaxDuration = f.maxDuration
	o.MinSpeedKMH, o.MaxSpeedKMH = f.minSpeed, f.maxSpeed
	o.MinDetour, o.MaxJumpKMH = f.minDetour, f.maxJump
	o.GapMinutes, o.DwellMinutes, o.DwellMetres = f.gapMinutes, f.dwellMinutes, f.dwellMetres
	return o, nil
}

func runIngest(ctx context.Context, env *environment, args []string) error {
	fs := newFlagSet(env, "ingest", "--regions R.geojson --trips FILE... [--format trips|points|gpx] [--columns ...] [--tz ZONE] [--window NAME=HH:MM-HH:MM] [--strict] --out graphs.parquet")
	var regionsPath, out string
	var trips, merge listFlag
	var inf ingestFlags
	fs.StringVar(&regionsPath, "regions", "", "regions GeoJSON written by 'narrows regions'")
	fs.Var(&trips, "trips", "trip or GPS file, or a folder of GPX files (repeatable; more files may follow the options)")
	fs.Var(&merge, "merge", "existing day-graph store to merge into the output (repeatable)")
	fs.StringVar(&out, "out", "", "day-graph store (Parquet) to write")
	inf.register(fs)
	// Trip files may also follow the options, as in "--trips a.csv b.csv".
	if err := parseFlagsWithRest(env, fs, args, func(rest []string) { trips = append(trips, rest...) }); err != nil {
		return err
	}
	if regionsPath == "" || out == "" || len(trips) == 0 {
		return usagef("--regions, --trips and --out are required")
	}
	opts, err := inf.options()
	if err != nil {
		return err
	}
	return ingest(ctx, env, regionsPath, trips, nil, regiongraph.Format(inf.format), opts, merge, out)
}

// ingest builds and writes the day-graph store. names, when given, maps a
// trip file's path to the name recorded in the store (a study records its
// files relative to the study file, so the store does not depend on where
// the study folder sits).
func ingest(ctx context.Context, env *environment, regionsPath string, trips []string, names map[string]string, format regiongraph.Format, opts regiongraph.Options, merge []string, out string) error {
	start := time.Now()
	regions, sum, err := readRegions(regionsPath)
	if err != nil {
		return err
	}
	var inputs []regiongraph.Input
	for _, t := range trips {
		inputs = append(inputs, regiongraph.Input{Path: t, Format: format})
	}
	update, finish := progress(env, "ingest")
	opts.Progress = update
	store, err := regiongraph.Ingest(ctx, regions, sum, inputs, opts)
	finish()
	if err != nil {
		return err
	}
	for i, src := range store.Meta.Sources {
		if name, ok := names[src.Path]; ok {
			store.Meta.Sources[i].Path = name
		}
	}
	if len(merge) > 0 {
		stores := []*regiongraph.Store{store}
		for _, m := range merge {
			s, err := regiongraph.ReadFile(m)
			if err != nil {
				return err
			}
			stores = append(stores, s)
		}
		if store, err = regiongraph.Merge(stores...); err != nil {
			return err
		}
	}
	if err := writeFileAtomic(out, store.WriteParquet); err != nil {
		return err
	}
	printQuality(env, store.Meta.Quality)
	fmt.Fprintf(env.stdout, "%d edges on %d days in %.2f s -> %s\n", len(store.Edges), countDays(store), time.Since(start).Seconds(), out)
	return nil
}

func readRegions(path string) (*partition.Partition, string, error) {
	sum, err := fileSHA256(path)
	if err != nil {
		return nil, "", err
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, "", err
	}
	defer f.Close()
	p, err := partition.ReadGeoJSON(f, path)
	if err != nil {
		return nil, "", err
	}
	return p, sum, nil
}

func countDays(s *regiongraph.Store) int {
	days := map[string]bool{}
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
