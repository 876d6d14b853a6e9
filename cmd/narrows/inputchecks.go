package main

import (
	"errors"
	"fmt"

	"narrows/partition"
	"narrows/patterns"
	"narrows/regiongraph"
)

// namedSetting names, for the command line and the study file, the
// setting behind an input check's error.
func namedSetting(err error) error {
	var np *patterns.NoPairsError
	if errors.As(err, &np) && np.Largest > 0 {
		return fmt.Errorf("--min-trips (min_trips in a study file's [scan]) is %d: %w", np.MinTrips, err)
	}
	return err
}

// tooFewTrips returns err, a CheckPairs error, named for the command line
// when it is a minimum of trips that no pair reaches; a period without
// data is left to the scan, whose message lists the store's days.
func tooFewTrips(err error) error {
	var np *patterns.NoPairsError
	if errors.As(err, &np) && np.Largest > 0 {
		return namedSetting(err)
	}
	return nil
}

// pairsLeft reports a --min-trips that leaves no region pair on the
// analysed days of a period. The store at path was read without the edges
// under that minimum (see readStore), so when the check fails the file is
// read again whole, to give the largest minimum that keeps some pairs.
func pairsLeft(path string, store *regiongraph.Store, periods ...patterns.ScanOptions) error {
	var full *regiongraph.Store
	for i, p := range periods {
		if patterns.CheckPairs(store, p) == nil {
			continue
		}
		if full == nil {
			var err error
			if full, err = regiongraph.ReadFileOptions(path, regiongraph.ReadOptions{}); err != nil {
				return err
			}
		}
		err := patterns.CheckPairs(full, p)
		var np *patterns.NoPairsError
		if errors.As(err, &np) {
			if np.Largest == 0 {
				continue // no data in the period at all: the scan says which days there are
			}
			if len(periods) == 2 {
				np.Period = [2]string{"before", "after"}[i]
			}
		}
		if err != nil {
			return fmt.Errorf("%s: %w", path, namedSetting(err))
		}
	}
	return nil
}

// checkComparison checks a comparison's periods against the days of the
// store file (all of them, not only those the read kept), its focus
// against the regions and its minimum of trips against the periods (see
// patterns.CheckComparison, which needs every edge in memory).
func checkComparison(path string, store *regiongraph.Store, regions *partition.Partition, before, after patterns.ScanOptions, opts patterns.CompareOptions) error {
	first, last, err := regiongraph.ReadDayRange(path)
	if err != nil {
		return err
	}
	if err := patterns.CheckPeriodsWithin(first, last, before, after); err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	if err := patterns.CheckFocus(opts.Focus, regions); err != nil {
		return err
	}
	return pairsLeft(path, store, before, after)
}
