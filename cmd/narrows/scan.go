package main

import (
	"context"
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"path/filepath"
	"slices"
	"strings"
	"text/tabwriter"
	"time"

	"narrows/partition"
	"narrows/partition/geodesy"
	"narrows/patterns"
	"narrows/regiongraph"
	"narrows/report"
)

// storeFlags name a day-graph store and, optionally, the regions it was
// built on: the input of scan and compare.
type storeFlags struct {
	graphs, regions string
	trust           bool // use the regions file for a store without a regions hash
}

func (f *storeFlags) register(fs *flag.FlagSet) {
	fs.StringVar(&f.graphs, "graphs", "", "day-graph store written by 'narrows ingest'")
	fs.StringVar(&f.regions, "regions", "", "regions GeoJSON (default: the regions recorded in the store)")
	fs.BoolVar(&f.trust, "trust-regions", false, "use --regions for a store that records no regions hash (its ids cannot be checked against the file)")
}

// open reads the store for an analysis with the given thresholds and the
// regions it was built on (see readStore and regionsFor).
func (f *storeFlags) open(opts patterns.ScanOptions) (*regiongraph.Store, *partition.Partition, error) {
	return f.openRead(opts, regiongraph.ReadOptions{MinTrips: opts.Skyline.MinTrips, Columns: patterns.StoreColumns()})
}

// openCompare is open for a comparison, whose network totals count every
// pair with trips (patterns.Compare): the store's day totals give them
// whatever minimum the read applies. A store written before day totals
// records none and is read keeping every edge.
func (f *storeFlags) openCompare(opts patterns.ScanOptions) (*regiongraph.Store, *partition.Partition, error) {
	return f.openRead(opts, regiongraph.ReadOptions{MinTrips: opts.Skyline.MinTrips, WholeWithoutTotals: true, Columns: patterns.StoreColumns()})
}

// openPeriod is open reading only the days of opts' period: of a dataset
// only those days' files are opened. When the period holds no edge the
// store is read whole, so that the scan's message lists the store's days.
func (f *storeFlags) openPeriod(opts patterns.ScanOptions) (*regiongraph.Store, *partition.Partition, error) {
	store, regions, err := f.openRead(opts, regiongraph.ReadOptions{MinTrips: opts.Skyline.MinTrips, From: opts.From, To: opts.To, Columns: patterns.StoreColumns()})
	if err != nil || len(store.Edges) > 0 || opts.From == "" && opts.To == "" {
		return store, regions, err
	}
	return f.open(opts)
}

// openDays opens the store for reading a day at a time the days of opts'
// period, with the minimum trips of open and only the columns a scan
// uses (patterns.ScanColumns), and the regions it was built on;
// the edges' region ids are checked as they are read.
func (f *storeFlags) openDays(opts patterns.ScanOptions) (*regiongraph.DayReader, *partition.Partition, error) {
	days, err := regiongraph.OpenDays(f.graphs, regiongraph.ReadOptions{MinTrips: opts.Skyline.MinTrips, From: opts.From, To: opts.To, Columns: patterns.ScanColumns()})
	if err != nil {
		return nil, nil, err
	}
	regions, err := regionsFor(days.Store(), f.regions, f.graphs, f.trust, readRegions)
	if err != nil {
		return nil, nil, err
	}
	if err := days.CheckRegions(regions); err != nil {
		return nil, nil, fmt.Errorf("%s: %w", f.graphs, err)
	}
	return days, regions, nil
}

func (f *storeFlags) openRead(opts patterns.ScanOptions, ropts regiongraph.ReadOptions) (*regiongraph.Store, *partition.Partition, error) {
	// The regions file is read while the store is; its errors come after
	// the store's, as when read one after the other.
	var file struct {
		p   *partition.Partition
		sum string
		err error
	}
	read := make(chan struct{})
	go func() {
		defer close(read)
		if f.regions != "" {
			file.p, file.sum, file.err = readRegions(f.regions)
		}
	}()
	store, err := readStore(f.graphs, ropts)
	<-read
	if err != nil {
		return nil, nil, err
	}
	regions, err := regionsFor(store, f.regions, f.graphs, f.trust, func(string) (*partition.Partition, string, error) { return file.p, file.sum, file.err })
	if err != nil {
		return nil, nil, err
	}
	return store, regions, nil
}

