package report

import (
	"math"
	"strings"
	"testing"

	"narrows/patterns"
)

func TestReasonFigures(t *testing.T) {
	nan := math.NaN()
	a := &patterns.Assessment{
		Verdict: patterns.Unchanged, Basis: patterns.BasisNone, InBefore: true, InAfter: false,
		DaysBefore: 3, TotalBefore: 10, DaysAfter: 1, TotalAfter: 9, FisherP: 0.58, FisherPAdjusted: 0.9,
	}
	a.Effects[patterns.Cost] = patterns.Effect{Before: 4, After: 3, Raw: -1, Group: -0.1, Relative: -0.125,
		Adjusted: patterns.Shift{Before: []float64{1, 2}, After: []float64{3, 4}, P: 0.333, PAdjusted: 0.5, Shift: -0.5, Low: math.Inf(-1), High: math.Inf(1)}}
	a.Effects[patterns.TravelTime] = patterns.Effect{Before: 600, After: 540, Raw: -60, Group: nan, Relative: nan,
		Adjusted: patterns.Shift{Before: []float64{1.5}, P: nan, PAdjusted: nan, Shift: nan, Low: nan, High: nan}}
	a.Effects[patterns.Speed] = patterns.Effect{Before: 5, After: 6}
	got := Reason(a)
	for _, want := range []string{
		"It crossed the support threshold, but no change of its own is both significant and material. ",
		"cost 4.0 to 3.0 extra veh-h/day (raw -1.0), comparison group -10 %, adjusted -0.5 (-12 %, too few days for a 95 % interval; Mann-Whitney p adjusted 0.5000)",
		"travel time 10.0 to 9.0 min per trip (raw -1.0), comparison group n/a, adjusted change not tested (1 days with trips before, 0 after)",
		"no comparison group",
		"speed 18.0 to 21.6 km/h",
		"on the daily skyline 3 of 10 days before and 1 of 9 after (context only; Fisher p adjusted 0.9000)",
	} {
		if !strings.Contains(got, want) {
			t.Errorf("reason %q lacks %q", got, want)
		}
	}
	if !strings.HasSuffix(got, ".") {
		t.Errorf("reason %q does not end a sentence", got)
	}
}

// TestReasonLeads checks that each verdict's reason opens with the
// evidence that decided it.
func TestReasonLeads(t *testing.T) {
	tests := []struct {
		verdict    patterns.Verdict
		basis      patterns.Basis
		inBefore   bool
		cost, time patterns.Change
		want       string
	}{
		{patterns.Cleared, patterns.BasisCost, true, patterns.Down, patterns.Down, "Cleared by its cost: adjusted for the comparison group it fell by half or more, significantly. "},
		{patterns.Cleared, patterns.BasisBar, true, patterns.NoChange, patterns.Down, "Cleared by the fixed bar: it met the before period's bar on 2 of 20 days after against 18 of 20 before, and is significantly quicker beyond the comparison group's change. "},
		{patterns.New, patterns.BasisCost, false, patterns.Up, patterns.NoChange, "Decided by its cost: significantly and materially costlier beyond the comparison group's change. "},
		{patterns.Worse, patterns.BasisTime, true, patterns.NoChange, patterns.Up, "Decided by its travel time: significantly and materially slower per trip beyond the comparison group's change. "},
		{patterns.Eased, patterns.BasisTime, true, patterns.NoChange, patterns.Down, "Decided by its travel time: significantly and materially quicker per trip beyond the comparison group's change. "},
		{patterns.Unchanged, patterns.BasisMixed, true, patterns.Up, patterns.Down, "Mixed evidence: its adjusted cost and travel time changed in opposite directions. "},
		{patterns.Unchanged, patterns.BasisNone, true, patterns.NoChange, patterns.NoChange, "No change of its own is both significant and material. "},
	}
	for _, tc := range tests {
		a := &patterns.Assessment{Verdict: tc.verdict, Basis: tc.basis, InBefore: tc.inBefore, InAfter: true,
			DaysWithTrips: [2]int{20, 20}, BarDays: [2]int{18, 2}}
		a.Effects[patterns.Cost].Adjusted.Change = tc.cost
		a.Effects[patterns.TravelTime].Adjusted.Change = tc.time
		if got := Reason(a); !strings.HasPrefix(got, tc.want) {
			t.Errorf("%s/%s: %q, want it to begin %q", tc.verdict, tc.basis, got, tc.want)
		}
	}
}

func TestSignedNeverShowsASignedZero(t *testing.T) {
	for _, tc := range []struct {
		format string
		v      float64
		want   string
	}{
		{"%+.1f", -0.04, "0.0"},
		{"%+.1f", 0.04, "0.0"},
		{"%+.1f", math.Copysign(0, -1), "0.0"},
		{"%+.1f", -0.06, "-0.1"},
		{"%+.1f", 2.14, "+2.1"},
		{"%+.2f", -0.004, "0.00"},
		{"%+.2f", -2.391, "-2.39"},
	} {
		if got := signed(tc.format, tc.v); got != tc.want {
			t.Errorf("signed(%q, %v) = %q, want %q", tc.format, tc.v, got, tc.want)
		}
	}
}
