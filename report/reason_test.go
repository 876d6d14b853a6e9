package report

import (
	"math"
	"regexp"
	"strings"
	"testing"

	"narrows/patterns"
)

func TestReasonFigures(t *testing.T) {
	nan := math.NaN()
	a := &patterns.Assessment{
		Verdict: patterns.Unchanged, InBefore: true, InAfter: false,
		DaysBefore: 3, TotalBefore: 10, DaysAfter: 1, TotalAfter: 9, FisherP: 0.58, FisherPAdjusted: 0.9,
		Speed:  patterns.Shift{Before: []float64{1, 2}, After: []float64{3, 4}, P: 0.333, PAdjusted: 0.5, Shift: 2 / 3.6 * 3.6, Low: math.Inf(-1), High: math.Inf(1)},
		Detour: patterns.Shift{Before: []float64{1.5}, P: nan, PAdjusted: nan, Shift: nan, Low: nan, High: nan},
	}
	got := Reason(a)
	for _, want := range []string{
		"crossed the support threshold",
		"3 of 10 days before and 1 of 9 after (Fisher p 0.5800, adjusted 0.9000)",
		"daily speed changed by +7.2 km/h (too few days for a 95 % interval; Mann-Whitney p 0.3330, adjusted 0.5000)",
		"detour ratio not tested (1 days with trips before, 0 after)",
	} {
		if !strings.Contains(got, want) {
			t.Errorf("reason %q lacks %q", got, want)
		}
	}
	if regexp.MustCompile(`\. [A-Z]`).MatchString(got) || !strings.HasSuffix(got, ".") {
		t.Errorf("reason %q is not one sentence", got)
	}
}

// TestReasonLeads checks the opening of the sentence for every verdict and
// the way the changes are joined.
func TestReasonLeads(t *testing.T) {
	tests := []struct {
		verdict           patterns.Verdict
		inBefore, inAfter bool
		recurrence        patterns.Change
		speed, detour     patterns.Change
		want              string
	}{
		{patterns.Cleared, true, false, patterns.Down, patterns.Up, patterns.Down,
			"No longer a finding: it recurs on significantly fewer days, is significantly faster and is significantly less circuitous; "},
		{patterns.New, false, true, patterns.Up, patterns.NoChange, patterns.NoChange, "Now a finding: it recurs on significantly more days; "},
		{patterns.Worse, true, true, patterns.NoChange, patterns.Down, patterns.Up, "It is significantly slower and is significantly more circuitous; "},
		{patterns.Eased, true, true, patterns.NoChange, patterns.NoChange, patterns.Down, "It is significantly less circuitous; "},
		{patterns.Unchanged, true, true, patterns.NoChange, patterns.Up, patterns.Up, "Mixed evidence: it is significantly faster and is significantly more circuitous; "},
		{patterns.Unchanged, false, true, patterns.NoChange, patterns.NoChange, patterns.NoChange, "It crossed the support threshold, but no change is both significant and material; "},
		{patterns.Unchanged, true, true, patterns.NoChange, patterns.NoChange, patterns.NoChange, "No change is both significant and material; "},
	}
	for _, tc := range tests {
		a := &patterns.Assessment{Verdict: tc.verdict, InBefore: tc.inBefore, InAfter: tc.inAfter, Recurrence: tc.recurrence,
			Speed: patterns.Shift{Change: tc.speed}, Detour: patterns.Shift{Change: tc.detour}}
		if got := Reason(a); !strings.HasPrefix(got, tc.want) {
			t.Errorf("%s: %q, want it to begin %q", tc.verdict, got, tc.want)
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
