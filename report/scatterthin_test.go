package report

import (
	"bytes"
	"testing"
)

func TestOrdinal(t *testing.T) {
	for n, want := range map[int]string{1: "1st", 2: "2nd", 3: "3rd", 4: "4th", 11: "11th", 12: "12th", 13: "13th", 21: "21st", 22: "22nd", 101: "101st", 111: "111th"} {
		if got := ordinal(n); got != want {
			t.Errorf("ordinal(%d) = %q, want %q", n, got, want)
		}
	}
}

// A period with more non-candidate edge-days than maxContextEdgeDays has
// every k-th of them listed, with k the smallest that brings them under
// the bound; every candidate edge-day stays; the chart's title says so.
func TestScatterThinsContext(t *testing.T) {
	in := bigInput(10, 20, 400, 60) // 24,000 edge-days a period, about a quarter candidates
	want := map[string][2]int{}     // period -> candidates, non-candidates
	for _, label := range []string{"before", "after"} {
		sc := in.Comparison.Before
		if label == "after" {
			sc = in.Comparison.After
		}
		var c [2]int
		for _, dv := range sc.EdgeDaily {
			for _, d := range dv {
				if d.Candidate {
					c[0]++
				} else {
					c[1]++
				}
			}
		}
		if c[1] <= maxContextEdgeDays || c[1] > 2*maxContextEdgeDays {
			t.Fatalf("%s has %d non-candidate edge-days; the test needs between %d and %d", label, c[1], maxContextEdgeDays, 2*maxContextEdgeDays)
		}
		want[label] = c
	}
	f, pkg := writeBook(t, in)
	rows, err := f.GetRows(SheetScatter)
	if err != nil {
		t.Fatal(err)
	}
	got := map[string][2]int{}
	for _, r := range rows[1:] {
		c := got[r[1]]
		if r[0] == "yes" {
			c[0]++
		} else {
			c[1]++
		}
		got[r[1]] = c
	}
	for label, w := range want {
		// every 2nd of n: ceil(n/2)
		if g := got[label]; g[0] != w[0] || g[1] != (w[1]+1)/2 {
			t.Errorf("%s: %d candidate and %d other edge-days listed, want %d and %d", label, g[0], g[1], w[0], (w[1]+1)/2)
		}
	}
	found := false
	if part, ok := chartParts(t, pkg)["Edge-days: speed against detour"]; ok {
		found = bytes.Contains(part, []byte("every 2nd of"))
	}
	if !found {
		t.Error("no chart title says the non-candidate edge-days were thinned")
	}
}