func runScan(ctx context.Context, env *environment, args []string) error {
	fs := newFlagSet(env, "scan", "--graphs G.parquet [--from DATE] [--to DATE] [--window NAME] [--days all|weekdays|weekends] [--exclude DATE,...] [--min-trips N] [--support FRACTION] [--k K] --out findings.json")
	var in storeFlags
	var out string
	in.register(fs)
	opts := patterns.DefaultScanOptions()
	optFlags := bindOptions(fs, func(fs *flag.FlagSet) {
		fs.StringVar(&opts.From, "from", "", "first day `YYYY-MM-DD` (default: the store's first)")
		fs.StringVar(&opts.To, "to", "", "last day `YYYY-MM-DD` (default: the store's last)")
		bindScan(fs, &opts)
	})
	fs.StringVar(&out, "out", "", "findings JSON `STEM.json` to write; the map layer STEM.geojson is written beside it")
	env.files.bindForce(fs)
	if err := parseFlags(env, fs, args); err != nil {
		return err
	}
	if in.graphs == "" || out == "" {
		return usagef("--graphs and --out are required")
	}
	if err := optFlags.check(opts.Validate()); err != nil {
		return err
	}
	if !strings.EqualFold(filepath.Ext(out), ".json") {
		return usagef("--out: the findings are JSON; name them STEM.json (the map layer becomes STEM.geojson), got %q", out)
	}
	layer := stemOf(out) + ".geojson"
	env.files.read(in.graphs, in.regions)
	if err := env.files.claimAll([]output{{out, kindFindings}, {layer, kindFindingsLayer}}); err != nil {
		return err
	}
	start := time.Now()
	update, finish := stageProgress(env)
	opts.Progress = update
	scan, meta, regions, err := scanByDay(ctx, in, opts)
	finish()
	if err != nil {
		return err
	}
	elapsed := time.Since(start)
	if err := env.files.write(out, kindFindings, func(w io.Writer) error { return writeFindingsJSON(w, scan, regions) }); err != nil {
		return err
	}
	rin := report.Input{Regions: regions, Store: meta, Scan: scan, Version: version}
	if err := env.files.write(layer, kindFindingsLayer, func(w io.Writer) error { return report.WriteFindingsGeoJSON(w, rin) }); err != nil {
		return err
	}
	printFindings(env.stdout, scan, regions, 20)
	printGroupBound(env.stdout, scan)
	fmt.Fprintf(env.stdout, "%d findings over %d days (window %s) in %.2f s -> %s, %s\n",
		len(scan.Findings), len(scan.Days), scan.Window, elapsed.Seconds(), out, layer)
	return nil
}

// scanByDay scans the store a day at a time, so that a year of a city is
// never held whole (patterns.ScanDays). A scan that fails, or finds no
// candidate on any day, is done again the way the other commands do it,
// reading the period whole: it finds the same, and its errors say which
// days the store has and the most trips any pair had.
func scanByDay(ctx context.Context, in storeFlags, opts patterns.ScanOptions) (*patterns.Scan, *regiongraph.Meta, *partition.Partition, error) {
	days, regions, err := in.openDays(opts)
	if err != nil {
		return nil, nil, nil, err
	}
	scan, err := patterns.ScanDays(ctx, days, opts)
	if ctx.Err() != nil {
		return nil, nil, nil, ctx.Err()
	}
	if err == nil && slices.ContainsFunc(scan.CandidatesPerDay, func(n int) bool { return n > 0 }) {
		return scan, &days.Store().Meta, regions, nil
	}
	store, regions, err := in.openPeriod(opts)
	if err != nil {
		return nil, nil, nil, err
	}
	if err := pairsLeft(in.graphs, store, opts); err != nil {
		return nil, nil, nil, err
	}
	if scan, err = patterns.ScanStore(ctx, store, opts); err != nil {
		return nil, nil, nil, fmt.Errorf("%s: %w", in.graphs, err)
	}
	return scan, &store.Meta, regions, nil
}

// readStore reads a day-graph store for an analysis with the given
// thresholds, decoding only the columns the analysis uses. A scan drops
// the edges under its minimum trips while reading, as they can never be
// candidates: a city's store is mostly pairs with a trip or two a day, and
// holding them would cost gigabytes. A comparison's network totals, which
// count every pair with trips, come from the store's day totals
// (openCompare).
func readStore(path string, opts regiongraph.ReadOptions) (*regiongraph.Store, error) {
	return regiongraph.ReadFileOptions(path, opts)
}

