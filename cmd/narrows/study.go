package main

import (
	"context"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/BurntSushi/toml"

	"narrows/partition"
	"narrows/patterns"
	"narrows/patterns/appraise"
	"narrows/regiongraph"
	"narrows/report"
	"narrows/skyline"
)

// study is a study file: everything needed to re-run a study next year.
// Paths are relative to the study file. The options of the steps decode
// into the libraries' Options, pre-filled with their defaults (newStudy),
// so a study file sets only what it names.
type study struct {
	Title    string `toml:"title"`
	TimeZone string `toml:"time_zone"` // of the day graphs (default: the ingest's)
	Output   string `toml:"output"`    // folder for all outputs (default "out")
	Name     string `toml:"name"`      // base name of the workbook and HTML page (default "report")
	// Scheme is highlighted on the maps: way/N ids, a lon,lat line, or an
	// extract with the scheme built (see parseScheme).
	Scheme string `toml:"scheme"`

	Regions studyRegions  `toml:"regions"`
	Trips   studyTrips    `toml:"trips"`
	Windows []studyWindow `toml:"windows"`
	Scan    studyScan     `toml:"scan"`
	Compare studyCompare  `toml:"compare"`
	// Appraise sets the appraisal of candidate links (narrows appraise;
	// narrows run appraises the costliest finding too when the study lists
	// candidates or run is given --appraise).
	Appraise appraise.Options `toml:"appraise"`
	// appraiseAsked is run's --appraise.
	appraiseAsked bool
}

type studyRegions struct {
	OSM  string    `toml:"osm"`
	BBox bboxValue `toml:"bbox"`
	partition.Options
}

type studyTrips struct {
	Files       []string           `toml:"files"`
	Format      regiongraph.Format `toml:"format"`
	MaxDuration durationText       `toml:"max_duration"` // Go duration, e.g. "4h"
	regiongraph.Options
}

type studyWindow struct {
	Name string `toml:"name"`
	From string `toml:"from"`
	To   string `toml:"to"`
}

type studyScan struct {
	ReferenceSpeed kmhValue `toml:"reference_speed_kmh"`
	patterns.ScanOptions
	*skyline.Options // the ScanOptions' Skyline, whose keys stand in [scan]
	// Days and region pairs left out, each with its reason (the fields of
	// patterns.Exclusions; exclude stays a plain list of days).
	ExcludedDays  []patterns.DayExclusion  `toml:"excluded_days"`
	ExcludedPairs []patterns.PairExclusion `toml:"excluded_pairs"`
}

// exclusions returns the study's exclusions with their reasons.
func (s *studyScan) exclusions() patterns.Exclusions {
	return patterns.Exclusions{Days: s.ExcludedDays, Pairs: s.ExcludedPairs}
}

type studyCompare struct {
	Before     periodValue `toml:"before"`
	After      periodValue `toml:"after"`
	Focus      focusValue  `toml:"focus"`
	MinPublish int         `toml:"min_publish"`
	patterns.CompareOptions
}

// newStudy returns a study with every option at its default and the
// adapters pointing at the fields they fill.
func newStudy() *study {
	s := &study{
		Regions:  studyRegions{Options: partition.DefaultOptions()},
		Trips:    studyTrips{Format: regiongraph.FormatTrips, Options: regiongraph.DefaultOptions()},
		Scan:     studyScan{ScanOptions: patterns.DefaultScanOptions()},
		Compare:  studyCompare{MinPublish: report.DefaultPublicationMinTrips, CompareOptions: patterns.DefaultCompareOptions()},
		Appraise: appraise.DefaultOptions(),
	}
	s.Regions.BBox.b = &s.Regions.Options.BBox
	s.Trips.MaxDuration.d = &s.Trips.Options.MaxDuration
	s.Scan.ReferenceSpeed.mps = &s.Scan.ScanOptions.ReferenceSpeed
	s.Scan.Options = &s.Scan.ScanOptions.Skyline
	s.Compare.Focus.f = &s.Compare.CompareOptions.Focus
	return s
}

