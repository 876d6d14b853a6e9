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
	fs := newFlagSet(env, "appraise", "[--finding RANK] [--generate N] [--min-class CLASS] [--speeds free-flow|observed] [--candidate TEXT ...] study.toml")
	rank := fs.Int("finding", 1, "rank of the finding to appraise (1 = costliest)")
	var file string
	var flagOpts appraise.Options
	fs.IntVar(&flagOpts.Generate, "generate", -1, "candidates to generate (default: the study's, else 5)")
	fs.StringVar(&flagOpts.MinClass, "min-class", "", "lowest road class at whose junctions generated links end (default tertiary)")
	fs.StringVar(&flagOpts.Speeds, "speeds", "", "times of the routes: free-flow, or observed (free-flow times scaled by the finding's own pace); default: the study's, else free-flow")
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
	if flagOpts.Speeds != "" {
		opts.Speeds = flagOpts.Speeds
	}
	opts.Candidates = append(slices.Clone(opts.Candidates), flagOpts.Candidates...)
	if err := checkAppraise(file, opts); err != nil {
		return err
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
	trips, _ := r.tripFiles()
	inputs := tripInputs(trips, s.Trips.Format)
	trOpts, kept, err := r.keepTrips()
	if err != nil {
		return err
	}
	store, err := regiongraph.Ingest(ctx, regions, sum, inputs, trOpts)
	if err != nil {
		return err
	}
	if store, err = s.applyExclusions(store, len(regions.Regions)); err != nil {
		return fmt.Errorf("study file %s: %v", file, err)
	}
	ap, created, err := r.appraiseFinding(ctx, regions, store, *kept, *rank, opts)
	if err != nil {
		return err
	}
	if err := report.WriteAppraisalText(env.stdout, *ap); err != nil {
		return err
	}
	if err := env.files.write(book, kindAppraisal, func(w io.Writer) error {
		return report.WriteAppraisalWorkbook(w, *ap, created)
	}); err != nil {
		return err
	}
	if err := env.files.write(layer, kindCandidatesLayer, func(w io.Writer) error {
		return report.WriteAppraisalGeoJSON(w, *ap)
	}); err != nil {
		return err
	}
	fmt.Fprintf(env.stdout, "wrote %s and %s; to keep a candidate when the inputs change, list its text (in both) in the study's [appraise] candidates\n", book, layer)
	return nil
}

// The outputs of narrows appraise.
const (
	kindAppraisal       outputKind = "appraisal workbook" // .xlsx of narrows appraise
	kindCandidatesLayer outputKind = "candidates layer"   // map layer of narrows appraise and of a report with an appraisal
)

// candidatesOutput is the candidates layer of a report named from base in
// dir, written when the report has an appraisal.
func candidatesOutput(dir, base string) output {
	return output{filepath.Join(dir, base) + "-candidates.geojson", kindCandidatesLayer}
}

// checkAppraise checks the appraisal's options and the candidates' text.
func checkAppraise(file string, opts appraise.Options) error {
	if err := opts.Check(); err != nil {
		return fmt.Errorf("study file %s: [appraise] or its flag: %v", file, err)
	}
	for _, c := range opts.Candidates {
		if _, err := appraise.ParseSpec(c); err != nil {
			return fmt.Errorf("study file %s [appraise] candidates or --candidate: %v", file, err)
		}
	}
	return nil
}

// keepTrips returns the study's ingest options set to keep, in the same
// pass that builds the day graphs, the trips of the analysed window (of
// either period), into the returned slice: the appraisal re-routes some
// of them and the files are read once.
func (r *studyRun) keepTrips() (regiongraph.Options, *[]regiongraph.Trip, error) {
	windows := map[string]bool{}
	before, after := r.Scan.ScanOptions, patterns.ScanOptions{}
	if r.Compare.Before.from != "" {
		var err error
		if before, after, err = r.periods(); err != nil {
			return regiongraph.Options{}, nil, fmt.Errorf("study file %s: %v", r.file, err)
		}
		windows[after.Window] = true
	}
	windows[before.Window] = true
	kept := new([]regiongraph.Trip)
	opts := r.Trips.Options
	opts.KeepTrip = func(t regiongraph.Trip) {
		if windows[""] || windows[t.Window] {
			*kept = append(*kept, t)
		}
	}
	return opts, kept, nil
}

