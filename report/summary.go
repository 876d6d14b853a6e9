package report

import (
	"sort"
	"strconv"

	"narrows/patterns"
)

// The one-page summary's table, shared by the workbook's first sheet and
// the top of the HTML page: one row per weak link with its verdict and
// cost before and after, each with its 95 % interval, and the change
// against its comparison group.

// summaryLimit is how many weak links the one-page summary lists; the
// others are on the Weak links sheet and further down the page.
const summaryLimit = 10

// summaryColumns are the one-page summary table's headers.
func (v *view) summaryColumns() []string {
	if v.comparing() {
		return []string{"Rank (period)", "Place", "Verdict", "Cost before veh-h/day (95 % CI)", "Cost after veh-h/day (95 % CI)", "Adjusted change veh-h/day (95 % CI)"}
	}
	return []string{"Rank", "Place", "Extra veh-h/day", "Extra veh-km/day"}
}

// summaryRows lists the first summaryLimit weak links as the summary shows
// them (before-period findings first, by rank, then the after period's)
// with their verdicts, and how many more there are.
func (v *view) summaryRows() (rows [][]string, verdicts []patterns.Verdict, more int) {
	for _, it := range v.summaryOrder() {
		if len(rows) == summaryLimit {
			more++
			continue
		}
		f := it.Finding
		rank := strconv.Itoa(f.Rank)
		a := it.Assessment
		if a == nil {
			verdicts = append(verdicts, "")
			rows = append(rows, []string{rank, it.Name, v.gatedText(totals(f).Trips, f.ExtraHoursPerDay, 1), v.gatedText(totals(f).Trips, f.ExtraKMPerDay, 0)})
			continue
		}
		rank += " (" + v.periodOf(it) + ")"
		c := a.Effects[patterns.Cost]
		before, after, adj := levelWithCI(c.Before, c.BeforeLow, c.BeforeHigh), levelWithCI(c.After, c.AfterLow, c.AfterHigh), "n/a"
		if shift, ci := fmtInterval(c.Adjusted.Shift, c.Adjusted.Low, c.Adjusted.High, 1); shift != "n/a" {
			adj = shift
			if ci != "" {
				adj += " " + ci
			}
		}
		if v.suppressed(totals(f).Trips) {
			before, after, adj = v.valueMark(), v.valueMark(), v.valueMark()
		}
		rows = append(rows, []string{rank, it.Name, string(a.Verdict), before, after, adj})
		verdicts = append(verdicts, a.Verdict)
	}
	return rows, verdicts, more
}

// gatedText is x with d decimals, or the suppression mark when it comes
// from fewer trips than the publication threshold.
func (v *view) gatedText(trips, x float64, d int) string {
	if v.suppressed(trips) {
		return v.valueMark()
	}
	return fmtFixed(x, d)
}

// schemeLine names the scheme and its opening day for the summary ("" when
// the study names neither).
func (v *view) schemeLine() string {
	opening := ""
	if c := v.in.Comparison; c != nil {
		opening = c.Options.Opening
	}
	switch {
	case len(v.in.Scheme) > 0 && opening != "":
		return v.schemeName() + ", opened on " + opening
	case len(v.in.Scheme) > 0:
		return v.schemeName()
	case opening != "":
		return "opened on " + opening
	}
	return ""
}

// summaryOrder returns the report's weak links in the summary's order:
// before-period findings first, by rank, then the after period's.
func (v *view) summaryOrder() []item {
	items := append([]item(nil), v.items...)
	sort.SliceStable(items, func(i, j int) bool {
		pi, pj := v.periodOf(items[i]) == "after", v.periodOf(items[j]) == "after"
		if pi != pj {
			return !pi
		}
		return items[i].Finding.Rank < items[j].Finding.Rank
	})
	return items
}