// loadStudy reads and checks a study file. Unknown keys are errors, so a
// misspelt threshold never silently falls back to its default.
func loadStudy(path string) (*study, error) {
	s := newStudy()
	md, err := toml.DecodeFile(path, s)
	if err != nil {
		return nil, fmt.Errorf("study file %s: %w", path, err)
	}
	if undecoded := md.Undecoded(); len(undecoded) > 0 {
		keys := make([]string, len(undecoded))
		for i, k := range undecoded {
			keys[i] = k.String()
		}
		return nil, fmt.Errorf("study file %s: unknown keys: %s", path, strings.Join(keys, ", "))
	}
	if s.Regions.OSM == "" {
		return nil, fmt.Errorf("study file %s: [regions] osm is required", path)
	}
	if len(s.Trips.Files) == 0 {
		return nil, fmt.Errorf("study file %s: [trips] files is required", path)
	}
	if s.Output == "" {
		s.Output = "out"
	}
	if s.Name == "" {
		s.Name = "report"
	}
	if err := s.checkPlaces(); err != nil {
		return nil, fmt.Errorf("study file %s: %v", path, err)
	}
	if _, err := parseScheme(s.Scheme); err != nil {
		return nil, fmt.Errorf("study file %s: %v", path, err)
	}
	if s.TimeZone != "" {
		s.Trips.TimeZone = s.TimeZone
	}
	if s.Trips.Format == "" {
		s.Trips.Format = regiongraph.FormatTrips
	}
	if s.Scan.Days == "" {
		s.Scan.Days = patterns.AllDays
	}
	if err := s.windows(); err != nil {
		return nil, fmt.Errorf("study file %s: %v", path, err)
	}
	if s.Compare.Before.from != "" || s.Compare.After.from != "" {
		if _, _, err := s.periods(); err != nil {
			return nil, fmt.Errorf("study file %s: %v", path, err)
		}
	}
	for _, v := range []struct {
		where string
		err   error
	}{
		{"[regions]", s.Regions.Validate()},
		{"[trips], [[windows]] or time_zone", s.Trips.Validate()},
		{"[scan]", s.Scan.Validate()},
		{"[scan]", s.Scan.exclusions().Validate(0)},
		{"[compare]", s.Compare.Validate()},
		{"[appraise]", s.Appraise.Check()},
	} {
		if v.err != nil {
			return nil, fmt.Errorf("study file %s: %s: %v", path, v.where, v.err)
		}
	}
	return s, nil
}

// windows sets the ingest's windows to the study's, if it names any.
func (s *study) windows() error {
	if len(s.Windows) == 0 {
		return nil
	}
	s.Trips.Windows = nil
	for _, w := range s.Windows {
		win, err := regiongraph.ParseWindow(w.Name + "=" + w.From + "-" + w.To)
		if err != nil {
			return fmt.Errorf("[[windows]]: %v", err)
		}
		s.Trips.Windows = append(s.Trips.Windows, win)
	}
	return nil
}

func runStudy(ctx context.Context, env *environment, args []string) error {
	fs := newFlagSet(env, "run", "[--output DIR] [--appraise] [--force] study.toml")
	var file, output string
	var appraiseAsked bool
	fs.StringVar(&output, "output", "", "folder for the outputs, anywhere (default: the study file's output, inside its folder)")
	fs.BoolVar(&appraiseAsked, "appraise", false, "appraise candidate links for the costliest weak link of the (before) period into the report (always when the study lists [appraise] candidates)")
	env.files.bindForce(fs)
	file, err := parseStudyArgs(env, fs, args)
	if err != nil {
		return err
	}
	s, err := loadStudy(file)
	if err != nil {
		return err
	}
	if output != "" {
		// Given on the command line, the folder may be anywhere.
		abs, err := filepath.Abs(output)
		if err != nil {
			return err
		}
		s.Output = abs
	}
	s.appraiseAsked = appraiseAsked
	return s.run(ctx, env, filepath.Dir(file), file)
}

// studyRun is one run of a study whose paths are relative to dir.
type studyRun struct {
	*study
	file, dir  string // the study file and its folder
	out, steps string // the output folder and its folder of intermediate files
	// appraise: the report has an appraisal of candidate links for the
	// costliest finding of the (before) period; kept are the trips the
	// ingest kept for it.
	appraise bool
	kept     *[]regiongraph.Trip
}

// rel resolves a path of the study file.
func (r *studyRun) rel(p string) string {
	if filepath.IsAbs(p) {
		return p
	}
	return filepath.Join(r.dir, p)
}

// run runs the whole pipeline of a study whose paths are relative to dir:
// regions, day graphs, then a scan of one period or a comparison of two,
// each with its report.
func (s *study) run(ctx context.Context, env *environment, dir, file string) error {
	r := &studyRun{study: s, file: file, dir: dir, appraise: s.appraiseAsked || len(s.Appraise.Candidates) > 0}
	r.out = r.rel(s.Output)
	r.steps = filepath.Join(r.out, "steps")
	if err := r.claimOutputs(env.files); err != nil {
		return err
	}
	if err := os.MkdirAll(r.steps, 0o755); err != nil {
		return err
	}
	fmt.Fprintln(env.stdout, "1/3 regions")
	regions, sum, err := buildRegions(ctx, env, r.rel(s.Regions.OSM), s.Regions.Options, filepath.Join(r.steps, "partition.geojson"))
	if err != nil {
		return err
	}
	scheme, err := r.schemeLines(ctx, regions)
	if err != nil {
		return err
	}
	fmt.Fprintln(env.stdout, "2/3 day graphs")
	store, err := r.dayGraphs(ctx, env, regions, sum)
	if err != nil {
		return err
	}
	return r.analyse(ctx, env, regions, scheme, store)
}

