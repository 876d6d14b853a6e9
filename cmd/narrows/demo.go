package main

import (
	"context"
	"fmt"
	"io"
	"path/filepath"
	"strings"
	"time"

	"narrows/cmd/internal/town"
)

// townFiles are the files a simulation writes into its folder.
type townFiles struct {
	before, after, trips string // paths
}

// simulateTown generates a town, writes its before and after OSM files and
// the trips of a scenario into dir, and returns the town and the plan it
// simulated.
//
// With gpsEvery > 0, every gpsEvery-th trip also gets a GPS trace, written
// to points.csv (GPS points) and, for the first gpxTraces of them, to
// traces.gpx: the other input kinds that ingest reads.
func simulateTown(ctx context.Context, env *environment, dir string, size town.Size, seed int64, kind string, days, tripsPerDay, gpsEvery int) (townFiles, *town.Town, town.Plan, error) {
	var files townFiles
	plan, err := town.Scenario(kind)
	if err != nil {
		return files, nil, plan, usagef("--scenario: %v", err)
	}
	t, err := town.Generate(town.Options{Size: size, Seed: seed})
	if err != nil {
		return files, nil, plan, usagef("--size: %v", err)
	}
	slug := strings.ToLower(t.Name)
	files.before = filepath.Join(dir, slug+"-before.osm")
	files.after = filepath.Join(dir, slug+"-after.osm")
	files.trips = filepath.Join(dir, "trips.csv")
	for _, f := range []struct {
		path     string
		withLink bool
	}{{files.before, false}, {files.after, true}} {
		if err := env.files.write(f.path, kindTown, func(w io.Writer) error { return t.WriteOSM(w, f.withLink) }); err != nil {
			return files, nil, plan, err
		}
	}
	opts := plan.SimOptions(seed)
	if days > 0 {
		opts.Days = days
	}
	if tripsPerDay > 0 {
		opts.TripsPerDay = tripsPerDay
	}
	start := time.Now()
	update, finish := stageProgress(env)
	if update != nil {
		opts.Progress = func(done, total int) { update("simulating days", done, total) }
	}
	stats, err := simulateTrips(ctx, env.files, t, opts, files.trips, dir, gpsEvery)
	finish()
	if err != nil {
		return files, nil, plan, err
	}
	fmt.Fprintf(env.stdout, "%s (%s, seed %d): %d trips on %d days (%d with an incident) in %.1f s -> %s\n",
		t.Name, size, seed, stats.Trips, stats.Days, stats.IncidentDays, time.Since(start).Seconds(), dir)
	if plan.LinkOpens != nil {
		fmt.Fprintf(env.stdout, "  the new %s opens on %s at %.5f,%.5f\n", t.Link.Tag("name"),
			plan.LinkOpens.Format(time.DateOnly), t.LinkMidpoint[0], t.LinkMidpoint[1])
	}
	if c := plan.Change; c != nil {
		fmt.Fprintf(env.stdout, "  from %s the whole town has %+.0f %% trips at %+.0f %% driving speed; nothing is built\n",
			c.From.Format(time.DateOnly), 100*(c.Demand-1), 100*(c.Speed-1))
	}
	return files, t, plan, nil
}

// simulateTrips simulates the trips of t into the file trips and, with
// gpsEvery > 0, their GPS traces into points.csv and traces.gpx in dir.
func simulateTrips(ctx context.Context, files *runFiles, t *town.Town, opts town.SimOptions, trips, dir string, gpsEvery int) (town.Stats, error) {
	var stats town.Stats
	simulate := func() error {
		return files.write(trips, kindTown, func(w io.Writer) error {
			var err error
			stats, err = t.Simulate(ctx, opts, w)
			return err
		})
	}
	if gpsEvery <= 0 {
		return stats, simulate()
	}
	var gpx []town.Trace
	opts.TraceEvery = gpsEvery
	err := files.write(filepath.Join(dir, "points.csv"), kindTown, func(w io.Writer) error {
		points := town.NewPointsWriter(w)
		opts.OnTrace = func(tr town.Trace) error {
			if len(gpx) < gpxTraces {
				gpx = append(gpx, tr)
			}
			return points.Write(tr)
		}
		if err := simulate(); err != nil {
			return err
		}
		return points.Flush()
	})
	if err != nil {
		return stats, err
	}
	return stats, files.write(filepath.Join(dir, "traces.gpx"), kindTown, func(w io.Writer) error {
		return town.WriteGPX(w, "narrows "+version, gpx)
	})
}

