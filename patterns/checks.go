package patterns

import (
	"errors"
	"fmt"
	"math"
	"time"

	"narrows/partition"
	"narrows/regiongraph"
)

// CheckComparison reports the first reason a comparison of the periods
// before and after of store could not be trusted, before any scan runs:
// periods that overlap or reach outside the store's days (CheckPeriods), a
// focus that selects no region (CheckFocus), or a minimum of trips that
// leaves no region pair on either period's days (CheckPairs). The command
// line calls it before Compare, and so does a study run. The store must
// hold every edge: one read with a minimum of trips lacks the days on which
// no pair reached it (the command line then checks the parts one by one,
// with regiongraph.ReadDayRange).
func CheckComparison(store *regiongraph.Store, regions *partition.Partition, before, after ScanOptions, opts CompareOptions) error {
	if err := CheckPeriods(store, before, after); err != nil {
		return err
	}
	if err := CheckFocus(opts.Focus, regions); err != nil {
		return err
	}
	for _, p := range []struct {
		name string
		opts ScanOptions
	}{{"before", before}, {"after", after}} {
		if err := CheckPairs(store, p.opts); err != nil {
			var np *NoPairsError
			if errors.As(err, &np) {
				np.Period = p.name
			}
			return err
		}
	}
	return nil
}

// StoreDays returns the store's first and last day (over every window and
// edge), or empty strings for a store without edges.
func StoreDays(store *regiongraph.Store) (first, last string) {
	if len(store.Edges) == 0 {
		return "", ""
	}
	lo, hi := store.Edges[0].Day, store.Edges[0].Day
	for i := range store.Edges {
		d := store.Edges[i].Day
		lo, hi = min(lo, d), max(hi, d)
	}
	return lo.String(), hi.String()
}

// CheckPeriods reports before and after periods that overlap (a day in
// both would count on both sides of every test, which voids them) and
// periods that begin before the store's first day or end after its last
// (a period silently cut to the data would not be the one asked for). An
// empty From or To stands for the store's first or last day. Days are
// YYYY-MM-DD, so they compare as strings.
func CheckPeriods(store *regiongraph.Store, before, after ScanOptions) error {
	if store == nil {
		return errors.New("patterns: no day-graph store")
	}
	if err := checkScanDays(&before); err != nil {
		return fmt.Errorf("before period: %w", err)
	}
	if err := checkScanDays(&after); err != nil {
		return fmt.Errorf("after period: %w", err)
	}
	first, last := StoreDays(store)
	return CheckPeriodsWithin(first, last, before, after)
}

// CheckPeriodsWithin is CheckPeriods for data that run from first to last
// (YYYY-MM-DD), for a caller that holds only part of a store's edges (see
// regiongraph.ReadDayRange).
func CheckPeriodsWithin(first, last string, before, after ScanOptions) error {
	if err := checkScanDays(&before); err != nil {
		return fmt.Errorf("before period: %w", err)
	}
	if err := checkScanDays(&after); err != nil {
		return fmt.Errorf("after period: %w", err)
	}
	if first == "" {
		return errors.New("patterns: the day-graph store has no edges, so no period can be compared")
	}
	span := func(o ScanOptions) (string, string) {
		from, to := o.From, o.To
		if from == "" {
			from = first
		}
		if to == "" {
			to = last
		}
		return from, to
	}
	bf, bt := span(before)
	af, at := span(after)
	for _, p := range []struct{ name, from, to string }{{"before", bf, bt}, {"after", af, at}} {
		if p.from < first || p.to > last {
			return fmt.Errorf("patterns: the %s period %s..%s reaches outside the data, which run from %s to %s: choose a period inside them",
				p.name, p.from, p.to, first, last)
		}
	}
	if bf <= at && af <= bt {
		return fmt.Errorf("patterns: the before period %s..%s and the after period %s..%s overlap (%s to %s): a day in both would count on both sides of the comparison",
			bf, bt, af, at, max(bf, af), min(bt, at))
	}
	return nil
}

