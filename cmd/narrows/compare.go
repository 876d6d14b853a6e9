package main

import (
	"context"
	"fmt"
	"math"
	"path/filepath"
	"strconv"
	"strings"
	"time"

	"github.com/paulmach/orb"

	"narrows/partition"
	"narrows/patterns"
	"narrows/regiongraph"
	"narrows/report"
)

// parseFocus parses --focus: region ids "12,15,18", or a point and radius
// "LON,LAT@METRES" (the scheme's location).
func parseFocus(s string) (*patterns.Focus, error) {
	if s = strings.TrimSpace(s); s == "" {
		return nil, nil
	}
	if pt, radius, ok := strings.Cut(s, "@"); ok {
		parts := strings.Split(pt, ",")
		if len(parts) != 2 {
			return nil, fmt.Errorf("want LON,LAT@METRES such as 8.512,0.734@600, got %q", s)
		}
		lon, err1 := strconv.ParseFloat(strings.TrimSpace(parts[0]), 64)
		lat, err2 := strconv.ParseFloat(strings.TrimSpace(parts[1]), 64)
		r, err3 := strconv.ParseFloat(strings.TrimSpace(radius), 64)
		if err1 != nil || err2 != nil || err3 != nil || lon < -180 || lon > 180 || lat < -90 || lat > 90 || r <= 0 {
			return nil, fmt.Errorf("want LON,LAT@METRES with a positive radius, got %q", s)
		}
		p := orb.Point{lon, lat}
		return &patterns.Focus{Point: &p, RadiusMetres: r}, nil
	}
	f := &patterns.Focus{}
	for _, id := range splitList(s) {
		n, err := strconv.Atoi(id)
		if err != nil || n < 1 {
			return nil, fmt.Errorf("want region ids such as 12,15 or LON,LAT@METRES, got %q", s)
		}
		f.Regions = append(f.Regions, n)
	}
	if len(f.Regions) == 0 {
		return nil, fmt.Errorf("want region ids such as 12,15 or LON,LAT@METRES, got %q", s)
	}
	return f, nil
}

func runCompare(ctx context.Context, env *environment, args []string) error {
	fs := newFlagSet(env, "compare", "--graphs G.parquet --before D1..D2 --after D3..D4 [scan options] [--focus IDS|LON,LAT@METRES] --out report.xlsx")
	var graphs, regionsPath, before, after, focus, out, title string
	var alpha float64
	var minPublish int
	var sf scanFlags
	fs.StringVar(&graphs, "graphs", "", "day-graph store written by 'narrows ingest'")
	fs.StringVar(&regionsPath, "regions", "", "regions GeoJSON (default: the regions recorded in the store)")
	fs.StringVar(&before, "before", "", "before period `FROM..TO` (inclusive days YYYY-MM-DD)")
	fs.StringVar(&after, "after", "", "after period `FROM..TO` (inclusive days YYYY-MM-DD)")
	fs.StringVar(&focus, "focus", "", "pairs around a scheme: region ids `12,15` or a point and radius LON,LAT@METRES")
	fs.Float64Var(&alpha, "alpha", patterns.DefaultCompareOptions().Alpha, "significance level after Benjamini-Hochberg adjustment")
	fs.IntVar(&minPublish, "min-publish", 10, "cells from fewer trips than this are shown suppressed")
	fs.StringVar(&title, "title", "", "study title for the report")
	fs.StringVar(&out, "out", "", "workbook (.xlsx) to write; map layers and the HTML page are written beside it")
	sf.register(fs)
	if err := parseFlags(env, fs, args); err != nil {
		return err
	}
	if graphs == "" || before == "" || after == "" || out == "" {
		return usagef("--graphs, --before, --after and --out are required")
	}
	scanOpts, err := sf.options()
	if err != nil {
		return err
	}
	b, a := scanOpts, scanOpts
	if b.From, b.To, err = parsePeriod(before); err != nil {
		return usagef("--before: %v", err)
	}
	if a.From, a.To, err = parsePeriod(after); err != nil {
		return usagef("--after: %v", err)
	}
	copts := patterns.DefaultCompareOptions()
	copts.Alpha = alpha
	if copts.Focus, err = parseFocus(focus); err != nil {
		return usagef("--focus: %v", err)
	}
	if !strings.HasSuffix(strings.ToLower(out), ".xlsx") {
		return usagef("--out: the workbook name must end in .xlsx, got %q", out)
	}
	store, regions, err := openStore(graphs, regionsPath, scanOpts)
	if err != nil {
		return err
	}
	if title == "" {
		title = "Before and after: " + before + " against " + after
	}
	settings := [][2]string{{"day-graph store", graphs}, {"before", before}, {"after", after}, {"focus", focus}}
	settings = append(settings, scanSettings(scanOpts)...)
	settings = append(settings, [2]string{"alpha", strconv.FormatFloat(alpha, 'g', -1, 64)})
	return compareAndReport(ctx, env, compareJob{
		store: store, regions: regions, before: b, after: a, opts: copts,
		out: out, title: title, minPublish: minPublish, settings: settings,
	})
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
}

func compareAndReport(ctx context.Context, env *environment, job compareJob) error {
	start := time.Now()
	cmp, err := patterns.Compare(ctx, job.store, job.regions, job.before, job.after, job.opts)
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
		PublicationMinTrips: job.minPublish,
		Version:             version,
	}
	dir, err := outputDir(job.out)
	if err != nil {
		return err
	}
	base := strings.TrimSuffix(filepath.Base(job.out), filepath.Ext(job.out))
	paths, err := writeReport(dir, base, in)
	if err != nil {
		return err
	}
	if days := cmp.Before.Days; len(days) > 0 {
		fmt.Fprintf(env.stdout, "Top weak links before (%d analysed days, %s to %s):\n", len(days), days[0], days[len(days)-1])
	}
	printFindings(env.stdout, cmp.Before, job.regions, 5)
	fmt.Fprintln(env.stdout, report.Headline(in))
	for _, p := range paths {
		fmt.Fprintln(env.stdout, "  wrote", p)
	}
	fmt.Fprintf(env.stdout, "compared %d + %d days in %.2f s\n", len(cmp.Before.Days), len(cmp.After.Days), time.Since(start).Seconds())
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
