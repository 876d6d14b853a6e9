package patterns

import (
	"context"
	"errors"
	"fmt"
	"math"
	"slices"
	"strings"
	"time"

	"narrows/partition/geodesy"
	"narrows/patterns/groups"
	"narrows/regiongraph"
	"narrows/skyline"
)

// dayLayout is the layout of local calendar days.
const dayLayout = "2006-01-02"

// DefaultScanOptions returns the default scan: every day of the store in
// its first window, candidates by skyline.DefaultOptions, groups of up to
// six edges recurring on at least 20 % of the days, extra vehicle-hours
// counted against 30 km/h.
//
// A fifth of the days is about one weekday a week: a weakness that shows
// on the same weekday every week is recurring, one bad afternoon is not.
// Six edges cover a region and its ring of neighbours, the largest
// group a planner reads as one place. 30 km/h is a common urban speed
// limit and a fair door-to-door speed for urban car trips (common
// practice). A correlation of 0.5 joins two pairs when most of the days
// either is weak, both are, clearly beyond chance. Two million visited
// groups take about a second on one core.
func DefaultScanOptions() ScanOptions {
	return ScanOptions{
		Days:            AllDays,
		Skyline:         skyline.DefaultOptions(),
		Support:         0.2,
		MaxGroupEdges:   6,
		JoinCorrelation: 0.5,
		MaxGroupVisits:  2_000_000,
		ReferenceSpeed:  geodesy.MPS(30),
	}
}

// ScanStore scans one period of a day-graph store: it selects the window
// and the analysed days, finds each day's skyline candidates, mines the
// region pairs whose candidates recur on at least opts.Support of the
// analysed days, joins the pairs that recur together into places (see
// places), and turns each place into a ranked finding with its edges and
// its closed recurring groups (mined over the place's own edges, within
// opts.MaxGroupEdges and opts.MaxGroupVisits).
//
// Edges with fewer than opts.Skyline.MinTrips trips are left out first, as
// regiongraph.ReadOptions.MinTrips leaves them out when reading a store: a
// store held in memory with every edge gives the same scan as the same
// store read with that minimum.
//
// The analysed days are the calendar days from opts.From to opts.To
// (inclusive; empty means the store's first or last day) on which the store
// has edges in any window, that pass opts.Days (by the weekday of the date)
// and are not in opts.Exclude. A day with data in other windows only, or
// with no eligible edge, is still analysed: it has no candidates, and it
// counts against the recurrence share, because the day happened and the
// weakness did not show. A day the store has no data for at all is not
// analysed, since nothing is known about it.
//
// The returned Scan's Options are opts with From, To, Window and Days
// resolved.
func ScanStore(ctx context.Context, store *regiongraph.Store, opts ScanOptions) (*Scan, error) {
	if store == nil {
		return nil, errors.New("patterns: scan: no store")
	}
	if err := checkScanOptions(&opts); err != nil {
		return nil, err
	}
	edges := keptEdges(store.Edges, opts.Skyline.MinTrips)
	window, wi, err := resolveWindow(store.Meta.Windows, opts.Window)
	if err != nil {
		return nil, err
	}
	opts.Window = window
	storeDays := distinctDays(edges)
	analysed, err := analysedDays(storeDays, &opts)
	if err != nil {
		return nil, err
	}
	days := make([]string, len(analysed))
	dayIndex := make(map[regiongraph.Day]int, len(analysed))
	for i, d := range analysed {
		days[i] = d.String()
		dayIndex[d] = i
	}
	graphs, err := dayGraphs(edges, wi, window, dayIndex)
	if err != nil {
		return nil, err
	}

	scan := &Scan{
		Options:          opts,
		Window:           window,
		Days:             days,
		CandidatesPerDay: make([]int, len(days)),
		DayCandidates:    make([][]EdgeKey, len(days)),
		EdgeDaily:        make(map[EdgeKey][]DailyValue),
	}
	if err := findCandidates(ctx, scan, graphs); err != nil {
		return nil, err
	}
	minSupport := MinSupport(opts.Support, len(days))
	scan.Findings, err = findings(ctx, scan, places(scan.DayCandidates, minSupport, opts.JoinCorrelation), minSupport)
	if err != nil {
		return nil, err
	}
	return scan, nil
}

