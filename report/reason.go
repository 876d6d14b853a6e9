package report

import (
	"fmt"
	"math"
	"strings"

	"narrows/partition/geodesy"
	"narrows/patterns"
)

// Reason writes plain sentences on an assessment: first the evidence that
// decided its verdict (Assessment.Basis), then its cost and travel time
// before and after with the comparison group's change and the adjusted
// change, then speed and detour, which explain them, and the skyline
// recurrence as context. Speeds are in km/h, times in minutes, as
// everywhere in the outputs. The Comparison sheet and the page show it
// beside each verdict.
func Reason(a *patterns.Assessment) string {
	cost, tt := a.Effects[patterns.Cost], a.Effects[patterns.TravelTime]
	var lead string
	switch a.Basis {
	case patterns.BasisCost:
		lead = fmt.Sprintf("Decided by its cost: %s beyond the comparison group's change", changeWords(cost.Adjusted.Change, "costlier", "cheaper"))
		if a.Verdict == patterns.Cleared {
			lead = "Cleared by its cost: adjusted for the comparison group it fell by half or more, significantly"
		}
	case patterns.BasisTime:
		lead = fmt.Sprintf("Decided by its travel time: %s beyond the comparison group's change", changeWords(tt.Adjusted.Change, "slower per trip", "quicker per trip"))
	case patterns.BasisBar:
		lead = fmt.Sprintf("Cleared by the fixed bar: it met the before period's bar on %d of %d days after against %d of %d before, and is %s beyond the comparison group's change",
			a.BarDays[1], a.DaysWithTrips[1], a.BarDays[0], a.DaysWithTrips[0], betterWords(a))
	case patterns.BasisMixed:
		lead = "Mixed evidence: its adjusted cost and travel time changed in opposite directions"
	default:
		lead = "No change of its own is both significant and material"
		if a.InBefore != a.InAfter {
			lead = "It crossed the support threshold, but no change of its own is both significant and material"
		}
	}
	group := "no comparison group (too few like pairs)"
	if n := len(a.Group.Edges); n > 0 {
		group = fmt.Sprintf("comparison group of %d like pairs", n)
	}
	costText := describeEffect("cost", cost, func(v float64) float64 { return v }, "%.1f", "%+.1f", " extra veh-h/day")
	timeText := describeEffect("travel time", tt, func(v float64) float64 { return v / 60 }, "%.1f", "%+.1f", " min per trip")
	sp, dt := a.Effects[patterns.Speed], a.Effects[patterns.Detour]
	explain := fmt.Sprintf("speed %.1f to %.1f km/h, detour ratio %.2f to %.2f, trips per day %.0f to %.0f",
		geodesy.KMH(sp.Before), geodesy.KMH(sp.After), dt.Before, dt.After,
		a.Effects[patterns.Trips].Before, a.Effects[patterns.Trips].After)
	recurrence := fmt.Sprintf("on the daily skyline %d of %d days before and %d of %d after (context only; Fisher p adjusted %s)",
		a.DaysBefore, a.TotalBefore, a.DaysAfter, a.TotalAfter, formatP(a.FisherPAdjusted))
	return lead + ". " + costText + "; " + timeText + " (" + group + "). Explained by " + explain + "; " + recurrence + "."
}

// changeWords names the direction of a decided change.
func changeWords(c patterns.Change, up, down string) string {
	switch c {
	case patterns.Up:
		return "significantly and materially " + up
	case patterns.Down:
		return "significantly and materially " + down
	}
	return "not materially changed"
}

// betterWords names the measures that improved.
func betterWords(a *patterns.Assessment) string {
	var p []string
	if a.Effects[patterns.Cost].Adjusted.Change == patterns.Down {
		p = append(p, "significantly cheaper")
	}
	if a.Effects[patterns.TravelTime].Adjusted.Change == patterns.Down {
		p = append(p, "significantly quicker")
	}
	return joinPhrases(p)
}

// describeEffect writes one measure before and after, the comparison
// group's change and the adjusted change with its interval and p-value;
// unit converts the values from the unit of the measure to the one shown.
func describeEffect(name string, e patterns.Effect, unit func(float64) float64, level, change, unitName string) string {
	text := fmt.Sprintf("%s %s to %s%s (raw %s), comparison group %s", name,
		fmt.Sprintf(level, unit(e.Before)), fmt.Sprintf(level, unit(e.After)), unitName,
		signed(change, unit(e.Raw)), formatPercentChange(e.Group))
	s := e.Adjusted
	if math.IsNaN(s.P) {
		return text + fmt.Sprintf(", adjusted change not tested (%d days with trips before, %d after)", len(s.Before), len(s.After))
	}
	ci := "too few days for a 95 % interval"
	if !math.IsInf(s.Low, 0) && !math.IsInf(s.High, 0) {
		ci = "95 % CI " + signed(change, unit(s.Low)) + " to " + signed(change, unit(s.High))
	}
	return text + fmt.Sprintf(", adjusted %s (%s, %s; Mann-Whitney p adjusted %s)",
		signed(change, unit(s.Shift)), formatPercentChange(e.Relative), ci, formatP(s.PAdjusted))
}

// formatPercentChange writes a relative change as a signed percentage.
func formatPercentChange(r float64) string {
	switch {
	case math.IsNaN(r):
		return "n/a"
	case math.IsInf(r, 0):
		return "from nothing"
	}
	return signed("%+.0f", 100*r) + " %"
}

// joinPhrases joins "a", "b", "c" as "a, b and c".
func joinPhrases(p []string) string {
	if len(p) <= 1 {
		return strings.Join(p, "")
	}
	return strings.Join(p[:len(p)-1], ", ") + " and " + p[len(p)-1]
}

// signed formats v with a sign format such as "%+.1f", but writes a value
// that rounds to zero without a sign: "0.0", never "-0.0" or "+0.0".
func signed(format string, v float64) string {
	text := fmt.Sprintf(format, v)
	if strings.Trim(text, "+-0.") == "" {
		return strings.TrimLeft(text, "+-")
	}
	return text
}

// formatP writes a p-value to four decimals, "< 0.0001" below that and
// "n/a" for a test that could not be done.
func formatP(p float64) string {
	switch {
	case math.IsNaN(p):
		return "n/a"
	case p < 0.0001:
		return "< 0.0001"
	}
	return fmt.Sprintf("%.4f", p)
}