// regionsFor returns the regions a store was built on: from the given file
// (which must be the one the store was built from) or from the store. A
// store that records no regions hash is refused, unless the regions file
// is given and trusted; in every case the store's region ids must be the
// regions'. read reads the regions file (readRegions, or its result
// when read already).
func regionsFor(store *regiongraph.Store, path, storePath string, trust bool, read func(path string) (*partition.Partition, string, error)) (*partition.Partition, error) {
	if store.Meta.RegionsSHA256 == "" && (path == "" || !trust) {
		return nil, fmt.Errorf("%s records no regions hash, so nothing ties it to a regions file: pass the regions it was built on with --regions FILE --trust-regions", storePath)
	}
	var p *partition.Partition
	if path != "" {
		var sum string
		var err error
		if p, sum, err = read(path); err != nil {
			return nil, err
		}
		if store.Meta.RegionsSHA256 != "" && sum != store.Meta.RegionsSHA256 {
			return nil, fmt.Errorf("%s was not built on %s (SHA-256 differs): pass the regions file given to ingest", storePath, path)
		}
	} else {
		var err error
		if p, err = store.Regions(); err != nil {
			return nil, err
		}
	}
	if err := store.CheckRegions(p); err != nil {
		return nil, fmt.Errorf("%s: %w", storePath, err)
	}
	return p, nil
}

// writeFindingsJSON writes a scan's findings, each a place with its name,
// edges and recurring groups, and the total cost over the findings.
func writeFindingsJSON(w io.Writer, scan *patterns.Scan, regions *partition.Partition) error {
	type edgeOut struct {
		From, To             int
		FromRoads, ToRoads   []string
		Days                 []string `json:"days"`
		Share                float64  `json:"share"`
		TripsMedian          float64  `json:"trips_median"`
		SpeedKMH             float64  `json:"speed_kmh_median"`
		Detour               float64  `json:"detour_median"`
		ExtraKMPerWeakDay    float64  `json:"extra_vehicle_km_per_weak_day"`
		ExtraHoursPerWeakDay float64  `json:"extra_vehicle_hours_per_weak_day"`
		ExtraKMPerDay        float64  `json:"extra_vehicle_km_per_day"`
		ExtraHoursPerDay     float64  `json:"extra_vehicle_hours_per_day"`
	}
	type groupOut struct {
		Edges []string `json:"edges"`
		Days  []string `json:"days"`
		Share float64  `json:"share"`
	}
	type findingOut struct {
		Rank             int        `json:"rank"`
		Name             string     `json:"name"`
		ID               string     `json:"id"`
		Regions          []int      `json:"regions"`
		Days             []string   `json:"days"`
		Share            float64    `json:"share"`
		ExtraKMPerDay    float64    `json:"extra_vehicle_km_per_day"`
		ExtraHoursPerDay float64    `json:"extra_vehicle_hours_per_day"`
		Edges            []edgeOut  `json:"edges"`
		Groups           []groupOut `json:"recurring_groups"`
	}
	doc := struct {
		Tool             string       `json:"tool"`
		Window           string       `json:"window"`
		Days             []string     `json:"days"`
		Support          float64      `json:"support"`
		MinTrips         int          `json:"min_trips"`
		K                int          `json:"k"`
		ExtraKMPerDay    float64      `json:"total_extra_vehicle_km_per_day"`
		ExtraHoursPerDay float64      `json:"total_extra_vehicle_hours_per_day"`
		GroupsVisited    int          `json:"groups_visited"`
		GroupsTruncated  bool         `json:"groups_truncated"`
		Note             string       `json:"note,omitempty"`
		Findings         []findingOut `json:"findings"`
		Caution          string       `json:"caution"`
	}{
		Tool: "narrows " + version, Window: scan.Window, Days: scan.Days,
		Support: scan.Options.Support, MinTrips: scan.Options.Skyline.MinTrips, K: scan.Options.Skyline.K,
		GroupsVisited: scan.GroupVisits, GroupsTruncated: scan.GroupsTruncated, Note: report.GroupBoundNote(scan),
		Caution: report.Caution,
	}
	for _, f := range scan.Findings {
		fo := findingOut{Rank: f.Rank, Name: report.PlaceName(f, regions), ID: f.ID, Regions: f.Regions, Days: f.Days, Share: roundFor(f.Share, ratioDecimals),
			ExtraKMPerDay: roundFor(f.ExtraKMPerDay, kmDecimals), ExtraHoursPerDay: roundFor(f.ExtraHoursPerDay, hoursDecimals), Groups: []groupOut{}}
		doc.ExtraKMPerDay += f.ExtraKMPerDay
		doc.ExtraHoursPerDay += f.ExtraHoursPerDay
		for _, e := range f.Edges {
			fo.Edges = append(fo.Edges, edgeOut{From: e.From, To: e.To,
				FromRoads: roadNames(regions, e.From, 3), ToRoads: roadNames(regions, e.To, 3),
				Days: e.Days, Share: roundFor(e.Share, ratioDecimals),
				TripsMedian: roundFor(e.TripsMedian, tripsDecimals), SpeedKMH: roundFor(geodesy.KMH(e.SpeedMedian), kmhDecimals), Detour: roundFor(e.DetourMedian, ratioDecimals),
				ExtraKMPerWeakDay: roundFor(e.ExtraKMPerWeakDay, kmDecimals), ExtraHoursPerWeakDay: roundFor(e.ExtraHoursPerWeakDay, hoursDecimals),
				ExtraKMPerDay: roundFor(e.ExtraKMPerDay, kmDecimals), ExtraHoursPerDay: roundFor(e.ExtraHoursPerDay, hoursDecimals)})
		}
		for _, g := range f.Groups {
			gout := groupOut{Days: g.Days, Share: roundFor(g.Share, ratioDecimals)}
			for _, e := range g.Edges {
				gout.Edges = append(gout.Edges, fmt.Sprintf("%d>%d", e.From, e.To))
			}
			fo.Groups = append(fo.Groups, gout)
		}
		doc.Findings = append(doc.Findings, fo)
	}
	if doc.Findings == nil {
		doc.Findings = []findingOut{}
	}
	// The totals are summed unrounded, then rounded like their parts.
	doc.ExtraKMPerDay, doc.ExtraHoursPerDay = roundFor(doc.ExtraKMPerDay, kmDecimals), roundFor(doc.ExtraHoursPerDay, hoursDecimals)
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(doc)
}

