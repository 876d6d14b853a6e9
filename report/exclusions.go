package report

import (
	"strconv"

	"narrows/patterns"
)

// The planner's exclusions in words: what the analysis left out and why.
// A reader of the report must see every day and pair taken out, since
// each one changes what is found.

// exclusionMethod defines exclusion and lists each exclusion with its
// reason for the Method sheet (nothing without exclusions).
func (v *view) exclusionMethod() []definition {
	x := v.in.Exclusions
	if len(x.Days)+len(x.Pairs) == 0 {
		return nil
	}
	d := []definition{{"Exclusion", "A day range or a region pair (or a whole region) that the planner left out, with a reason, because it does not describe the road network's everyday state (works, an event, a data outage; a ferry, known works, a data problem). Excluded days are not analysed. An excluded pair's trips are taken out of the day graphs before the skyline, in both directions, so that the pair neither shows as a weak link nor hides another pair; the trip counts of the Data quality sheet still include them."}}
	for _, e := range x.Days {
		d = append(d, definition{"Excluded " + dayLabel(e), e.Reason})
	}
	for _, e := range x.Pairs {
		d = append(d, definition{"Excluded " + pairLabel(e), e.Reason})
	}
	return d
}

// exclusionRows lists the exclusions for the Data quality sheet: item,
// reason, note.
func exclusionRows(x patterns.Exclusions) [][3]string {
	var out [][3]string
	for _, e := range x.Days {
		out = append(out, [3]string{"Excluded " + dayLabel(e), e.Reason, "left out by the planner: not analysed"})
	}
	for _, e := range x.Pairs {
		out = append(out, [3]string{"Excluded " + pairLabel(e), e.Reason, "left out by the planner: its trips are not analysed (the counts above include them)"})
	}
	return out
}

func dayLabel(e patterns.DayExclusion) string {
	if e.To == "" || e.To == e.From {
		return "day " + e.From
	}
	return "days " + e.From + " to " + e.To
}

func pairLabel(e patterns.PairExclusion) string {
	if e.B == 0 {
		return "region " + strconv.Itoa(e.A) + " (every pair)"
	}
	return "region pair " + strconv.Itoa(e.A) + "-" + strconv.Itoa(e.B) + " (both directions)"
}
