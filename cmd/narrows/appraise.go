package main

import (
	"context"
	"fmt"
	"io"
	"path/filepath"
	"slices"
	"time"

	"narrows/partition"
	"narrows/partition/route"
	"narrows/patterns"
	"narrows/patterns/appraise"
	"narrows/regiongraph"
	"narrows/report"
)

// runAppraise appraises candidate links for a finding of a study's
// (before) period: the scheme's new roads and generated links.
func runAppraise(ctx context.Context, env *environment, args []string) error {
	fs := newFlagSet(env, "appraise", "[--finding RANK] [--generate N] [--min-class CLASS] [--candidate TEXT ...] study.toml")
	rank := fs.Int("finding", 1, "rank of the finding to appraise (1 = costliest)")
	var file string
	var flagOpts appraise.Options
	fs.IntVar(&flagOpts.Generate, "generate", -1, "candidates to generate (default: the study's, else 5)")
	fs.StringVar(&flagOpts.MinClass, "min-class", "", "lowest road class at whose junctions generated links end (default tertiary)")
	fs.Func("candidate", "a candidate of yours, added to the study's: `way/N` of the scheme extract, or \"CLASS [bridge] LON,LAT LON,LAT ...\" (repeatable)", func(v string) error {
		flagOpts.Candidates = append(flagOpts.Candidates, v)
		return nil
	})
	env.files.bindForce(fs)
	file, err := parseStudyArgs(env, fs, args)
	if err != nil {
		return err
	}
	s, err := loadStudy(file)
	if err != nil {
		return err
	}
	opts := s.Appraise
	if flagOpts.Generate >= 0 {
		opts.Generate = flagOpts.Generate
	}
	if flagOpts.MinClass != "" {
		opts.MinClass = flagOpts.MinClass
	}
	opts.Candidates = append(slices.Clone(opts.Candidates), flagOpts.Candidates...)
	for _, c := range opts.Candidates {
		if _, err := appraise.ParseSpec(c); err != nil {
			return fmt.Errorf("study file %s [appraise] candidates or --candidate: %v", file, err)
		}
	}
	r := &studyRun{study: s, file: file, dir: filepath.Dir(file)}
	out := filepath.Join(r.rel(s.Output), fmt.Sprintf("appraisal-finding-%d", *rank))
	book, layer := out+".xlsx", out+".geojson"
	env.files.read(file)
	if err := env.files.claimAll([]output{{book, kindAppraisal}, {layer, kindCandidatesLayer}}); err != nil {
		return err
	}
	// The regions and the store as run analyses them, so that a finding's
	// rank here is its rank in the study's report.
	regions, sum, err := regionsInMemory(ctx, env, r.rel(s.Regions.OSM), s.Regions.Options)
	if err != nil {
		return err
	}
	var inputs []regiongraph.Input
	for _, t := range s.Trips.Files {
		inputs = append(inputs, regiongraph.Input{Path: r.rel(t), Format: s.Trips.Format})
	}
	store, err := regiongraph.Ingest(ctx, regions, sum, inputs, s.Trips.Options)
	if err != nil {
		return err
	}
	if store, err = s.applyExclusions(store, len(regions.Regions)); err != nil {
		return fmt.Errorf("study file %s: %v", file, err)
	}
	beforeOpts, afterOpts := s.Scan.ScanOptions, patterns.ScanOptions{}
	hasAfter := s.Compare.Before.from != ""
	if hasAfter {
		if beforeOpts, afterOpts, err = s.periods(); err != nil {
			return fmt.Errorf("study file %s: %v", file, err)
		}
	}
	scan, err := patterns.ScanStore(ctx, store, beforeOpts)
	if err != nil {
		return fmt.Errorf("study file %s: %w", file, err)
	}
	if *rank < 1 || *rank > len(scan.Findings) {
		return fmt.Errorf("study file %s: no finding of rank %d (the period has %d findings)", file, *rank, len(scan.Findings))
	}
	f := scan.Findings[*rank-1]
	trips, err := findingTrips(ctx, regions, inputs, s.Trips.Options, f, scan.Window, scan.Days)
	if err != nil {
		return err
	}
	net, err := route.Build(ctx, regions.Routing, route.DefaultOptions())
	if err != nil {
		return fmt.Errorf("%s: %w", s.Regions.OSM, err)
	}
	var cands []appraise.Candidate
	scheme, err := parseScheme(s.Scheme)
	if err != nil {
		return fmt.Errorf("study file %s: %v", file, err)
	}
	var after *partition.Routing
	if scheme.extract != "" {
		if after, err = partition.ReadRouting(ctx, r.rel(scheme.extract), s.Regions.Options); err != nil {
			return err
		}
		cands = append(cands, appraise.FromRoads(partition.NewRoads(regions.Routing, after))...)
	}
	mine, err := appraise.UserCandidates(opts.Candidates, after)
	if err != nil {
		return fmt.Errorf("study file %s: %v", file, err)
	}
	cands = append(cands, mine...)
	var pairs [][2]int
	for _, e := range f.Edges {
		pairs = append(pairs, [2]int{e.From, e.To})
	}
	gen, err := appraise.Generate(net, regions, pairs, opts)
	if err != nil {
		return err
	}
	cands = append(cands, gen...)
	a, err := appraise.Appraise(ctx, net, trips, len(scan.Days), cands, opts)
	if err != nil {
		return fmt.Errorf("finding %s: %w", f.ID, err)
	}
	var observed *report.AppraisalObserved
	if hasAfter && scheme.extract != "" {
		afterScan, err := patterns.ScanStore(ctx, store, afterOpts)
		if err != nil {
			return err
		}
		afterTrips, err := findingTrips(ctx, regions, inputs, s.Trips.Options, f, afterScan.Window, afterScan.Days)
		if err != nil {
			return err
		}
		m, sec := appraise.ObservedSaving(pairsOf(trips), pairsOf(afterTrips), len(scan.Days))
		observed = &report.AppraisalObserved{Name: "the scheme", Metres: m, Seconds: sec}
	}
	place := report.PlaceName(f, regions)
	if err := report.WriteAppraisalText(env.stdout, place, a, observed); err != nil {
		return err
	}
	created, _ := time.Parse(time.DateOnly, scan.Days[len(scan.Days)-1])
	if err := env.files.write(book, kindAppraisal, func(w io.Writer) error {
		return report.WriteAppraisalWorkbook(w, place, a, observed, created)
	}); err != nil {
		return err
	}
	if err := env.files.write(layer, kindCandidatesLayer, func(w io.Writer) error {
		return report.WriteAppraisalGeoJSON(w, place, a)
	}); err != nil {
		return err
	}
	fmt.Fprintf(env.stdout, "wrote %s and %s; to keep a candidate when the inputs change, list its text (in both) in the study's [appraise] candidates\n", book, layer)
	return nil
}

// The outputs of narrows appraise.
const (
	kindAppraisal       outputKind = "appraisal workbook" // .xlsx of narrows appraise
	kindCandidatesLayer outputKind = "candidates layer"   // map layer of narrows appraise
)

// findingTrips reads the trips of a finding's edges on the given days.
func findingTrips(ctx context.Context, regions *partition.Partition, inputs []regiongraph.Input, opts regiongraph.Options, f patterns.Finding, window string, days []string) ([]regiongraph.Trip, error) {
	pairs := map[[2]int]bool{}
	for _, e := range f.Edges {
		pairs[[2]int{e.From, e.To}] = true
	}
	return regiongraph.ReadTrips(ctx, regions, inputs, opts, func(t *regiongraph.Trip) bool {
		if t.Window != window || !pairs[[2]int{t.From, t.To}] {
			return false
		}
		_, ok := slices.BinarySearch(days, t.Day)
		return ok
	})
}

func pairsOf(trips []regiongraph.Trip) []struct{ Metres, Seconds float64 } {
	out := make([]struct{ Metres, Seconds float64 }, len(trips))
	for i, t := range trips {
		out[i].Metres, out[i].Seconds = t.DistanceMetres, t.DurationSeconds
	}
	return out
}
