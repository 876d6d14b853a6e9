package patterns

import (
	"math"

	"narrows/patterns/stats"
)

// Effect is one measure of a finding compared across the periods, on its
// own and against its comparison group.
type Effect struct {
	// Before and After are the medians of the finding's daily values, with
	// their 95 % confidence intervals (stats.MedianCI).
	Before, After                              float64
	BeforeLow, BeforeHigh, AfterLow, AfterHigh float64
	// Raw is the finding's own change, After − Before.
	Raw float64
	// Group is the comparison group's relative change on the same days:
	// the median of its daily index (its daily value over its before
	// median) after, minus that before; 0.1 means 10 % higher after.
	Group float64
	// Adjusted tests the finding's daily values each divided by the
	// group's index that day, after against before: the change the
	// finding shows beyond the network's (Hodges-Lehmann shift, its 95 %
	// confidence interval and the Mann-Whitney test, in the measure's
	// unit). Adjusted.Change is set for the measures the rule decides on.
	Adjusted Shift
	// Relative is Adjusted.Shift / Before: the adjusted change as a share
	// of the before level (±Inf when Before is 0 and the shift is not).
	Relative float64
}

// RelativeCI returns the adjusted change's 95 % confidence interval as a
// share of the before level.
func (e Effect) RelativeCI() (low, high float64) {
	return e.Adjusted.Low / e.Before, e.Adjusted.High / e.Before
}

// effect compares the finding's daily values with the comparison group's
// daily scale. fb, fa are the finding's values before and after; gb, ga
// the group's scale on the same days (nil when there is no comparison
// group: the index is then 1). full asks for the Mann-Whitney test and the
// confidence interval; otherwise only the Hodges-Lehmann shift is given.
func effect(fb, fa, gb, ga []float64, full bool) Effect {
	e := Effect{Before: stats.Median(fb), After: stats.Median(fa)}
	e.BeforeLow, e.BeforeHigh = stats.MedianCI(fb, 0.95)
	e.AfterLow, e.AfterHigh = stats.MedianCI(fa, 0.95)
	e.Raw = e.After - e.Before
	ab, aa := fb, fa
	if gb != nil {
		base := stats.Median(gb)
		ib, ia := index(gb, base), index(ga, base)
		e.Group = stats.Median(ia) - stats.Median(ib)
		ab, aa = divide(fb, ib), divide(fa, ia)
	}
	if full {
		e.Adjusted = shiftTest(ab, aa)
	} else {
		e.Adjusted = shiftEstimate(ab, aa)
	}
	e.Relative = relative(e.Adjusted.Shift, e.Before)
	return e
}

// relative returns shift/base, ±Inf for a non-zero shift from 0, 0 for no
// shift, NaN when either is NaN.
func relative(shift, base float64) float64 {
	switch {
	case math.IsNaN(shift) || math.IsNaN(base):
		return math.NaN()
	case base == 0 && shift == 0:
		return 0
	}
	return shift / base
}

// index divides each value by base (NaN for a base that is not positive).
func index(v []float64, base float64) []float64 {
	out := make([]float64, len(v))
	for i, x := range v {
		if base > 0 {
			out[i] = x / base
		} else {
			out[i] = math.NaN()
		}
	}
	return out
}

// divide returns v[i]/by[i], leaving out the days whose divisor is not a
// positive number.
func divide(v, by []float64) []float64 {
	out := make([]float64, 0, len(v))
	for i, x := range v {
		if by[i] > 0 {
			out = append(out, x/by[i])
		}
	}
	return out
}