// gpxTraces is how many GPS traces simulate also writes as GPX.
const gpxTraces = 50

// inclusive turns a plan's half-open period into the FROM..TO form of the
// command line and study files.
func inclusive(p town.Period) string {
	return p.From.Format(time.DateOnly) + ".." + p.To.AddDate(0, 0, -1).Format(time.DateOnly)
}

// studyTemplate is the study file of a simulated town, with paths relative
// to the folder that holds the town's files in subfolder "town". It is the
// example study file in testdata/ too (a test keeps the two equal).
func studyTemplate(townName string, plan town.Plan, focus string) string {
	slug := strings.ToLower(townName)
	return fmt.Sprintf(`# narrows study file. Paths are relative to this file.
title = "%[1]s: the new river crossing, before and after"
time_zone = "%[2]s"
output = "out"
name = "report"
scheme = "town/%[3]s-after.osm"

[regions]
osm = "town/%[3]s-before.osm"
snap_metres = 20

[trips]
files = ["town/trips.csv"]
format = "trips"

[[windows]]
name = "all"
from = "00:00"
to = "24:00"

[scan]
days = "weekdays"
min_trips = 10
support = 0.3

[compare]
before = "%[4]s"
after = "%[5]s"
focus = "%[6]s"
%[7]s`, townName, plan.Location.String(), slug, inclusive(plan.Before), inclusive(plan.After), focus, openingLine(plan))
}

// openingLine is the study file's line with the day the scenario's change
// begins, for the timeline's mark, or nothing for the control.
func openingLine(plan town.Plan) string {
	if day := plan.Opening(); day != nil {
		return fmt.Sprintf("opening = %q\n", day.Format(time.DateOnly))
	}
	return ""
}

func runSimulate(ctx context.Context, env *environment, args []string) error {
	fs := newFlagSet(env, "simulate", "--size town|city --out DIR [--seed N] [--days N] [--scenario link|control|season|growth] [--trips-per-day N]")
	var size, out, kind string
	var seed int64
	var days, perDay, gpsEvery int
	var noStudy bool
	fs.StringVar(&size, "size", string(town.SizeTown), "town (the demo, about 50 regions) or city (about 1,500 regions, for benchmarks)")
	fs.StringVar(&out, "out", "", "folder to write the OSM files, trips.csv and study.toml into")
	fs.Int64Var(&seed, "seed", 1, "seed of every random draw: the same seed gives the same bytes")
	fs.IntVar(&days, "days", 0, "days to simulate (default: the scenario's eight weeks)")
	fs.IntVar(&perDay, "trips-per-day", 0, "fleet trips on an average weekday (default: the scenario's)")
	fs.StringVar(&kind, "scenario", "link", "link (a new river crossing opens half-way), control (nothing changes), season (a quarter fewer trips and a tenth faster everywhere from half-way) or growth (a quarter more trips and a tenth slower everywhere)")
	env.files.bindForce(fs)
	fs.BoolVar(&noStudy, "no-study", false, "write the town and its trips only, without study.toml (for --days shorter than the study's periods)")
	fs.IntVar(&gpsEvery, "gps-every", 0, "also write GPS traces of every `n`-th trip to points.csv and the first 50 to traces.gpx")
	if err := parseFlags(env, fs, args); err != nil {
		return err
	}
	if out == "" {
		return usagef("--out is required")
	}
	if days < 0 || perDay < 0 || gpsEvery < 0 {
		return usagef("--days, --trips-per-day and --gps-every must be positive")
	}
	if !noStudy {
		if err := checkSimulatedDays(kind, days); err != nil {
			return err
		}
	}
	files, t, plan, err := simulateTown(ctx, env, filepath.Join(out, "town"), town.Size(size), seed, kind, days, perDay, gpsEvery)
	if err != nil {
		return err
	}
	if noStudy {
		fmt.Fprintf(env.stdout, "wrote %s, %s and %s\n", files.before, files.after, files.trips)
		return nil
	}
	studyPath, err := writeStudy(env.files, out, t, plan)
	if err != nil {
		return err
	}
	fmt.Fprintf(env.stdout, "wrote %s, %s, %s and %s\n", files.before, files.after, files.trips, studyPath)
	return nil
}