// roadNames returns up to n names of the roads along a region's border.
func roadNames(p *partition.Partition, id, n int) []string {
	if p == nil || id < 1 || id > len(p.Regions) {
		return nil
	}
	var names []string
	for _, b := range p.Regions[id-1].BorderRoads {
		if len(names) == n {
			break
		}
		names = append(names, b.Name)
	}
	return names
}

// printFindings prints the ranked table of the first n findings: a line
// per place with its cost, its edges below it, and the total over every
// finding.
func printFindings(w io.Writer, scan *patterns.Scan, regions *partition.Partition, n int) {
	if len(scan.Findings) == 0 {
		fmt.Fprintln(w, "No recurring weak links at these thresholds (try a lower --support or --min-trips).")
		return
	}
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "rank\tplace / edge\tdays weak\ttrips/day\tkm/h\tdetour\textra veh-km/day\textra veh-h/day")
	var km, hours float64
	for _, f := range scan.Findings {
		km += f.ExtraKMPerDay
		hours += f.ExtraHoursPerDay
	}
	for i, f := range scan.Findings {
		if i == n {
			fmt.Fprintf(tw, "…\t%d more\t\t\t\t\t\t\n", len(scan.Findings)-n)
			break
		}
		fmt.Fprintf(tw, "%d\t%s (%s)\t%d (%.0f %%)\t\t\t\t%.0f\t%.1f\n", f.Rank, terminalText(report.PlaceName(f, regions)), f.ID,
			len(f.Days), 100*f.Share, f.ExtraKMPerDay, f.ExtraHoursPerDay)
		for _, e := range f.Edges {
			fmt.Fprintf(tw, "\t  %d>%d\t%d (%.0f %%)\t%.0f\t%.1f\t%.2f\t%.0f\t%.1f\n", e.From, e.To,
				len(e.Days), 100*e.Share, e.TripsMedian, geodesy.KMH(e.SpeedMedian), e.DetourMedian, e.ExtraKMPerDay, e.ExtraHoursPerDay)
		}
	}
	links := "weak links"
	if len(scan.Findings) == 1 {
		links = "weak link"
	}
	fmt.Fprintf(tw, "total\t%d %s, each edge counted once\t\t\t\t\t%.0f\t%.1f\n", len(scan.Findings), links, km, hours)
	tw.Flush()
}

// printGroupBound prints the note of a scan whose listing of recurring
// groups stopped at its bound.
func printGroupBound(w io.Writer, scan *patterns.Scan) {
	if note := report.GroupBoundNote(scan); note != "" {
		fmt.Fprintln(w, note)
	}
}
