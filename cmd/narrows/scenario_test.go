package main

import (
	"context"
	"flag"
	"fmt"
	"path/filepath"
	"strings"
	"testing"

	"narrows/cmd/internal/town"
	"narrows/patterns"
	"narrows/report"
)

// controlSeeds is the number of seeds of the control scenario that
// TestControlVerdictRate simulates: 2 by default, to keep the test suite
// quick; run it with -control-seeds 20 for the measured rate.
var controlSeeds = flag.Int("control-seeds", 2, "seeds of the control scenario in TestControlVerdictRate")

// scenarioComparison simulates a scenario of the demo town with a seed,
// runs its study and returns the comparison, the printed summary and the
// planted pair's regions.
func scenarioComparison(t *testing.T, kind string, seed int) (*patterns.Comparison, string, [2]int) {
	t.Helper()
	dir := t.TempDir()
	mustRunCLI(t, "simulate", "--scenario", kind, "--seed", fmt.Sprint(seed), "--out", dir)
	study := filepath.Join(dir, "study.toml")
	stdout := mustRunCLI(t, "run", study)
	regions, store := studyOutputs(t, dir)
	before, after := studyPeriods(t, study)
	s, err := loadStudy(study)
	if err != nil {
		t.Fatal(err)
	}
	opts := s.Compare.CompareOptions
	cmp, err := patterns.Compare(context.Background(), store, regions, before, after, opts)
	if err != nil {
		t.Fatal(err)
	}
	tw, err := town.Generate(town.Options{Size: town.SizeTown, Seed: int64(seed)})
	if err != nil {
		t.Fatal(err)
	}
	return cmp, stdout, [2]int{regionAt(regions, tw.Housing.Centre), regionAt(regions, tw.Jobs.Centre)}
}

// A change of the whole town (a season: a quarter fewer trips and a tenth
// faster; growth: a quarter more and a tenth slower) builds nothing: the
// crossing stays unchanged, no finding is new or worse on its own
// measures, and the summary states the network's change.
func TestNetworkScenariosLeaveTheCrossingUnchanged(t *testing.T) {
	if testing.Short() {
		t.Skip("end-to-end scenario studies")
	}
	for _, tc := range []struct {
		kind                string
		tripsLow, tripsHigh float64 // bounds of the network's trip change
		speedSign           float64
		summary             string
	}{
		{"season", -0.35, -0.15, 1, "Across the network, trips per day changed by -"},
		{"growth", 0.12, 0.35, -1, "Across the network, trips per day changed by +"},
	} {
		t.Run(tc.kind, func(t *testing.T) {
			cmp, stdout, pair := scenarioComparison(t, tc.kind, 1)
			crossing := 0
			for _, a := range cmp.Assessments {
				if !hasEdge(a.Finding, pair[0], pair[1]) {
					continue
				}
				crossing++
				if a.Verdict != patterns.Unchanged {
					t.Errorf("%s: the crossing %s is %s: %s", tc.kind, a.Finding.ID, a.Verdict, report.Reason(&a))
				}
			}
			if crossing == 0 {
				t.Errorf("%s: no finding holds the crossing", tc.kind)
			}
			checkNoSpuriousWorse(t, cmp)
			n := cmp.Network
			if r := n.Trips.Relative; !(r >= tc.tripsLow && r <= tc.tripsHigh) || n.Speed.Relative*tc.speedSign <= 0 {
				t.Errorf("%s: network trips %+.3f, speed %+.3f; want trips within [%v, %v] and speed of sign %v",
					tc.kind, r, n.Speed.Relative, tc.tripsLow, tc.tripsHigh, tc.speedSign)
			}
			if !strings.Contains(stdout, tc.summary) {
				t.Errorf("%s: the summary does not state the network's change:\n%s", tc.kind, stdout)
			}
			t.Logf("%s: network trips %+.1f %%, travel time %+.1f %%, speed %+.1f %%; verdicts %v", tc.kind,
				100*n.Trips.Relative, 100*n.TravelTime.Relative, 100*n.Speed.Relative, cmp.Counts)
		})
	}
}

// TestControlVerdictRate simulates the control scenario (nothing changes)
// with -control-seeds seeds: the share of findings with a verdict other
// than unchanged must be at most alpha.
func TestControlVerdictRate(t *testing.T) {
	if testing.Short() {
		t.Skip("end-to-end control studies")
	}
	var findings, changed int
	alpha := patterns.DefaultCompareOptions().Alpha
	for seed := 1; seed <= *controlSeeds; seed++ {
		cmp, _, _ := scenarioComparison(t, "control", seed)
		for _, a := range cmp.Assessments {
			findings++
			if a.Verdict != patterns.Unchanged {
				changed++
				t.Logf("seed %d: %s is %s: %s", seed, a.Finding.ID, a.Verdict, report.Reason(&a))
			}
		}
		checkNoSpuriousWorse(t, cmp)
	}
	if findings == 0 {
		t.Fatal("the control has no findings: nothing was tested")
	}
	rate := float64(changed) / float64(findings)
	if rate > alpha {
		t.Errorf("control over %d seeds: %d of %d findings not unchanged (%.3f > alpha %v)", *controlSeeds, changed, findings, rate, alpha)
	}
	t.Logf("control over %d seeds: %d of %d findings not unchanged (rate %.3f, alpha %v)", *controlSeeds, changed, findings, rate, alpha)
}
