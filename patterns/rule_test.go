package patterns

import (
	"math"
	"testing"
)

func TestDecide(t *testing.T) {
	opts := DefaultCompareOptions()
	const kmh = 1 / 3.6
	// base: a finding in both periods with no change at all.
	base := evidence{InBefore: true, InAfter: true, ShareBefore: 0.6, ShareAfter: 0.6, FisherPAdjusted: 1, SpeedPAdj: 0.8, DetourPAdj: 0.8}
	with := func(f func(*evidence)) evidence { e := base; f(&e); return e }
	tests := []struct {
		name string
		e    evidence
		want Verdict
	}{
		{"no change", base, Unchanged},
		{"gone, significant drop", with(func(e *evidence) { e.InAfter, e.ShareAfter, e.FisherPAdjusted = false, 0.05, 0.001 }), Cleared},
		{"gone and faster", with(func(e *evidence) {
			e.InAfter, e.ShareAfter, e.FisherPAdjusted, e.SpeedShift, e.SpeedPAdj = false, 0.05, 0.001, 5*kmh, 0.001
		}), Cleared},
		{"below threshold, drop not significant", with(func(e *evidence) { e.InAfter, e.ShareAfter, e.FisherPAdjusted = false, 0.15, 0.2 }), Unchanged},
		{"below threshold, not significant, but faster", with(func(e *evidence) {
			e.InAfter, e.ShareAfter, e.FisherPAdjusted, e.SpeedShift, e.SpeedPAdj = false, 0.15, 0.2, 3*kmh, 0.01
		}), Eased},
		{"gone but slower: mixed", with(func(e *evidence) {
			e.InAfter, e.ShareAfter, e.FisherPAdjusted, e.SpeedShift, e.SpeedPAdj = false, 0.05, 0.001, -3*kmh, 0.01
		}), Unchanged},
		{"new, significant rise", with(func(e *evidence) { e.InBefore, e.ShareBefore, e.FisherPAdjusted = false, 0.02, 0.001 }), New},
		{"new, slower too", with(func(e *evidence) {
			e.InBefore, e.ShareBefore, e.FisherPAdjusted, e.SpeedShift, e.SpeedPAdj = false, 0.02, 0.001, -4*kmh, 0.001
		}), New},
		{"crossed threshold, rise not significant", with(func(e *evidence) { e.InBefore, e.ShareBefore, e.FisherPAdjusted = false, 0.18, 0.6 }), Unchanged},
		{"crossed threshold, not significant, slower", with(func(e *evidence) {
			e.InBefore, e.ShareBefore, e.FisherPAdjusted, e.SpeedShift, e.SpeedPAdj = false, 0.18, 0.6, -2*kmh, 0.001
		}), Worse},
		{"faster, material", with(func(e *evidence) { e.SpeedShift, e.SpeedPAdj = 2*kmh, 0.01 }), Eased},
		{"faster, not material", with(func(e *evidence) { e.SpeedShift, e.SpeedPAdj = 0.5*kmh, 0.0001 }), Unchanged},
		{"faster, material, not significant", with(func(e *evidence) { e.SpeedShift, e.SpeedPAdj = 5*kmh, 0.06 }), Unchanged},
		{"faster exactly at the threshold", with(func(e *evidence) { e.SpeedShift, e.SpeedPAdj = opts.MinShiftSpeed, 0.01 }), Eased},
		{"p exactly alpha is not significant", with(func(e *evidence) { e.SpeedShift, e.SpeedPAdj = 5*kmh, 0.05 }), Unchanged},
		{"slower", with(func(e *evidence) { e.SpeedShift, e.SpeedPAdj = -2*kmh, 0.01 }), Worse},
		{"less circuitous", with(func(e *evidence) { e.DetourShift, e.DetourPAdj = -0.1, 0.01 }), Eased},
		{"more circuitous", with(func(e *evidence) { e.DetourShift, e.DetourPAdj = 0.1, 0.01 }), Worse},
		{"detour shift too small", with(func(e *evidence) { e.DetourShift, e.DetourPAdj = 0.02, 0.0001 }), Unchanged},
		{"faster but more circuitous: mixed", with(func(e *evidence) {
			e.SpeedShift, e.SpeedPAdj, e.DetourShift, e.DetourPAdj = 2*kmh, 0.01, 0.1, 0.01
		}), Unchanged},
		{"recurs more often while in both", with(func(e *evidence) { e.ShareAfter, e.FisherPAdjusted = 0.95, 0.001 }), Worse},
		{"recurs less often while in both", with(func(e *evidence) { e.ShareAfter, e.FisherPAdjusted = 0.25, 0.001 }), Eased},
		{"untested series (NaN)", with(func(e *evidence) {
			e.SpeedShift, e.SpeedPAdj, e.DetourShift, e.DetourPAdj = math.NaN(), math.NaN(), math.NaN(), math.NaN()
		}), Unchanged},
	}
	for _, tc := range tests {
		if got, _ := decide(tc.e, opts); got != tc.want {
			t.Errorf("%s: %s, want %s", tc.name, got, tc.want)
		}
	}
}

// TestDecideChanges checks the changes decide returns with its verdict: one
// per measure, in the direction of the change, only when significant and
// material.
func TestDecideChanges(t *testing.T) {
	opts := DefaultCompareOptions()
	const kmh = 1 / 3.6
	base := evidence{InBefore: true, InAfter: true, ShareBefore: 0.6, ShareAfter: 0.6, FisherPAdjusted: 1, SpeedPAdj: 0.8, DetourPAdj: 0.8}
	with := func(f func(*evidence)) evidence { e := base; f(&e); return e }
	tests := []struct {
		name string
		e    evidence
		want changes
	}{
		{"no change", base, changes{}},
		{"gone, faster, more direct", with(func(e *evidence) {
			e.InAfter, e.ShareAfter, e.FisherPAdjusted = false, 0.05, 0.001
			e.SpeedShift, e.SpeedPAdj, e.DetourShift, e.DetourPAdj = 5*kmh, 0.001, -0.2, 0.001
		}), changes{Down, Up, Down}},
		{"new, slower, more circuitous", with(func(e *evidence) {
			e.InBefore, e.ShareBefore, e.FisherPAdjusted = false, 0.02, 0.001
			e.SpeedShift, e.SpeedPAdj, e.DetourShift, e.DetourPAdj = -4*kmh, 0.001, 0.3, 0.01
		}), changes{Up, Down, Up}},
		{"significant but not material", with(func(e *evidence) {
			e.SpeedShift, e.SpeedPAdj, e.DetourShift, e.DetourPAdj = 0.5*kmh, 0.0001, 0.02, 0.0001
		}), changes{}},
		{"material but not significant", with(func(e *evidence) {
			e.ShareAfter, e.FisherPAdjusted = 0.9, 0.2
			e.SpeedShift, e.SpeedPAdj, e.DetourShift, e.DetourPAdj = -5*kmh, 0.06, 0.3, 0.05
		}), changes{}},
		{"untested series (NaN)", with(func(e *evidence) {
			e.SpeedShift, e.SpeedPAdj, e.DetourShift, e.DetourPAdj = math.NaN(), math.NaN(), math.NaN(), math.NaN()
		}), changes{}},
	}
	for _, tc := range tests {
		if _, got := decide(tc.e, opts); got != tc.want {
			t.Errorf("%s: %+v, want %+v", tc.name, got, tc.want)
		}
	}
}
