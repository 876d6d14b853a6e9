package patterns

import (
	"fmt"
	"time"

	"narrows/partition"
)

// Validate reports the first option that ScanStore would refuse before
// looking at the store: an unknown day selector, a support outside (0, 1],
// a minimum trips, k or largest group below 1, a reference speed that is
// not positive, or a day (From, To, Exclude) that is not a date YYYY-MM-DD,
// or From after To.
func (o ScanOptions) Validate() error {
	return checkScanOptions(&o)
}

// checkScanDays checks the days of a scan's options with the messages that
// analysedDays gives, so that a mistyped day is refused before a store is
// read.
func checkScanDays(opts *ScanOptions) error {
	var from, to time.Time
	var err error
	if opts.From != "" {
		if from, err = time.Parse(dayLayout, opts.From); err != nil {
			return fmt.Errorf("patterns: scan: from %q is not a date YYYY-MM-DD", opts.From)
		}
	}
	if opts.To != "" {
		if to, err = time.Parse(dayLayout, opts.To); err != nil {
			return fmt.Errorf("patterns: scan: to %q is not a date YYYY-MM-DD", opts.To)
		}
	}
	if opts.From != "" && opts.To != "" && from.After(to) {
		return fmt.Errorf("patterns: scan: from %s is after to %s", opts.From, opts.To)
	}
	for i, d := range opts.Exclude {
		if _, err := time.Parse(dayLayout, d); err != nil {
			return fmt.Errorf("patterns: scan: excluded day %d, %q, is not a date YYYY-MM-DD", i+1, d)
		}
	}
	return nil
}

// Validate reports the first option that Compare would refuse whatever the
// regions: an alpha outside (0, 1), a negative or non-finite material
// shift, a negative MinDayTrips, or a focus point that is not a WGS84
// longitude and latitude or has a negative radius. Compare also checks the
// focus against the regions it is given.
func (o CompareOptions) Validate() error {
	if f := o.Focus; f != nil && f.Point != nil {
		// A focus point needs the regions to be used, not to be checked:
		// any partition lets validate check the point and radius.
		o.Focus = &Focus{Point: f.Point, RadiusMetres: f.RadiusMetres}
		return o.validate(&partition.Partition{})
	}
	return o.validate(nil)
}
