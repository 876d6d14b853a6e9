package main

import (
	"context"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"time"

	"github.com/BurntSushi/toml"

	"narrows/partition"
	"narrows/patterns"
	"narrows/regiongraph"
	"narrows/report"
)

// study is a study file: everything needed to re-run a study next year.
// Paths are relative to the study file.
type study struct {
	Title    string `toml:"title"`
	TimeZone string `toml:"time_zone"`
	Output   string `toml:"output"` // folder for all outputs (default "out")
	Name     string `toml:"name"`   // base name of the workbook and HTML page (default "report")

	Regions struct {
		OSM            string   `toml:"osm"`
		BBox           string   `toml:"bbox"`
		Roads          []string `toml:"roads"`
		Barriers       []string `toml:"barriers"`
		SnapMetres     *float64 `toml:"snap_metres"`
		MinAreaKM2     *float64 `toml:"min_area_km2"`
		MinCompactness *float64 `toml:"min_compactness"`
		MaxSliverWidth *float64 `toml:"max_sliver_width_metres"`
		Exact          bool     `toml:"exact"`
	} `toml:"regions"`

	Trips struct {
		Files        []string          `toml:"files"`
		Format       string            `toml:"format"`
		Columns      map[string]string `toml:"columns"`
		DistanceUnit string            `toml:"distance_unit"`
		Strict       bool              `toml:"strict"`
		MinODMetres  *float64          `toml:"min_od_metres"`
		MaxDuration  string            `toml:"max_duration"` // Go duration, e.g. "4h"
		MinSpeedKMH  *float64          `toml:"min_speed_kmh"`
		MaxSpeedKMH  *float64          `toml:"max_speed_kmh"`
		MinDetour    *float64          `toml:"min_detour"`
		MaxJumpKMH   *float64          `toml:"max_jump_speed_kmh"`
		GapMinutes   *float64          `toml:"gap_minutes"`
		DwellMinutes *float64          `toml:"dwell_minutes"`
		DwellMetres  *float64          `toml:"dwell_metres"`
	} `toml:"trips"`

	Windows []struct {
		Name string `toml:"name"`
		From string `toml:"from"`
		To   string `toml:"to"`
	} `toml:"windows"`

	Scan struct {
		Window         string   `toml:"window"`
		Days           string   `toml:"days"`
		Exclude        []string `toml:"exclude"`
		MinTrips       *int     `toml:"min_trips"`
		Support        *float64 `toml:"support"`
		K              *int     `toml:"k"`
		DetourFloor    *float64 `toml:"detour_floor"`
		NoDetourGate   bool     `toml:"no_detour_gate"`
		NoSpeedGate    bool     `toml:"no_speed_gate"`
		MaxEdges       *int     `toml:"max_edges"`
		MaximalOnly    bool     `toml:"maximal_only"`
		ReferenceSpeed *float64 `toml:"reference_speed_kmh"`
		From           string   `toml:"from"`
		To             string   `toml:"to"`
	} `toml:"scan"`

	Compare struct {
		Before     string   `toml:"before"`
		After      string   `toml:"after"`
		Focus      string   `toml:"focus"`
		Alpha      *float64 `toml:"alpha"`
		MinPublish *int     `toml:"min_publish"`
	} `toml:"compare"`
}

// loadStudy reads and checks a study file. Unknown keys are errors, so a
// misspelt threshold never silently falls back to its default.
func loadStudy(path string) (*study, error) {
	var s study
	md, err := toml.DecodeFile(path, &s)
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
	if s.TimeZone == "" {
		s.TimeZone = "UTC"
	}
	if s.Trips.Format == "" {
		s.Trips.Format = "trips"
	}
	if s.Scan.Days == "" {
		s.Scan.Days = string(patterns.AllDays)
	}
	return &s, nil
}

func runStudy(ctx context.Context, env *environment, args []string) error {
	fs := newFlagSet(env, "run", "study.toml")
	var file string
	if err := parseFlagsWithRest(env, fs, args, func(rest []string) {
		if file == "" && len(rest) > 0 {
			file, rest = rest[0], rest[1:]
		}
		if len(rest) > 0 {
			file = "\x00" // more than one study file
		}
	}); err != nil {
		return err
	}
	if file == "" || file == "\x00" {
		return usagef("give exactly one study file")
	}
	s, err := loadStudy(file)
	if err != nil {
		return err
	}
	return s.run(ctx, env, filepath.Dir(file), file)
}

