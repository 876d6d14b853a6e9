package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"strconv"
	"strings"
	"time"

	"narrows/partition"
	"narrows/patterns"
	"narrows/regiongraph"
	"narrows/report"
)

func runCompare(ctx context.Context, env *environment, args []string) error {
	fs := newFlagSet(env, "compare", "--graphs G.parquet --before D1..D2 --after D3..D4 [scan options] [--focus IDS|LON,LAT@METRES] [--osm FILE] [--scheme SPEC] --out report.xlsx")
	var in storeFlags
	var before, after periodValue
	var out, title, osmPath, schemeText, mapOut string
	in.register(fs)
	fs.StringVar(&osmPath, "osm", "", "OSM extract the regions were built from; its roads, railways and water are drawn on the maps")
	fs.StringVar(&schemeText, "scheme", "", "scheme highlighted on the maps: `way/N ...` of the --osm extract, a line \"LON,LAT LON,LAT ...\", or an extract with the scheme built")
	fs.Var(&before, "before", "before period `FROM..TO` (inclusive days YYYY-MM-DD)")
	fs.Var(&after, "after", "after period `FROM..TO` (inclusive days YYYY-MM-DD)")
	scanOpts, copts := patterns.DefaultScanOptions(), patterns.DefaultCompareOptions()
	var focus *focusValue
	compareFlags := bindOptions(fs, func(fs *flag.FlagSet) { focus = bindCompare(fs, &copts) })
	minPublish := report.DefaultPublicationMinTrips
	fs.IntVar(&minPublish, "min-publish", minPublish, "cells from fewer trips than this are shown suppressed")
	fs.StringVar(&title, "title", "", "study title for the report")
	fs.StringVar(&mapOut, "map", "", "also write the report's map alone to `FILE.svg` or FILE.png")
	fs.StringVar(&out, "out", "", "workbook `STEM.xlsx` to write; STEM-regions.geojson, STEM-findings.geojson and STEM.html are written beside it")
	env.files.bindForce(fs)
	scanFlags := bindOptions(fs, func(fs *flag.FlagSet) { bindScan(fs, &scanOpts) })
	if err := parseFlags(env, fs, args); err != nil {
		return err
	}
	if in.graphs == "" || before.from == "" || after.from == "" || out == "" {
		return usagef("--graphs, --before, --after and --out are required")
	}
	if err := scanFlags.check(scanOpts.Validate()); err != nil {
		return err
	}
	if err := compareFlags.check(copts.Validate()); err != nil {
		return err
	}
	if !strings.HasSuffix(strings.ToLower(out), ".xlsx") {
		return usagef("--out: the workbook name must end in .xlsx, got %q", out)
	}
	if ext := strings.ToLower(filepath.Ext(mapOut)); mapOut != "" && ext != ".svg" && ext != ".png" {
		return usagef("--map: the picture's name must end in .svg or .png, got %q", mapOut)
	}
	spec, err := parseScheme(schemeText)
	if err != nil {
		return usagef("--scheme: %v", err)
	}
	if osmPath == "" && (len(spec.ways) > 0 || spec.extract != "") {
		return usagef("--scheme: way ids and an after extract are found against the network of --osm; give --osm")
	}
	env.files.read(in.graphs, in.regions, osmPath, spec.extract)
	outs := reportOutputs(filepath.Dir(out), filepath.Base(stemOf(out)))
	if mapOut != "" {
		outs = append(outs, output{mapOut, kindMapPicture})
	}
	if err := env.files.claimAll(outs); err != nil {
		return err
	}
	store, regions, err := in.openCompare(scanOpts)
	if err != nil {
		return err
	}
	if err := checkComparison(in.graphs, store, regions, before.apply(scanOpts), after.apply(scanOpts), copts); err != nil {
		return err
	}
	var extra []regiongraph.Source
	var scheme []partition.NetworkLine
	if extra, scheme, err = compareNetwork(ctx, regions, osmPath, spec); err != nil {
		return err
	}
	if title == "" {
		title = "Before and after: " + before.String() + " against " + after.String()
	}
	settings := [][2]string{{"day-graph store", in.graphs}, {"before", before.String()}, {"after", after.String()}, {"focus", focus.String()}}
	if osmPath != "" {
		settings = append(settings, [2]string{"extract", filepath.Base(osmPath)})
	}
	if schemeText != "" {
		settings = append(settings, [2]string{"scheme", schemeText})
	}
	settings = append(settings, scanSettings(scanOpts)...)
	settings = append(settings, [2]string{"alpha", strconv.FormatFloat(copts.Alpha, 'g', -1, 64)})
	return compareAndReport(ctx, env, compareJob{
		store: store, regions: regions, before: before.apply(scanOpts), after: after.apply(scanOpts), opts: copts,
		out: out, mapOut: mapOut, title: title, minPublish: minPublish, settings: settings,
		extraInputs: extra, scheme: scheme,
	})
}