// appraiseFinding appraises candidate links for the finding of the given
// rank in the study's (before) period: the scheme extract's new roads and
// the study's candidates as the user's, plus generated links. trips are
// the study's trips kept by keepTrips. With a comparison and a scheme
// extract, it adds the saving observed after the scheme opened. created
// is the last analysed day, the outputs' fixed creation time.
func (r *studyRun) appraiseFinding(ctx context.Context, regions *partition.Partition, store *regiongraph.Store, trips []regiongraph.Trip, rank int, opts appraise.Options) (*report.Appraisal, time.Time, error) {
	file := r.file
	beforeOpts, afterOpts := r.Scan.ScanOptions, patterns.ScanOptions{}
	hasAfter := r.Compare.Before.from != ""
	if hasAfter {
		var err error
		if beforeOpts, afterOpts, err = r.periods(); err != nil {
			return nil, time.Time{}, fmt.Errorf("study file %s: %v", file, err)
		}
	}
	scan, err := patterns.ScanStore(ctx, store, beforeOpts)
	if err != nil {
		return nil, time.Time{}, fmt.Errorf("study file %s: %w", file, err)
	}
	if rank < 1 || rank > len(scan.Findings) {
		return nil, time.Time{}, fmt.Errorf("study file %s: no finding of rank %d to appraise (the period has %d findings)", file, rank, len(scan.Findings))
	}
	f := scan.Findings[rank-1]
	before := findingTrips(trips, f, scan.Window, scan.Days)
	net, err := route.Build(ctx, regions.Routing, route.DefaultOptions())
	if err != nil {
		return nil, time.Time{}, fmt.Errorf("%s: %w", r.Regions.OSM, err)
	}
	var cands []appraise.Candidate
	scheme, err := parseScheme(r.Scheme)
	if err != nil {
		return nil, time.Time{}, fmt.Errorf("study file %s: %v", file, err)
	}
	var after *partition.Routing
	if scheme.extract != "" {
		if after, err = partition.ReadRouting(ctx, r.rel(scheme.extract), r.Regions.Options); err != nil {
			return nil, time.Time{}, err
		}
		cands = append(cands, appraise.FromRoads(partition.NewRoads(regions.Routing, after))...)
	}
	mine, err := appraise.UserCandidates(opts.Candidates, after)
	if err != nil {
		return nil, time.Time{}, fmt.Errorf("study file %s: %v", file, err)
	}
	cands = append(cands, mine...)
	var pairs [][2]int
	for _, e := range f.Edges {
		pairs = append(pairs, [2]int{e.From, e.To})
	}
	gen, err := appraise.Generate(net, regions, pairs, opts)
	if err != nil {
		return nil, time.Time{}, err
	}
	cands = append(cands, gen...)
	a, err := appraise.Appraise(ctx, net, before, len(scan.Days), cands, opts)
	if err != nil {
		return nil, time.Time{}, fmt.Errorf("study file %s: appraising weak link %s: %w", file, f.ID, err)
	}
	ap := &report.Appraisal{FindingID: f.ID, Place: report.PlaceName(f, regions), Result: a}
	if hasAfter && scheme.extract != "" {
		afterScan, err := patterns.ScanStore(ctx, store, afterOpts)
		if err != nil {
			return nil, time.Time{}, err
		}
		m, sec := appraise.ObservedSaving(pairsOf(before), pairsOf(findingTrips(trips, f, afterScan.Window, afterScan.Days)), len(scan.Days))
		ap.Observed = &report.AppraisalObserved{Name: "the scheme", Metres: m, Seconds: sec}
	}
	created, _ := time.Parse(time.DateOnly, scan.Days[len(scan.Days)-1])
	return ap, created, nil
}

// findingTrips returns the trips of a finding's edges in the window on
// the given (sorted) days.
func findingTrips(trips []regiongraph.Trip, f patterns.Finding, window string, days []string) []regiongraph.Trip {
	pairs := map[[2]int]bool{}
	for _, e := range f.Edges {
		pairs[[2]int{e.From, e.To}] = true
	}
	var out []regiongraph.Trip
	for _, t := range trips {
		if t.Window != window || !pairs[[2]int{t.From, t.To}] {
			continue
		}
		if _, ok := slices.BinarySearch(days, t.Day); ok {
			out = append(out, t)
		}
	}
	regiongraph.SortTrips(out)
	return out
}

func pairsOf(trips []regiongraph.Trip) []struct{ Metres, Seconds float64 } {
	out := make([]struct{ Metres, Seconds float64 }, len(trips))
	for i, t := range trips {
		out[i].Metres, out[i].Seconds = t.DistanceMetres, t.DurationSeconds
	}
	return out
}
