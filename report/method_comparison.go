package report

import (
	"fmt"
	"strconv"

	"narrows/partition/geodesy"
	"narrows/patterns"
)

// comparisonMethod gives the Method sheet's lines on the comparison: the
// measures, the comparison group, the tests and the decision rule with the
// numbers that decide.
func (v *view) comparisonMethod(alpha float64) []definition {
	o := patterns.DefaultCompareOptions()
	var barSpeed float64
	pool := 0
	if c := v.in.Comparison; c != nil {
		if c.Options.GroupSize > 0 {
			o = c.Options
		}
		barSpeed, pool = c.BarSpeed, c.PoolSize
	}
	return []definition{
		{"Daily measures", "Each weak link is measured on every analysed day of both periods on which its edges carried trips: cost (extra vehicle-hours, summed over its edges), travel time per trip (trip-weighted mean of its edges' median travel times), trips, speed, detour ratio and extra vehicle-km. Cost and travel time decide; the others explain them."},
		{"Comparison group", fmt.Sprintf("For each weak link, the %d region pairs most like it: within a band of straight-line distance per trip (a factor %s either side, widened to 2, 3 and then any distance until it holds %d pairs), the nearest in before-period detour ratio and log speed, each scaled by its spread (median absolute deviation) over the pool. The pool holds the pairs outside every weak link of either period and outside the focus area, with trips on at least %s of each period's days: %d pairs in this study.",
			o.GroupSize, "1.5", o.GroupMinSize, formatPercent(o.GroupMinDays), pool)},
		{"Adjusted change (difference in differences)", "Each day's value of the weak link is divided by its comparison group's index that day (the group's value over its before-period median; for the cost, the group's vehicle-hours travelled), and the Hodges-Lehmann shift of after against before is taken, with its 95 % confidence interval: a before-after comparison with a comparison group on the ratio scale, so that a season or growth that moves the whole network by a share cancels. The raw change and the group's change are shown beside it."},
		{"Network change", "Trips per day, travel time per trip and speed over every region pair with trips, after against before: what happened to the whole network."},
		{"Mann-Whitney U test", "Two-sided test of the adjusted daily values after against before."},
		{"Benjamini-Hochberg", fmt.Sprintf("P-values are adjusted across weak links, separately for each measure and for the Fisher tests, to control the false discovery rate; a change is significant at adjusted p < %s.", strconv.FormatFloat(alpha, 'g', -1, 64))},
		{"Material change", fmt.Sprintf("A significant change counts when the adjusted change is at least %s of the before level for the cost and %s for the travel time.", formatPercent(o.MaterialCost), formatPercent(o.MaterialTime))},
		{"Fixed bar", fmt.Sprintf("The bar a pair had to clear to be weak, held at its before-period level: a median detour ratio at least the detour floor and a median speed below %s km/h, the before period's median of the daily trip-weighted median speed. Skyline dominance is left out because it is relative to the rest of each day.", strconv.FormatFloat(roundTo(geodesy.KMH(barSpeed), 1), 'f', -1, 64))},
		{"Skyline recurrence", "Days on which any edge of the weak link was a skyline candidate, with a two-sided Fisher exact test: context only, never the evidence for a verdict."},
		{"Decision rule", fmt.Sprintf("With better = adjusted cost or travel time down significantly and materially, worse = up: better and worse together: unchanged (mixed); a weak link of the before period that is better and whose adjusted cost fell by at least %s, or that met the fixed bar on fewer than %s of the after days (and fewer than before): cleared; worse and of the after period only: new; worse: worse; better: eased; otherwise unchanged.",
			formatPercent(o.ClearCost), formatPercent(o.ClearBarShare))},
	}
}