// compareNetwork reads the linework of the extract at osmPath, if given,
// into regions.Network (the regions GeoJSON carries none) and resolves
// the scheme against it. It returns the extracts read, with their hashes,
// for the report's inputs, and the scheme's lines.
func compareNetwork(ctx context.Context, regions *partition.Partition, osmPath string, spec schemeSpec) ([]regiongraph.Source, []partition.NetworkLine, error) {
	opts := partition.DefaultOptions()
	if b := regions.Bound; !b.IsZero() && !b.IsEmpty() {
		opts.BBox = &b
	}
	var paths []string
	if osmPath != "" {
		network, err := partition.ReadNetwork(ctx, osmPath, opts)
		if err != nil {
			return nil, nil, err
		}
		regions.Network = network
		paths = append(paths, osmPath)
	}
	if spec.extract != "" {
		paths = append(paths, spec.extract)
	}
	var sources []regiongraph.Source
	for _, p := range paths {
		src, err := sourceOf(p)
		if err != nil {
			return nil, nil, err
		}
		sources = append(sources, src)
	}
	scheme, err := spec.lines(ctx, regions, func(p string) string { return p }, opts)
	if err != nil {
		return nil, nil, fmt.Errorf("--scheme: %v", err)
	}
	return sources, scheme, nil
}

// compareJob is one before/after comparison and its report.
type compareJob struct {
	store         *regiongraph.Store
	regions       *partition.Partition
	before, after patterns.ScanOptions
	opts          patterns.CompareOptions
	out, title    string
	minPublish    int
	settings      [][2]string
	extraInputs   []regiongraph.Source
	scheme        []partition.NetworkLine // highlighted on the maps
	mapOut        string                  // the map alone, .svg or .png; "" for none
	appraisal     *report.Appraisal       // candidate links for a finding (optional)
	exclusions    patterns.Exclusions     // already applied; listed in the report
}

func compareAndReport(ctx context.Context, env *environment, job compareJob) error {
	start := time.Now()
	update, finish := stageProgress(env)
	job.before.Progress, job.after.Progress = update, update
	cmp, err := patterns.Compare(ctx, job.store, job.regions, job.before, job.after, job.opts)
	finish()
	if err != nil {
		return err
	}
	in := report.Input{
		Title:               job.title,
		Inputs:              append(append([]regiongraph.Source(nil), job.extraInputs...), job.store.Meta.Sources...),
		Settings:            job.settings,
		Regions:             job.regions,
		Store:               &job.store.Meta,
		Scan:                cmp.Before,
		Comparison:          cmp,
		Scheme:              job.scheme,
		Appraisal:           job.appraisal,
		Exclusions:          job.exclusions,
		PublicationMinTrips: job.minPublish,
		Version:             version,
	}
	dir, err := outputDir(job.out)
	if err != nil {
		return err
	}
	if days := cmp.Before.Days; len(days) > 0 {
		fmt.Fprintf(env.stdout, "Top weak links before (%d analysed days, %s to %s):\n", len(days), days[0], days[len(days)-1])
	}
	printFindings(env.stdout, cmp.Before, job.regions, 5)
	printGroupBound(env.stdout, cmp.Before)
	printGroupBound(env.stdout, cmp.After)
	base := strings.TrimSuffix(filepath.Base(job.out), filepath.Ext(job.out))
	if err := writeReport(env, dir, base, in); err != nil {
		return err
	}
	if job.mapOut != "" {
		write := report.WriteMapSVG
		if strings.EqualFold(filepath.Ext(job.mapOut), ".png") {
			write = report.WriteMapPNG
		}
		if err := env.files.write(job.mapOut, kindMapPicture, func(w io.Writer) error { return write(w, in) }); err != nil {
			return err
		}
		fmt.Fprintln(env.stdout, "  wrote", job.mapOut)
	}
	fmt.Fprintf(env.stdout, "compared %d + %d days in %.2f s\n", len(cmp.Before.Days), len(cmp.After.Days), time.Since(start).Seconds())
	return nil
}

// writeReport writes the workbook, map layers and HTML page of a study
// into dir under the base name, and prints the headline and what it wrote.
func writeReport(env *environment, dir, base string, in report.Input) error {
	paths, err := writeReportFiles(env.files, dir, base, in)
	if err != nil {
		return err
	}
	fmt.Fprintln(env.stdout, report.Headline(in))
	if n := report.NetworkChange(in); n != "" {
		fmt.Fprintln(env.stdout, n)
	}
	for _, p := range paths {
		fmt.Fprintln(env.stdout, "  wrote", p)
	}
	return nil
}

// scanSettings lists scan thresholds for the report's settings table.
func scanSettings(o patterns.ScanOptions) [][2]string {
	f := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	detour := f(o.Skyline.DetourFloor)
	if o.Skyline.NoDetourGate {
		detour = "off"
	}
	speed := "below the day's trip-weighted median"
	if o.Skyline.NoSpeedGate {
		speed = "off"
	}
	window := o.Window
	if window == "" {
		window = "(first in store)"
	}
	return [][2]string{
		{"window", window},
		{"days", string(o.Days)},
		{"excluded days", strings.Join(o.Exclude, ", ")},
		{"min trips per pair and day", strconv.Itoa(o.Skyline.MinTrips)},
		{"skyband k", strconv.Itoa(o.Skyline.K)},
		{"detour floor", detour},
		{"speed gate", speed},
		{"support (share of days)", f(o.Support)},
		{"largest group (edges)", strconv.Itoa(o.MaxGroupEdges)},
		{"maximal groups only", strconv.FormatBool(o.MaximalOnly)},
		{"reference speed (km/h)", f(math.Round(o.ReferenceSpeed*3.6*1000) / 1000)},
	}
}