// findCandidates finds the skyline candidates of each day's graph and
// records them in scan, with the daily values of every edge that was a
// candidate on at least one day.
func findCandidates(ctx context.Context, scan *Scan, graphs [][]regiongraph.Edge) error {
	indices, err := dayCandidates(ctx, graphs, scan.Options.Skyline, scan.Options.Progress)
	if err != nil {
		return err
	}
	candidate := make([][]bool, len(graphs)) // per day, per edge of its graph
	var all []EdgeKey                        // every day's candidates
	for d, graph := range graphs {
		keys := make([]EdgeKey, len(indices[d]))
		candidate[d] = make([]bool, len(graph))
		for j, i := range indices[d] {
			keys[j] = EdgeKey{From: graph[i].From, To: graph[i].To}
			candidate[d][i] = true
		}
		scan.CandidatesPerDay[d] = len(keys)
		scan.DayCandidates[d] = keys // graphs are sorted by From, To
		all = append(all, keys...)
	}
	slices.SortFunc(all, groups.CompareEdges)
	all = slices.Compact(all)
	// Each day's graph and the candidates are both sorted by pair: one
	// merge per day finds the candidates' edges of the day, rather than a
	// lookup per edge of every day.
	daily := make([][]DailyValue, len(all))
	for d, graph := range graphs {
		j := 0
		for i := 0; i < len(graph) && j < len(all); i++ {
			e := &graph[i]
			key := EdgeKey{From: e.From, To: e.To}
			for j < len(all) && groups.CompareEdges(all[j], key) < 0 {
				j++
			}
			if j == len(all) || all[j] != key {
				continue
			}
			daily[j] = append(daily[j], DailyValue{
				Day:         scan.Days[d],
				Trips:       e.Trips,
				Speed:       e.SpeedMedian,
				Detour:      e.DetourMedian,
				Candidate:   candidate[d][i],
				DistanceSum: e.DistanceSum,
				StraightSum: e.StraightSum,
				DurationSum: e.DurationSum,
			})
		}
	}
	for j, key := range all {
		scan.EdgeDaily[key] = daily[j]
	}
	return nil
}

// keptEdges returns the edges with at least minTrips trips (every edge when
// minTrips is 0 or less), the rule of regiongraph.ReadOptions.MinTrips. A
// store read with that minimum has no edge to drop and is used as it is.
func keptEdges(edges []regiongraph.Edge, minTrips int) []regiongraph.Edge {
	if minTrips <= 0 {
		return edges
	}
	first := slices.IndexFunc(edges, func(e regiongraph.Edge) bool { return e.Trips < minTrips })
	if first < 0 {
		return edges
	}
	kept := slices.Clone(edges[:first])
	for _, e := range edges[first+1:] {
		if e.Trips >= minTrips {
			kept = append(kept, e)
		}
	}
	return kept
}

// MinSupport returns the number of days a group must recur on out of
// days: support × days rounded up, and at least 1. A share that is within
// rounding error of a whole number of days counts as that number.
func MinSupport(support float64, days int) int {
	n := int(math.Ceil(support*float64(days) - 1e-9))
	return max(n, 1)
}

func checkScanOptions(opts *ScanOptions) error {
	switch opts.Days {
	case "":
		opts.Days = AllDays
	case AllDays, Weekdays, Weekends:
	default:
		return fmt.Errorf("patterns: scan: days %q, want %q, %q or %q", opts.Days, AllDays, Weekdays, Weekends)
	}
	if !(opts.Support > 0 && opts.Support <= 1) {
		return fmt.Errorf("patterns: scan: support %v, want a share above 0 and at most 1", opts.Support)
	}
	if opts.Skyline.MinTrips < 1 {
		return fmt.Errorf("patterns: scan: min trips %d, want 1 or more", opts.Skyline.MinTrips)
	}
	if opts.Skyline.K < 1 {
		return fmt.Errorf("patterns: scan: k %d, want 1 or more", opts.Skyline.K)
	}
	// A scan is always bounded: the enumeration of groups grows
	// exponentially with their size.
	if opts.MaxGroupEdges < 1 {
		return fmt.Errorf("patterns: scan: max group edges %d, want 1 or more", opts.MaxGroupEdges)
	}
	if !(opts.JoinCorrelation >= -1 && opts.JoinCorrelation <= 1) {
		return fmt.Errorf("patterns: scan: join correlation %v, want a value from -1 to 1", opts.JoinCorrelation)
	}
	if opts.MaxGroupVisits < 0 {
		return fmt.Errorf("patterns: scan: max group visits %d, want 0 (no bound) or more", opts.MaxGroupVisits)
	}
	if !(opts.ReferenceSpeed > 0) || math.IsInf(opts.ReferenceSpeed, 0) {
		return fmt.Errorf("patterns: scan: reference speed %v m/s, want a positive speed", opts.ReferenceSpeed)
	}
	return checkScanDays(opts)
}

// resolveWindow returns the window to scan, its name and index: name, or
// the store's first window when name is empty. An edge names its window
// by its index in the store's windows, so a store without windows has
// none to scan.
func resolveWindow(windows []regiongraph.Window, name string) (string, regiongraph.WindowIndex, error) {
	var names []string
	for _, w := range windows {
		names = append(names, w.Name)
	}
	if len(names) == 0 {
		return "", 0, errors.New("patterns: scan: the store has no time windows")
	}
	if name == "" {
		name = names[0]
	}
	i := slices.Index(names, name)
	if i < 0 || i >= regiongraph.MaxWindows {
		return "", 0, fmt.Errorf("patterns: scan: window %q is not in the store (windows: %s)", name, strings.Join(names, ", "))
	}
	return name, regiongraph.WindowIndex(i), nil
}

// windowIndex returns the index of the named window in the store, or
// regiongraph.MaxWindows, an index no edge has, when it has none of that
// name.
func windowIndex(store *regiongraph.Store, name string) regiongraph.WindowIndex {
	if w, ok := store.Meta.WindowIndex(name); ok {
		return w
	}
	return regiongraph.MaxWindows
}