// run runs the whole pipeline of a study whose paths are relative to dir.
func (s *study) run(ctx context.Context, env *environment, dir, file string) error {
	rel := func(p string) string {
		if filepath.IsAbs(p) {
			return p
		}
		return filepath.Join(dir, p)
	}
	where := "study file " + file
	out := rel(s.Output)
	steps := filepath.Join(out, "steps")
	if err := os.MkdirAll(steps, 0o755); err != nil {
		return err
	}

	// 1. Regions.
	rf := regionFlags{}
	popts := partition.DefaultOptions()
	rf.bbox = s.Regions.BBox
	rf.roads, rf.barriers = strings.Join(popts.Roads, ","), strings.Join(popts.Barriers, ",")
	if s.Regions.Roads != nil {
		rf.roads = strings.Join(s.Regions.Roads, ",")
	}
	if s.Regions.Barriers != nil {
		rf.barriers = strings.Join(s.Regions.Barriers, ",")
	}
	rf.snap, rf.minArea, rf.minCompact = deref(s.Regions.SnapMetres, popts.SnapMetres), deref(s.Regions.MinAreaKM2, popts.MinAreaKM2), deref(s.Regions.MinCompactness, popts.MinCompactness)
	rf.maxSliverWidth = deref(s.Regions.MaxSliverWidth, popts.MaxSliverWidthMetres)
	rf.exact = s.Regions.Exact
	popts, err := rf.options()
	if err != nil {
		return fmt.Errorf("%s: [regions]: %v", where, err)
	}
	regionsPath := filepath.Join(steps, "partition.geojson")
	fmt.Fprintln(env.stdout, "1/3 regions")
	if _, err := buildRegions(ctx, env, rel(s.Regions.OSM), popts, regionsPath); err != nil {
		return err
	}

	// 2. Day graphs.
	inf := defaultIngestFlags()
	inf.format, inf.tz, inf.strict = s.Trips.Format, s.TimeZone, s.Trips.Strict
	if s.Trips.DistanceUnit != "" {
		inf.unit = s.Trips.DistanceUnit
	}
	inf.minOD = deref(s.Trips.MinODMetres, inf.minOD)
	if s.Trips.MaxDuration != "" {
		d, err := time.ParseDuration(s.Trips.MaxDuration)
		if err != nil {
			return fmt.Errorf("%s: [trips] max_duration: %v", where, err)
		}
		inf.maxDuration = d
	}
	inf.minSpeed = deref(s.Trips.MinSpeedKMH, inf.minSpeed)
	inf.maxSpeed = deref(s.Trips.MaxSpeedKMH, inf.maxSpeed)
	inf.minDetour = deref(s.Trips.MinDetour, inf.minDetour)
	inf.maxJump = deref(s.Trips.MaxJumpKMH, inf.maxJump)
	inf.gapMinutes = deref(s.Trips.GapMinutes, inf.gapMinutes)
	inf.dwellMinutes = deref(s.Trips.DwellMinutes, inf.dwellMinutes)
	inf.dwellMetres = deref(s.Trips.DwellMetres, inf.dwellMetres)
	for _, w := range s.Windows {
		inf.windows = append(inf.windows, w.Name+"="+w.From+"-"+w.To)
	}
	iopts, err := inf.options()
	if err != nil {
		return fmt.Errorf("%s: [trips]/[[windows]]/time_zone: %v", where, err)
	}
	if len(s.Trips.Columns) > 0 {
		iopts.Columns = s.Trips.Columns
	}
	var trips []string
	names := map[string]string{}
	for _, t := range s.Trips.Files {
		trips = append(trips, rel(t))
		names[rel(t)] = t
	}
	graphs := filepath.Join(steps, "graphs.parquet")
	fmt.Fprintln(env.stdout, "2/3 day graphs")
	if err := ingest(ctx, env, regionsPath, trips, names, regiongraph.Format(inf.format), iopts, nil, graphs); err != nil {
		return err
	}

	// 3. Scan, or compare.
	d := patterns.DefaultScanOptions()
	sf := scanFlags{
		window: s.Scan.Window, days: s.Scan.Days, exclude: strings.Join(s.Scan.Exclude, ","),
		minTrips: deref(s.Scan.MinTrips, d.Skyline.MinTrips), k: deref(s.Scan.K, d.Skyline.K),
		support: deref(s.Scan.Support, d.Support), detourFloor: deref(s.Scan.DetourFloor, d.Skyline.DetourFloor),
		noDetourGate: s.Scan.NoDetourGate, noSpeedGate: s.Scan.NoSpeedGate,
		maxEdges: deref(s.Scan.MaxEdges, d.MaxGroupEdges), refSpeedKMH: deref(s.Scan.ReferenceSpeed, d.ReferenceSpeed*3.6),
		maximalOnly: s.Scan.MaximalOnly,
	}
	scanOpts, err := sf.options()
	if err != nil {
		return fmt.Errorf("%s: [scan]: %v", where, err)
	}
	store, err := readStore(graphs, scanOpts)
	if err != nil {
		return err
	}
	regions, _, err := readRegions(regionsPath)
	if err != nil {
		return err
	}
	studySource, err := sourceOf(file)
	if err != nil {
		return err
	}
	osmSource, err := sourceOf(rel(s.Regions.OSM))
	if err != nil {
		return err
	}
	title := s.Title
	if title == "" {
		title = "narrows study " + filepath.Base(file)
	}
	settings := append([][2]string{{"study file", filepath.Base(file)}, {"time zone", s.TimeZone}}, scanSettings(scanOpts)...)
	minPublish := deref(s.Compare.MinPublish, 10)

	if s.Compare.Before == "" && s.Compare.After == "" {
		fmt.Fprintln(env.stdout, "3/3 scan")
		scanOpts.From, scanOpts.To = s.Scan.From, s.Scan.To
		scan, err := patterns.ScanStore(ctx, store, scanOpts)
		if err != nil {
			return fmt.Errorf("%s: %w", where, err)
		}
		if err := writeFileAtomic(filepath.Join(out, "findings.json"), func(w io.Writer) error { return writeFindingsJSON(w, scan, regions) }); err != nil {
			return err
		}
		printFindings(env.stdout, scan, regions, 10)
		in := report.Input{Title: title, Inputs: append([]regiongraph.Source{studySource, osmSource}, store.Meta.Sources...),
			Settings: settings, Regions: regions, Store: &store.Meta, Scan: scan, PublicationMinTrips: minPublish, Version: version}
		paths, err := writeReport(out, s.Name, in)
		if err != nil {
			return err
		}
		fmt.Fprintln(env.stdout, report.Headline(in))
		for _, p := range paths {
			fmt.Fprintln(env.stdout, "  wrote", p)
		}
		return nil
	}
	fmt.Fprintln(env.stdout, "3/3 compare")
	b, a := scanOpts, scanOpts
	if b.From, b.To, err = parsePeriod(s.Compare.Before); err != nil {
		return fmt.Errorf("%s: [compare] before: %v", where, err)
	}
	if a.From, a.To, err = parsePeriod(s.Compare.After); err != nil {
		return fmt.Errorf("%s: [compare] after: %v", where, err)
	}
	copts := patterns.DefaultCompareOptions()
	copts.Alpha = deref(s.Compare.Alpha, copts.Alpha)
	if copts.Focus, err = parseFocus(s.Compare.Focus); err != nil {
		return fmt.Errorf("%s: [compare] focus: %v", where, err)
	}
	settings = append(settings, [][2]string{{"before", s.Compare.Before}, {"after", s.Compare.After},
		{"focus", s.Compare.Focus}, {"alpha", strconv.FormatFloat(copts.Alpha, 'g', -1, 64)}}...)
	return compareAndReport(ctx, env, compareJob{
		store: store, regions: regions, before: b, after: a, opts: copts,
		out: filepath.Join(out, s.Name+".xlsx"), title: title, minPublish: minPublish, settings: settings,
		extraInputs: []regiongraph.Source{studySource, osmSource},
	})
}

func deref[T any](p *T, def T) T {
	if p == nil {
		return def
	}
	return *p
}

// sourceOf describes an input file for the report's provenance table.
func sourceOf(path string) (regiongraph.Source, error) {
	sum, err := fileSHA256(path)
	if err != nil {
		return regiongraph.Source{}, err
	}
	return regiongraph.Source{Path: filepath.Base(path), SHA256: sum}, nil
}