// analyse applies the study's exclusions to its day graphs, then scans its
// period or compares its two, and writes the findings and the report.
// run calls it after building the regions and day graphs; explore's
// "Write report" calls it with those it holds in memory.
func (r *studyRun) analyse(ctx context.Context, env *environment, regions *partition.Partition, scheme []partition.NetworkLine, store *regiongraph.Store) error {
	store, err := r.applyExclusions(store, len(regions.Regions))
	if err != nil {
		return fmt.Errorf("study file %s: %v", r.file, err)
	}
	in, err := r.reportInput(store, regions)
	if err != nil {
		return err
	}
	in.Scheme = scheme
	// explore's "Write report" holds no trips for an appraisal (r.kept is
	// nil there): its report leaves the appraisal to run.
	if r.appraise && r.kept != nil {
		fmt.Fprintln(env.stdout, "   appraising candidate links")
		ap, _, err := r.appraiseFinding(ctx, regions, store, *r.kept, 1, r.Appraise)
		if err != nil {
			return err
		}
		if err := report.WriteAppraisalText(env.stdout, *ap); err != nil {
			return err
		}
		in.Appraisal = ap
	}
	if r.Compare.Before.from == "" && r.Compare.After.from == "" {
		fmt.Fprintln(env.stdout, "3/3 scan")
		return r.scan(ctx, env, store, in)
	}
	fmt.Fprintln(env.stdout, "3/3 compare")
	return r.compare(ctx, env, store, in)
}

// tripFiles returns the study's trip files resolved against its folder,
// and the names the store records for them: as the study file gives them,
// so that the store does not depend on where the study folder sits.
func (r *studyRun) tripFiles() (trips []string, names map[string]string) {
	names = map[string]string{}
	for _, t := range r.Trips.Files {
		trips = append(trips, r.rel(t))
		names[r.rel(t)] = t
	}
	return trips, names
}

// dayGraphs ingests the study's trips onto the regions, whose GeoJSON has
// the SHA-256 sum, writes the store and returns it.
func (r *studyRun) dayGraphs(ctx context.Context, env *environment, regions *partition.Partition, sum string) (*regiongraph.Store, error) {
	trips, names := r.tripFiles()
	graphs := filepath.Join(r.steps, "graphs.parquet")
	opts := r.Trips.Options
	if r.appraise {
		var err error
		if opts, r.kept, err = r.keepTrips(); err != nil {
			return nil, err
		}
	}
	// The store is written as the step's output; the analysis goes on with
	// the same store in memory, since it applies its own minimum of trips.
	return ingest(ctx, env, regions, sum, trips, names, r.Trips.Format, opts, nil, graphs)
}

// reportInput returns what the reports of both kinds of study share; the
// inputs are the study file and the extract.
func (r *studyRun) reportInput(store *regiongraph.Store, regions *partition.Partition) (report.Input, error) {
	studySource, err := sourceOf(r.file)
	if err != nil {
		return report.Input{}, err
	}
	osmSource, err := sourceOf(r.rel(r.Regions.OSM))
	if err != nil {
		return report.Input{}, err
	}
	inputs := []regiongraph.Source{studySource, osmSource}
	if spec, err := parseScheme(r.Scheme); err == nil && spec.extract != "" {
		src, err := sourceOf(r.rel(spec.extract))
		if err != nil {
			return report.Input{}, err
		}
		inputs = append(inputs, src)
	}
	return report.Input{
		Title:               r.title(),
		Inputs:              inputs,
		Settings:            append(append([][2]string{{"study file", filepath.Base(r.file)}, {"time zone", r.Trips.TimeZone}}, regionSettings(regions, r.Regions.Options, r.Scheme)...), append(scanSettings(r.Scan.ScanOptions), exclusionSettings(r.Scan.exclusions())...)...),
		Regions:             regions,
		Store:               &store.Meta,
		Exclusions:          r.Scan.exclusions(),
		PublicationMinTrips: r.Compare.MinPublish,
		Version:             version,
	}, nil
}

