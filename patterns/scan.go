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
	return scanDays(ctx, store.ByDay(), storeWindows(store, opts.Skyline.MinTrips), opts)
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

// storeWindows returns the names of the store's windows in the order
// given at ingest. A store whose Meta lists no windows offers the window
// names of its edges with at least minTrips trips, in sorted order.
func storeWindows(store *regiongraph.Store, minTrips int) []string {
	names := store.WindowNames()
	if len(names) > 0 {
		return names
	}
	seen := map[string]bool{}
	for i := range store.Edges {
		if e := &store.Edges[i]; e.Trips >= minTrips && !seen[e.Window] {
			seen[e.Window] = true
			names = append(names, e.Window)
		}
	}
	slices.Sort(names)
	return names
}

// resolveWindow returns the window to scan among the store's windows
// names: name, or the first window when name is empty.
func resolveWindow(names []string, name string) (string, error) {
	if len(names) == 0 {
		return "", errors.New("patterns: scan: the store has no time windows and no edges")
	}
	if name == "" {
		return names[0], nil
	}
	if !slices.Contains(names, name) {
		return "", fmt.Errorf("patterns: scan: window %q is not in the store (windows: %s)", name, strings.Join(names, ", "))
	}
	return name, nil
}

// analysedDays applies the period, the weekday filter and the exclusions
// to the store's days, resolving empty From and To in opts.
func analysedDays(storeDays []string, opts *ScanOptions) ([]string, error) {
	if len(storeDays) == 0 {
		return nil, errors.New("patterns: scan: the store has no days")
	}
	if opts.From == "" {
		opts.From = storeDays[0]
	}
	if opts.To == "" {
		opts.To = storeDays[len(storeDays)-1]
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
	excluded := map[string]bool{}
	for i, d := range opts.Exclude {
		t, err := time.Parse(dayLayout, d)
		if err != nil {
			return nil, fmt.Errorf("patterns: scan: excluded day %d, %q, is not a date YYYY-MM-DD", i+1, d)
		}
		excluded[t.Format(dayLayout)] = true
	}
	var days []string
	for _, d := range storeDays {
		t, _ := time.Parse(dayLayout, d) // checked by scanDay
		if t.Before(from) || t.After(to) || excluded[d] {
			continue
		}
		weekend := t.Weekday() == time.Saturday || t.Weekday() == time.Sunday
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