// distinctDays returns the days the store has edges for, ascending.
func distinctDays(edges []regiongraph.Edge) []regiongraph.Day {
	var days []regiongraph.Day
	for i := range edges {
		if day := edges[i].Day; i == 0 || day != edges[i-1].Day {
			days = append(days, day)
		}
	}
	slices.Sort(days)
	return slices.Compact(days)
}

// analysedDays applies the period, the weekday filter and the exclusions
// to the store's days, resolving empty From and To in opts.
func analysedDays(storeDays []regiongraph.Day, opts *ScanOptions) ([]regiongraph.Day, error) {
	if len(storeDays) == 0 {
		return nil, errors.New("patterns: scan: the store has no days")
	}
	if opts.From == "" {
		opts.From = storeDays[0].String()
	}
	if opts.To == "" {
		opts.To = storeDays[len(storeDays)-1].String()
	}
	from, err := time.Parse(dayLayout, opts.From)
	if err != nil {
		return nil, fmt.Errorf("patterns: scan: from %q is not a date YYYY-MM-DD", opts.From)
	}
	to, err := time.Parse(dayLayout, opts.To)
	if err != nil {
		return nil, fmt.Errorf("patterns: scan: to %q is not a date YYYY-MM-DD", opts.To)
	}
	if from.After(to) {
		return nil, fmt.Errorf("patterns: scan: from %s is after to %s", opts.From, opts.To)
	}
	excluded := map[regiongraph.Day]bool{}
	for i, d := range opts.Exclude {
		t, err := time.Parse(dayLayout, d)
		if err != nil {
			return nil, fmt.Errorf("patterns: scan: excluded day %d, %q, is not a date YYYY-MM-DD", i+1, d)
		}
		excluded[regiongraph.DayOf(t)] = true
	}
	first, last := regiongraph.DayOf(from), regiongraph.DayOf(to)
	var days []regiongraph.Day
	for _, d := range storeDays {
		if d < first || d > last || excluded[d] {
			continue
		}
		weekend := d.Weekday() == time.Saturday || d.Weekday() == time.Sunday
		if opts.Days == Weekdays && weekend || opts.Days == Weekends && !weekend {
			continue
		}
		days = append(days, d)
	}
	if len(days) == 0 {
		return nil, fmt.Errorf("patterns: scan: no days to analyse from %s to %s (days %s, %d excluded; the store has %d days, %s to %s)",
			opts.From, opts.To, opts.Days, len(opts.Exclude), len(storeDays), storeDays[0], storeDays[len(storeDays)-1])
	}
	return days, nil
}

// dayGraphs returns, per analysed day, its edges in window sorted by From,
// To. A store sorted as documented gives sub-slices of edges without
// copying; otherwise the edges are gathered and sorted. Two edges for the
// same pair, day and window are an error.
func dayGraphs(edges []regiongraph.Edge, window regiongraph.WindowIndex, windowName string, dayIndex map[regiongraph.Day]int) ([][]regiongraph.Edge, error) {
	type run struct{ start, end int }
	runs := make([][]run, len(dayIndex))
	lastDay, lastIdx := regiongraph.Day(0), -1
	for i := 0; i < len(edges); {
		e := &edges[i]
		j := i + 1
		for j < len(edges) && edges[j].Day == e.Day && edges[j].Window == e.Window {
			j++
		}
		if e.Window == window {
			idx := lastIdx
			if e.Day != lastDay || i == 0 {
				var ok bool
				if idx, ok = dayIndex[e.Day]; !ok {
					idx = -1
				}
				lastDay, lastIdx = e.Day, idx
			}
			if idx >= 0 {
				runs[idx] = append(runs[idx], run{i, j})
			}
		}
		i = j
	}
	graphs := make([][]regiongraph.Edge, len(runs))
	for d, rs := range runs {
		var g []regiongraph.Edge
		if len(rs) == 1 {
			g = edges[rs[0].start:rs[0].end:rs[0].end]
		} else {
			for _, r := range rs {
				g = append(g, edges[r.start:r.end]...)
			}
		}
		if !pairsAscend(g) {
			g = slices.Clone(g)
			slices.SortStableFunc(g, compareEdgePairs)
			for i := 1; i < len(g); i++ {
				if compareEdgePairs(g[i-1], g[i]) == 0 {
					return nil, fmt.Errorf("patterns: scan: the store has two edges %d>%d on %s in window %s", g[i].From, g[i].To, g[i].Day, windowName)
				}
			}
		}
		graphs[d] = g
	}
	return graphs, nil
}

func compareEdgePairs(a, b regiongraph.Edge) int {
	return groups.CompareEdges(EdgeKey{From: a.From, To: a.To}, EdgeKey{From: b.From, To: b.To})
}

// pairsAscend reports whether the edges' (from, to) pairs ascend strictly:
// sorted, and no pair twice.
func pairsAscend(g []regiongraph.Edge) bool {
	for i := 1; i < len(g); i++ {
		if a, b := &g[i-1], &g[i]; a.From > b.From || a.From == b.From && a.To >= b.To {
			return false
		}
	}
	return true
}