// scan scans the study's period and writes the findings and the report.
func (r *studyRun) scan(ctx context.Context, env *environment, store *regiongraph.Store, in report.Input) error {
	opts := r.Scan.ScanOptions
	if err := tooFewTrips(patterns.CheckPairs(store, opts)); err != nil {
		return fmt.Errorf("study file %s: %w", r.file, err)
	}
	update, finish := stageProgress(env)
	opts.Progress = update
	scan, err := patterns.ScanStore(ctx, store, opts)
	finish()
	if err != nil {
		return fmt.Errorf("study file %s: %w", r.file, err)
	}
	if err := env.files.write(r.findingsPath(), kindFindings, func(w io.Writer) error { return writeFindingsJSON(w, scan, in.Regions) }); err != nil {
		return err
	}
	printFindings(env.stdout, scan, in.Regions, 10)
	printGroupBound(env.stdout, scan)
	in.Inputs = append(in.Inputs, store.Meta.Sources...)
	in.Scan = scan
	return writeReport(env, r.out, r.Name, in)
}

// compare compares the study's two periods and writes the report.
func (r *studyRun) compare(ctx context.Context, env *environment, store *regiongraph.Store, in report.Input) error {
	before, after, err := r.periods()
	if err != nil {
		return fmt.Errorf("study file %s: %v", r.file, err)
	}
	if err := patterns.CheckComparison(store, in.Regions, before, after, r.Compare.CompareOptions); err != nil {
		return fmt.Errorf("study file %s: %w", r.file, namedSetting(err))
	}
	settings := append(in.Settings, [][2]string{{"before", r.Compare.Before.String()}, {"after", r.Compare.After.String()},
		{"focus", r.Compare.Focus.String()}, {"alpha", strconv.FormatFloat(r.Compare.Alpha, 'g', -1, 64)}}...)
	return compareAndReport(ctx, env, compareJob{
		store: store, regions: in.Regions, before: before, after: after, opts: r.Compare.CompareOptions,
		out: filepath.Join(r.out, r.Name+".xlsx"), title: in.Title, minPublish: in.PublicationMinTrips, settings: settings,
		extraInputs: in.Inputs, scheme: in.Scheme, appraisal: in.Appraisal, exclusions: in.Exclusions,
	})
}

// periods returns the scan options of the study's before and after periods.
func (s *study) periods() (before, after patterns.ScanOptions, err error) {
	for _, p := range []struct {
		key    string
		period *periodValue
	}{{"before", &s.Compare.Before}, {"after", &s.Compare.After}} {
		if p.period.from == "" {
			_, _, err := patterns.ParsePeriod("")
			return before, after, fmt.Errorf("[compare] %s: %v", p.key, err)
		}
	}
	return s.Compare.Before.apply(s.Scan.ScanOptions), s.Compare.After.apply(s.Scan.ScanOptions), nil
}

// sourceOf describes an input file for the report's provenance table.
func sourceOf(path string) (regiongraph.Source, error) {
	sum, err := fileSHA256(path)
	if err != nil {
		return regiongraph.Source{}, err
	}
	return regiongraph.Source{Path: filepath.Base(path), SHA256: sum}, nil
}

// schemeLines resolves the study's scheme key (nil without one).
func (r *studyRun) schemeLines(ctx context.Context, regions *partition.Partition) ([]partition.NetworkLine, error) {
	spec, err := parseScheme(r.Scheme)
	if err != nil {
		return nil, fmt.Errorf("study file %s: %v", r.file, err)
	}
	lines, err := spec.lines(ctx, regions, r.rel, r.Regions.Options)
	if err != nil {
		return nil, fmt.Errorf("study file %s: %v", r.file, err)
	}
	return lines, nil
}

// regionSettings lists the extract and the regions' settings for the
// report's table of what was analysed.
func regionSettings(p *partition.Partition, o partition.Options, scheme string) [][2]string {
	barriers := strings.Join(o.Barriers, ", ")
	if barriers == "" {
		barriers = "none"
	}
	out := [][2]string{
		{"extract", p.Source},
		{"regions", strconv.Itoa(len(p.Regions)) + " regions bounded by " + strings.Join(o.Roads, ", ") + "; barriers: " + barriers},
		{"smallest region (km²)", strconv.FormatFloat(o.MinAreaKM2, 'g', -1, 64)},
		{"largest region left whole (km²)", strconv.FormatFloat(o.MaxRegionKM2, 'g', -1, 64)},
	}
	if scheme != "" {
		out = append(out, [2]string{"scheme", scheme})
	}
	return out
}

// title is the study's title, or one made from the study file's name.
func (s *study) titleOr(file string) string {
	if s.Title != "" {
		return s.Title
	}
	return "narrows study " + filepath.Base(file)
}

func (r *studyRun) title() string { return r.titleOr(r.file) }
