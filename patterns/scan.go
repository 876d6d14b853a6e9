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
	return scanDays(ctx, store.ByDay(), store.Meta.Windows, opts)
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