// CheckFocus reports a focus point from which no region lies within the
// focus radius: such a focus selects nothing, and is most often a point
// given in the wrong order (latitude first) or for another place. The
// error gives the distance to the nearest region. A focus by region ids
// is checked by Compare against the regions.
func CheckFocus(focus *Focus, regions *partition.Partition) error {
	if focus == nil || focus.Point == nil || regions == nil || len(regions.Regions) == 0 {
		return nil
	}
	nearest := math.Inf(1)
	for i := range regions.Regions {
		nearest = min(nearest, regionDistance(&regions.Regions[i], *focus.Point))
		if nearest <= focus.RadiusMetres {
			return nil
		}
	}
	return fmt.Errorf("patterns: the focus point %.6f,%.6f lies outside the study area: the nearest region is %.0f m away, beyond the focus radius of %.0f m (a point is longitude,latitude)",
		focus.Point.Lon(), focus.Point.Lat(), nearest, focus.RadiusMetres)
}

// NoPairsError is a minimum of trips per pair and day that no region pair
// reaches on any analysed day of a period's window: nothing would be
// analysed. Largest is the most trips one pair had on one such day, the
// largest minimum that keeps some pairs (0 when the period has no edges).
type NoPairsError struct {
	Period   string // "before", "after", or empty for a single scan
	MinTrips int
	Largest  int
	From, To string // the period analysed
}

func (e *NoPairsError) Error() string {
	period := "the period"
	if e.Period != "" {
		period = "the " + e.Period + " period"
	}
	if e.Largest == 0 {
		return fmt.Sprintf("patterns: no region pair has trips in %s %s..%s", period, e.From, e.To)
	}
	return fmt.Sprintf("patterns: minimum trips %d leaves no region pair to analyse in %s %s..%s; the most trips of one pair on one day is %d, so a minimum of %d or less keeps some",
		e.MinTrips, period, e.From, e.To, e.Largest, e.Largest)
}

// CheckPairs reports, as a *NoPairsError, options whose minimum of trips
// (Skyline.MinTrips) leaves no region pair on any day of the period (From
// to To, empty for the store's ends) that the day selector and exclusions
// keep, in the options' window (empty for the store's first). It checks
// nothing else: other problems of the options are left to ScanStore. The
// store must hold every edge (read without a minimum of trips) for Largest
// to be right.
func CheckPairs(store *regiongraph.Store, opts ScanOptions) error {
	if store == nil {
		return errors.New("patterns: no day-graph store")
	}
	if err := checkScanDays(&opts); err != nil {
		return nil // ScanStore says what is wrong with the days
	}
	_, window, err := resolveWindow(store.Meta.Windows, opts.Window)
	if err != nil {
		return nil // ScanStore names the windows
	}
	if opts.From == "" || opts.To == "" {
		// A pass over the store, needed only for an open period.
		first, last := StoreDays(store)
		if opts.From == "" {
			opts.From = first
		}
		if opts.To == "" {
			opts.To = last
		}
	}
	// Both days are empty only for a store without edges.
	from, errFrom := regiongraph.ParseDay(opts.From)
	to, errTo := regiongraph.ParseDay(opts.To)
	if opts.From != "" && errFrom != nil || opts.To != "" && errTo != nil {
		return nil // ScanStore says what is wrong with the days
	}
	excluded := make(map[regiongraph.Day]bool, len(opts.Exclude))
	for _, d := range opts.Exclude {
		if day, err := regiongraph.ParseDay(d); err == nil {
			excluded[day] = true
		}
	}
	kept := map[regiongraph.Day]bool{} // day -> kept by the period, selector and exclusions
	largest := 0
	for i := range store.Edges {
		e := &store.Edges[i]
		if e.Window != window || e.Day < from || e.Day > to || e.Trips <= largest {
			continue
		}
		keep, seen := kept[e.Day]
		if !seen {
			weekend := e.Day.Weekday() == time.Saturday || e.Day.Weekday() == time.Sunday
			keep = !excluded[e.Day] && !(opts.Days == Weekdays && weekend || opts.Days == Weekends && !weekend)
			kept[e.Day] = keep
		}
		if keep {
			largest = e.Trips
			if largest >= max(opts.Skyline.MinTrips, 1) {
				return nil // one pair is enough; Largest is only needed for the error
			}
		}
	}
	if largest > 0 && largest >= opts.Skyline.MinTrips {
		return nil
	}
	return &NoPairsError{MinTrips: opts.Skyline.MinTrips, Largest: largest, From: opts.From, To: opts.To}
}