// writeStudy writes the study file of a simulated town into dir, whose
// subfolder "town" holds the town's files, and returns its path.
func writeStudy(files *runFiles, dir string, t *town.Town, plan town.Plan) (string, error) {
	path := filepath.Join(dir, "study.toml")
	return path, files.write(path, kindStudy, func(w io.Writer) error {
		_, err := io.WriteString(w, studyTemplate(t.Name, plan, focusOf(t)))
		return err
	})
}

// focusOf is the --focus of a town's new link: its midpoint and a radius
// that takes in the regions on both banks.
func focusOf(t *town.Town) string {
	return fmt.Sprintf("%.5f,%.5f@800", t.LinkMidpoint[0], t.LinkMidpoint[1])
}

func runDemo(ctx context.Context, env *environment, args []string) error {
	fs := newFlagSet(env, "demo", "[--dir DIR] [--seed N]")
	var dir string
	var seed int64
	fs.StringVar(&dir, "dir", "narrows-demo", "folder for the town, its trips, the study file and the report")
	fs.Int64Var(&seed, "seed", 1, "seed of the town and its trips")
	env.files.bindForce(fs)
	if err := parseFlags(env, fs, args); err != nil {
		return err
	}
	start := time.Now()
	fmt.Fprintln(env.stdout, "narrows demo: a fictional town with a known weakness")
	_, t, plan, err := simulateTown(ctx, env, filepath.Join(dir, "town"), town.SizeTown, seed, "link", 0, 0, 0)
	if err != nil {
		return err
	}
	studyPath, err := writeStudy(env.files, dir, t, plan)
	if err != nil {
		return err
	}
	s, err := loadStudy(studyPath)
	if err != nil {
		return err
	}
	if err := s.run(ctx, env, dir, studyPath); err != nil {
		return err
	}
	fmt.Fprintf(env.stdout, "demo done in %.1f s. The planted weakness: trips between %s and %s across the river.\n",
		time.Since(start).Seconds(), t.Housing.Name, t.Jobs.Name)
	fmt.Fprintf(env.stdout, "Open %s, or re-run the study with: narrows run %s\n",
		filepath.Join(dir, "out", "report.html"), studyPath)
	return nil
}

// checkSimulatedDays refuses a --days that ends the simulation before the
// study periods that simulate writes into study.toml: the study would
// compare days without data.
func checkSimulatedDays(kind string, days int) error {
	plan, err := town.Scenario(kind)
	if err != nil || days <= 0 {
		return nil // simulateTown reports a bad scenario
	}
	last := plan.Before.From.AddDate(0, 0, days-1)
	if need := plan.After.To.AddDate(0, 0, -1); last.Before(need) {
		n := int(need.Sub(plan.Before.From).Hours()/24+0.5) + 1
		return usagef("--days %d: the simulation would end on %s, but the study's periods run from %s to %s; give --days %d or more, or --no-study for the town and trips alone",
			days, last.Format(time.DateOnly), plan.Before.From.Format(time.DateOnly), need.Format(time.DateOnly), n)
	}
	return nil
}
