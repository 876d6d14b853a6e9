package patterns

import (
	"context"
	"errors"
	"fmt"
	"math"
	"slices"
	"sync"
	"time"

	"narrows/patterns/groups"
	"narrows/regiongraph"
	"narrows/skyline"
)

// ScanDays is ScanStore of a store read a day at a time: each day's edges
// are reduced to its skyline candidates and the few values a finding
// needs as the day is read, so that a year of a city's edges is never
// held at once. The findings are those of ScanStore on the same store
// read whole with the scan's minimum trips.
//
// The reader's store must list its windows in its metadata (a store read
// from a file always does).
func ScanDays(ctx context.Context, days *regiongraph.DayReader, opts ScanOptions) (*Scan, error) {
	if days == nil {
		return nil, errors.New("patterns: scan: no store")
	}
	return scanDays(ctx, days, days.Store().Meta.Windows, opts)
}

// A dayScan is what a scan keeps of one day of the store: whether it is
// analysed and, if it is, its candidates and the values of its edges in
// the scanned window.
type dayScan struct {
	analysed   bool
	candidates []EdgeKey  // sorted by From, To
	values     []dayValue // the day's edges in the window, by From, To
}

// A dayValue is one edge of a day in the scanned window: the fields of a
// DailyValue, held without pointers in a quarter of an Edge's memory.
type dayValue struct {
	from, to                              int32
	trips                                 int32
	candidate                             bool
	speed, detour                         float64
	distanceSum, straightSum, durationSum float64
}

// scanDays is the scan of the days that read hands out, in the window
// resolved among the store's windows.
func scanDays(ctx context.Context, read *regiongraph.DayReader, windows []regiongraph.Window, opts ScanOptions) (*Scan, error) {
	if err := checkScanOptions(&opts); err != nil {
		return nil, err
	}
	window, wi, err := resolveWindow(windows, opts.Window)
	if err != nil {
		return nil, err
	}
	opts.Window = window
	// The period and exclusions were checked as YYYY-MM-DD by
	// checkScanOptions.
	period := dayPeriod{first: regiongraph.Day(math.MinInt32), last: regiongraph.Day(math.MaxInt32), excluded: map[regiongraph.Day]bool{}}
	if opts.From != "" {
		period.first, _ = regiongraph.ParseDay(opts.From)
	}
	if opts.To != "" {
		period.last, _ = regiongraph.ParseDay(opts.To)
	}
	for _, d := range opts.Exclude {
		day, _ := regiongraph.ParseDay(d)
		period.excluded[day] = true
	}
	var mu sync.Mutex
	byDay := map[regiongraph.Day]*dayScan{}
	total := read.DayCount()
	err = read.Each(ctx, func(day regiongraph.Day, edges []regiongraph.Edge) error {
		ds, err := scanDay(day, edges, wi, window, &opts, period)
		if err != nil || ds == nil {
			return err
		}
		mu.Lock()
		defer mu.Unlock()
		byDay[day] = ds
		if opts.Progress != nil {
			opts.Progress("candidates", len(byDay), max(total, len(byDay)))
		}
		return nil
	})
	if err != nil {
		return nil, err
	}
	storeDays := make([]regiongraph.Day, 0, len(byDay))
	for d := range byDay {
		storeDays = append(storeDays, d)
	}
	slices.Sort(storeDays)
	analysed, err := analysedDays(storeDays, &opts)
	if err != nil {
		return nil, err
	}
	days := make([]string, len(analysed))
	for i, d := range analysed {
		days[i] = d.String()
	}
	scan := &Scan{
		Options:          opts,
		Window:           window,
		Days:             days,
		CandidatesPerDay: make([]int, len(days)),
		DayCandidates:    make([][]EdgeKey, len(days)),
		EdgeDaily:        make(map[EdgeKey][]DailyValue),
	}
	scanned := make([]*dayScan, len(days))
	for d, day := range analysed {
		if scanned[d] = byDay[day]; !scanned[d].analysed {
			// analysedDays and dayAnalysed disagree: a bug, not bad input.
			return nil, fmt.Errorf("patterns: scan: day %s is analysed but was not scanned", day)
		}
	}
	dailyValues(scan, scanned)
	minSupport := MinSupport(opts.Support, len(days))
	scan.Findings, err = findings(ctx, scan, places(scan.DayCandidates, minSupport, opts.JoinCorrelation), minSupport)
	if err != nil {
		return nil, err
	}
	return scan, nil
}

// dayPeriod is the days a scan analyses, but for the weekday selector:
// from first to last, both included, without the excluded days.
type dayPeriod struct {
	first, last regiongraph.Day
	excluded    map[regiongraph.Day]bool
}

