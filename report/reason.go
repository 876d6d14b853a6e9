package report

import (
	"fmt"
	"math"
	"strings"

	"narrows/partition/geodesy"
	"narrows/patterns"
)

// Reason writes one plain sentence on an assessment: the grounds of its
// verdict (the changes the decision rule counted), then the figures behind
// them, speeds in km/h as everywhere in the outputs. The workbook's
// Comparison sheet and the page show it beside each verdict.
func Reason(a *patterns.Assessment) string {
	var phrases []string
	switch a.Recurrence {
	case patterns.Down:
		phrases = append(phrases, "recurs on significantly fewer days")
	case patterns.Up:
		phrases = append(phrases, "recurs on significantly more days")
	}
	switch a.Speed.Change {
	case patterns.Up:
		phrases = append(phrases, "is significantly faster")
	case patterns.Down:
		phrases = append(phrases, "is significantly slower")
	}
	switch a.Detour.Change {
	case patterns.Down:
		phrases = append(phrases, "is significantly less circuitous")
	case patterns.Up:
		phrases = append(phrases, "is significantly more circuitous")
	}
	changes := joinPhrases(phrases)
	var lead string
	switch {
	case a.Verdict == patterns.Cleared:
		lead = "No longer a finding: it " + changes
	case a.Verdict == patterns.New:
		lead = "Now a finding: it " + changes
	case a.Verdict == patterns.Worse || a.Verdict == patterns.Eased:
		lead = "It " + changes
	case len(phrases) > 0:
		lead = "Mixed evidence: it " + changes
	case a.InBefore != a.InAfter:
		lead = "It crossed the support threshold, but no change is both significant and material"
	default:
		lead = "No change is both significant and material"
	}
	recurrence := fmt.Sprintf("recurred on %d of %d days before and %d of %d after (Fisher p %s, adjusted %s)",
		a.DaysBefore, a.TotalBefore, a.DaysAfter, a.TotalAfter, formatP(a.FisherP), formatP(a.FisherPAdjusted))
	speed := describeShift("daily speed", a.Speed, geodesy.KMH, "%+.1f", " km/h")
	detour := describeShift("detour ratio", a.Detour, func(ratio float64) float64 { return ratio }, "%+.2f", "")
	return lead + "; " + recurrence + "; " + speed + "; " + detour + "."
}

// joinPhrases joins "a", "b", "c" as "a, b and c".
func joinPhrases(p []string) string {
	if len(p) <= 1 {
		return strings.Join(p, "")
	}
	return strings.Join(p[:len(p)-1], ", ") + " and " + p[len(p)-1]
}

// describeShift writes the shift of one measure with its interval and
// p-values; unit converts the values from the unit of s to the one shown.
func describeShift(name string, s patterns.Shift, unit func(float64) float64, format, unitName string) string {
	if math.IsNaN(s.P) {
		return fmt.Sprintf("%s not tested (%d days with trips before, %d after)", name, len(s.Before), len(s.After))
	}
	ci := "too few days for a 95 % interval"
	if !math.IsInf(s.Low, 0) && !math.IsInf(s.High, 0) {
		ci = "95 % CI " + signed(format, unit(s.Low)) + " to " + signed(format, unit(s.High)) + unitName
	}
	return fmt.Sprintf("%s changed by %s%s (%s; Mann-Whitney p %s, adjusted %s)",
		name, signed(format, unit(s.Shift)), unitName, ci, formatP(s.P), formatP(s.PAdjusted))
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
