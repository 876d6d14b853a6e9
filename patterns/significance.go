package patterns

import (
	"math"

	"narrows/patterns/stats"
)

// recurrenceTest is the two-sided Fisher exact test of the days on which a
// finding recurred against the other analysed days, before and after.
func recurrenceTest(a *Assessment) float64 {
	p, _ := stats.FisherExact([2][2]int{
		{a.DaysBefore, a.TotalBefore - a.DaysBefore},
		{a.DaysAfter, a.TotalAfter - a.DaysAfter},
	})
	return p
}

// shiftTest compares after with before. Without data in a period every
// figure is NaN.
func shiftTest(before, after []float64) Shift {
	s := Shift{Before: before, After: after}
	r, err := stats.MannWhitneyU(after, before, stats.Auto)
	if err != nil {
		nan := math.NaN()
		s.U, s.P, s.PAdjusted, s.Shift, s.Low, s.High = nan, nan, nan, nan, nan, nan
		return s
	}
	s.U, s.P = r.U, r.P
	s.Shift = stats.HodgesLehmann(after, before)
	s.Low, s.High = stats.HodgesLehmannCI(after, before, 0.95)
	return s
}

// adjust applies Benjamini-Hochberg to one family of p-values across the
// assessments; field returns pointers to the raw and the adjusted value.
func adjust(as []Assessment, field func(*Assessment) (raw, adjusted *float64)) {
	p := make([]float64, len(as))
	for i := range as {
		raw, _ := field(&as[i])
		p[i] = *raw
	}
	for i, q := range stats.BenjaminiHochberg(p) {
		_, adj := field(&as[i])
		*adj = q
	}
}

// adjustFamilies adjusts the p-values with Benjamini-Hochberg, each family
// across all assessments: the Fisher tests, and each measure's adjusted
// test.
func adjustFamilies(as []Assessment) {
	adjust(as, func(a *Assessment) (*float64, *float64) { return &a.FisherP, &a.FisherPAdjusted })
	for m := range NumMeasures {
		adjust(as, func(a *Assessment) (*float64, *float64) {
			return &a.Effects[m].Adjusted.P, &a.Effects[m].Adjusted.PAdjusted
		})
	}
}

// shiftEstimate is shiftTest without the test and the interval: the
// Hodges-Lehmann shift only, P and the interval NaN.
func shiftEstimate(before, after []float64) Shift {
	nan := math.NaN()
	s := Shift{Before: before, After: after, U: nan, P: nan, PAdjusted: nan, Low: nan, High: nan}
	s.Shift = stats.HodgesLehmann(after, before)
	return s
}