// scanDay reduces one day's edges (in store order) to what the scan keeps
// of it: nil for a day without an edge of at least the minimum trips (in
// any window), which the store has no data for; a day outside the period,
// the weekday selector or the exclusions only counts as a store day.
// Edges under the minimum are left out first, as
// regiongraph.ReadOptions.MinTrips leaves them out when reading.
func scanDay(day regiongraph.Day, edges []regiongraph.Edge, wi regiongraph.WindowIndex, window string, opts *ScanOptions, period dayPeriod) (*dayScan, error) {
	minTrips := opts.Skyline.MinTrips
	if !slices.ContainsFunc(edges, func(e regiongraph.Edge) bool { return e.Trips >= minTrips }) {
		return nil, nil
	}
	ds := &dayScan{}
	weekend := day.Weekday() == time.Saturday || day.Weekday() == time.Sunday
	if day < period.first || day > period.last || period.excluded[day] ||
		opts.Days == Weekdays && weekend || opts.Days == Weekends && !weekend {
		return ds, nil
	}
	ds.analysed = true
	a := slices.IndexFunc(edges, func(e regiongraph.Edge) bool { return e.Window == wi })
	if a < 0 {
		return ds, nil // data in other windows only: analysed, no candidates
	}
	b := a + 1
	for b < len(edges) && edges[b].Window == wi {
		b++
	}
	graph := edges[a:b:b]
	if slices.ContainsFunc(graph, func(e regiongraph.Edge) bool { return e.Trips < minTrips }) {
		graph = slices.DeleteFunc(slices.Clone(graph), func(e regiongraph.Edge) bool { return e.Trips < minTrips })
	}
	for i := 1; i < len(graph); i++ {
		if p, q := &graph[i-1], &graph[i]; p.From > q.From || p.From == q.From && p.To >= q.To {
			return nil, fmt.Errorf("patterns: scan: the store has two edges %d>%d on %s in window %s", q.From, q.To, day, window)
		}
	}
	ds.values = make([]dayValue, len(graph))
	for i := range graph {
		e := &graph[i]
		if e.From > math.MaxInt32 || e.To > math.MaxInt32 || e.From < math.MinInt32 || e.To < math.MinInt32 || e.Trips > math.MaxInt32 {
			return nil, fmt.Errorf("patterns: scan: edge %d>%d on %s: region ids and trips beyond 32 bits", e.From, e.To, day)
		}
		ds.values[i] = dayValue{
			from: int32(e.From), to: int32(e.To), trips: int32(e.Trips),
			speed: e.SpeedMedian, detour: e.DetourMedian,
			distanceSum: e.DistanceSum, straightSum: e.StraightSum, durationSum: e.DurationSum,
		}
	}
	idx := skyline.Select(graph, opts.Skyline).Indices
	ds.candidates = make([]EdgeKey, len(idx))
	for j, i := range idx {
		ds.values[i].candidate = true
		ds.candidates[j] = EdgeKey{From: graph[i].From, To: graph[i].To}
	}
	return ds, nil
}

// dailyValues records each analysed day's candidates in scan, and the
// daily values of every edge that was a candidate on at least one day.
func dailyValues(scan *Scan, scanned []*dayScan) {
	var all []EdgeKey // every day's candidates
	for d, ds := range scanned {
		scan.CandidatesPerDay[d] = len(ds.candidates)
		scan.DayCandidates[d] = ds.candidates
		all = append(all, ds.candidates...)
	}
	slices.SortFunc(all, groups.CompareEdges)
	all = slices.Compact(all)
	// Each day's values and the candidates are both sorted by pair: one
	// merge per day finds the candidates' values of the day, rather than a
	// lookup per edge of every day.
	daily := make([][]DailyValue, len(all))
	for d, ds := range scanned {
		j := 0
		for i := 0; i < len(ds.values) && j < len(all); i++ {
			v := &ds.values[i]
			key := EdgeKey{From: int(v.from), To: int(v.to)}
			for j < len(all) && groups.CompareEdges(all[j], key) < 0 {
				j++
			}
			if j == len(all) || all[j] != key {
				continue
			}
			daily[j] = append(daily[j], DailyValue{
				Day:         scan.Days[d],
				Trips:       int(v.trips),
				Speed:       v.speed,
				Detour:      v.detour,
				Candidate:   v.candidate,
				DistanceSum: v.distanceSum,
				StraightSum: v.straightSum,
				DurationSum: v.durationSum,
			})
		}
	}
	for j, key := range all {
		scan.EdgeDaily[key] = daily[j]
	}
}
