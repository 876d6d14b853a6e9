package report

import (
	"slices"
	"strings"
	"testing"

	"narrows/patterns"
)

// TestExclusionRows checks that each exclusion and its reason is a row of
// the Method and Data quality sheets, for a scan and a comparison, and
// that a report without exclusions has no such rows.
func TestExclusionRows(t *testing.T) {
	x := patterns.Exclusions{
		Days:  []patterns.DayExclusion{{From: "2026-03-10", To: "2026-03-12", Reason: "bridge works"}, {From: "2026-03-20", Reason: "match day"}},
		Pairs: []patterns.PairExclusion{{A: 3, B: 7, Reason: "ferry"}, {A: 5, Reason: "counting fault"}},
	}
	want := [][2]string{
		{"Excluded days 2026-03-10 to 2026-03-12", "bridge works"},
		{"Excluded day 2026-03-20", "match day"},
		{"Excluded region pair 3-7 (both directions)", "ferry"},
		{"Excluded region 5 (every pair)", "counting fault"},
	}
	for _, tc := range []struct {
		name string
		in   Input
	}{{"scan", fxScanInput()}, {"comparison", fxInput()}} {
		for _, with := range []bool{true, false} {
			in := tc.in
			if with {
				in.Exclusions = x
			}
			f, _ := writeBook(t, in)
			for _, sheet := range []string{SheetMethod, SheetDataQuality} {
				rows, err := f.GetRows(sheet)
				if err != nil {
					t.Fatal(err)
				}
				var got [][2]string
				defined := false
				for _, r := range rows {
					if len(r) >= 2 && strings.HasPrefix(r[0], "Excluded ") {
						got = append(got, [2]string{r[0], r[1]})
					}
					defined = defined || (len(r) > 0 && r[0] == "Exclusion")
				}
				w := want
				if !with {
					w = nil
				}
				if !slices.Equal(got, w) {
					t.Errorf("%s, exclusions %v: %s rows %q, want %q", tc.name, with, sheet, got, w)
				}
				if sheet == SheetMethod && defined != with {
					t.Errorf("%s, exclusions %v: Method defines Exclusion: %v", tc.name, with, defined)
				}
			}
		}
	}
}
