package main

import (
	"fmt"
	"math"
	"path/filepath"
	"strings"
	"testing"
)

// appraisalTolerance is the documented tolerance between the estimated
// vehicle-km saved per day by the town's real new bridge (free-flow
// re-routing of the before period's trips) and the saving the simulated
// trips showed after it opened.
const appraisalTolerance = 0.25

// TestAppraiseDemoBridge: on the demo town, the scheme's real bridge,
// given as a candidate, ranks among the best three candidates for the
// crossing finding, and its estimated vehicle-km saving for the before
// period is within appraisalTolerance of the saving observed after it
// opened (the simulator knows both).
func TestAppraiseDemoBridge(t *testing.T) {
	if testing.Short() {
		t.Skip("end-to-end demo")
	}
	dir := t.TempDir()
	mustRunCLI(t, "demo", "--dir", dir)
	study := filepath.Join(dir, "study.toml")
	out := mustRunCLI(t, "appraise", study, "--generate", "10")
	var rank int
	var estKM, obsKM float64
	for _, line := range strings.Split(out, "\n") {
		if strings.Contains(line, "Lantern Bridge") {
			var name1, name2, kind string
			var km, vkm, vh float64
			if _, err := fmt.Sscan(line, &rank, &name1, &name2, &kind, &km, &vkm, &vh); err != nil {
				t.Fatalf("%q: %v", line, err)
			}
			estKM = vkm
		}
		if strings.HasPrefix(line, "Observed after") {
			i := strings.Index(line, "trips per day: ")
			fmt.Sscan(line[i+len("trips per day: "):], &obsKM)
		}
	}
	if rank < 1 || rank > 3 {
		t.Fatalf("Lantern Bridge ranks %d, want among the best 3:\n%s", rank, out)
	}
	gap := (estKM - obsKM) / obsKM
	t.Logf("estimated %.1f veh-km/day, observed %.1f, gap %+.1f %%", estKM, obsKM, 100*gap)
	if !(obsKM > 0) || math.Abs(gap) > appraisalTolerance {
		t.Fatalf("estimated %.1f veh-km/day, observed %.1f: gap %.2f over %.2f", estKM, obsKM, gap, appraisalTolerance)
	}
	for _, c := range []string{"not a traffic forecast", "Induced demand", "qualified, licensed engineers"} {
		if !strings.Contains(out, c) {
			t.Errorf("no caution %q", c)
		}
	}
	// Bad input: a finding that does not exist.
	code, _, stderr := runCLI(t, "appraise", study, "--finding", "99")
	if code == exitOK || !strings.Contains(stderr, "no finding of rank 99") {
		t.Errorf("finding 99: exit %d, %s", code, stderr)
	}
}
