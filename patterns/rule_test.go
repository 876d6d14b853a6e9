package patterns

import (
	"math"
	"testing"
)

// TestDecide covers every verdict and every basis of the rule, and the
// edges of its thresholds.
func TestDecide(t *testing.T) {
	opts := DefaultCompareOptions()
	nan := math.NaN()
	// base: a finding of both periods that met the bar on 18 of 20 days
	// before and after, nothing significant.
	base := Evidence{InBefore: true, InAfter: true, BarShareBefore: 0.9, BarShareAfter: 0.9,
		CostRelative: -0.05, CostP: 0.6, TimeRelative: 0.02, TimeP: 0.7}
	with := func(f func(*Evidence)) Evidence { e := base; f(&e); return e }
	tests := []struct {
		name       string
		e          Evidence
		want       Verdict
		basis      Basis
		cost, time Change
	}{
		{"nothing significant", base, Unchanged, BasisNone, NoChange, NoChange},
		{"significant but not material", with(func(e *Evidence) { e.CostRelative, e.CostP, e.TimeRelative, e.TimeP = -0.2, 0.001, 0.05, 0.001 }), Unchanged, BasisNone, NoChange, NoChange},
		{"material but not significant", with(func(e *Evidence) { e.CostRelative, e.CostP = -0.8, 0.06 }), Unchanged, BasisNone, NoChange, NoChange},
		{"tests not done", with(func(e *Evidence) { e.CostRelative, e.CostP, e.TimeRelative, e.TimeP = -0.9, nan, -0.9, nan }), Unchanged, BasisNone, NoChange, NoChange},
		{"cost halved: cleared", with(func(e *Evidence) { e.CostRelative, e.CostP = -0.5, 0.01 }), Cleared, BasisCost, Down, NoChange},
		{"cost down a third: eased", with(func(e *Evidence) { e.CostRelative, e.CostP = -0.33, 0.01 }), Eased, BasisCost, Down, NoChange},
		{"cost down at the material edge: eased", with(func(e *Evidence) { e.CostRelative, e.CostP = -opts.MaterialCost, 0.049 }), Eased, BasisCost, Down, NoChange},
		{"quicker: eased on time", with(func(e *Evidence) { e.TimeRelative, e.TimeP = -0.15, 0.001 }), Eased, BasisTime, NoChange, Down},
		{"quicker and off the bar: cleared by the bar", with(func(e *Evidence) { e.TimeRelative, e.TimeP, e.BarShareAfter = -0.15, 0.001, 0.3 }), Cleared, BasisBar, NoChange, Down},
		{"off the bar but not better: unchanged", with(func(e *Evidence) { e.BarShareAfter = 0.1 }), Unchanged, BasisNone, NoChange, NoChange},
		{"quicker, bar share under half but not lower than before: eased", with(func(e *Evidence) {
			e.TimeRelative, e.TimeP, e.BarShareBefore, e.BarShareAfter = -0.15, 0.001, 0.3, 0.3
		}), Eased, BasisTime, NoChange, Down},
		{"cost halved in an after-only finding: eased, not cleared", with(func(e *Evidence) { e.InBefore, e.CostRelative, e.CostP = false, -0.6, 0.001 }), Eased, BasisCost, Down, NoChange},
		{"costlier: worse", with(func(e *Evidence) { e.CostRelative, e.CostP = 0.4, 0.01 }), Worse, BasisCost, Up, NoChange},
		{"slower: worse on time", with(func(e *Evidence) { e.TimeRelative, e.TimeP = 0.1, 0.01 }), Worse, BasisTime, NoChange, Up},
		{"costlier, after only: new", with(func(e *Evidence) { e.InBefore, e.CostRelative, e.CostP = false, 0.4, 0.01 }), New, BasisCost, Up, NoChange},
		{"costlier from nothing, after only: new", with(func(e *Evidence) { e.InBefore, e.CostRelative, e.CostP = false, math.Inf(1), 0.01 }), New, BasisCost, Up, NoChange},
		{"after only without a change of its own: unchanged", with(func(e *Evidence) { e.InBefore = false }), Unchanged, BasisNone, NoChange, NoChange},
		{"cheaper but slower: mixed", with(func(e *Evidence) { e.CostRelative, e.CostP, e.TimeRelative, e.TimeP = -0.6, 0.001, 0.2, 0.001 }), Unchanged, BasisMixed, Down, Up},
	}
	seen := map[Verdict]bool{}
	bases := map[Basis]bool{}
	for _, tc := range tests {
		d := Decide(tc.e, opts)
		if d.Verdict != tc.want || d.Basis != tc.basis || d.Cost != tc.cost || d.Time != tc.time {
			t.Errorf("%s: %+v, want %s on %s, cost %v, time %v", tc.name, d, tc.want, tc.basis, tc.cost, tc.time)
		}
		seen[d.Verdict], bases[d.Basis] = true, true
	}
	for _, v := range []Verdict{Cleared, Eased, Unchanged, Worse, New} {
		if !seen[v] {
			t.Errorf("no case gives %s", v)
		}
	}
	for _, b := range []Basis{BasisNone, BasisMixed, BasisCost, BasisTime, BasisBar} {
		if !bases[b] {
			t.Errorf("no case decides on %s", b)
		}
	}
}
