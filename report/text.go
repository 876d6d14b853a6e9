package report

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
	"unicode/utf8"

	"narrows/partition"
	"narrows/patterns"
)

// Caution is the cautions in one sentence, for outputs written elsewhere
// (a JSON listing, a console summary).
const Caution = "These are screening results from a sample fleet, which is not all traffic: check each finding against traffic counts and local design standards with a qualified (where required, licensed) engineer before acting on it; small counts are suppressed before publishing."

// Cautions returns the cautions every report states (workbook summary and
// method sheet, HTML page) for a publication threshold (zero means
// DefaultPublicationMinTrips).
func Cautions(publicationMinTrips int) []string {
	v := &view{minTrips: publicationMinTrips}
	if v.minTrips <= 0 {
		v.minTrips = DefaultPublicationMinTrips
	}
	return v.cautions()
}

func (v *view) cautions() []string {
	return []string{
		"The trips come from a sample fleet (taxi, ride-hail, fleet or probe vehicles); it is not all traffic, and its routes, times and speeds may differ from those of other road users.",
		"Findings are screening results: each one points to a place that deserves study. Check it against traffic counts and local design standards; decisions need a qualified (where required, licensed) traffic engineer.",
		fmt.Sprintf("Small counts are suppressed before publishing: counts below %d trips are shown as %q and values computed from them as %q.", v.minTrips, v.countMark(), v.valueMark()),
		"Regions are bounded by major roads and barriers taken from OpenStreetMap; a missing or mistagged road changes the regions.",
	}
}

// verdictMeaning explains a verdict in one line, following the decision
// rule of patterns.Decide.
func verdictMeaning(vd patterns.Verdict) string {
	switch vd {
	case patterns.Cleared:
		return "a weak link of the before period whose cost, against its comparison group, fell by half or more (significantly), or that no longer meets the fixed bar on most days while significantly cheaper or quicker"
	case patterns.Eased:
		return "significantly and materially cheaper or quicker against its comparison group; nothing worse"
	case patterns.Unchanged:
		return "no significant, material change of its own against its comparison group, or mixed evidence"
	case patterns.Worse:
		return "significantly and materially costlier or slower against its comparison group; nothing better"
	case patterns.New:
		return "a weak link of the after period only that is significantly and materially costlier or slower against its comparison group"
	case "":
		return "recurring weak link (no comparison)"
	}
	return "verdict " + strconv.Quote(string(vd))
}

// verdictShort is the legend's few words for a verdict.
func verdictShort(vd patterns.Verdict) string {
	switch vd {
	case patterns.Cleared:
		return "cost halved or bar no longer met"
	case patterns.Eased:
		return "cheaper or quicker"
	case patterns.Unchanged:
		return "no material change"
	case patterns.Worse:
		return "costlier or slower"
	case patterns.New:
		return "new and costlier or slower"
	}
	return ""
}

// verdictLabel is the verdict as shown, "weak link" without comparison.
func verdictLabel(vd patterns.Verdict) string {
	if vd == "" {
		return "weak link"
	}
	return string(vd)
}

// definition is one line of the method sheet.
type definition struct{ Term, Text string }

func (v *view) method() []definition {
	alpha := 0.05
	if v.in.Comparison != nil && v.in.Comparison.Alpha > 0 {
		alpha = v.in.Comparison.Alpha
	}
	d := []definition{
		{"Major roads", "OpenStreetMap highway classes (by default motorway, trunk, primary, secondary; link roads excluded) and optional barriers (railways, rivers, canals, coastline)."},
		{"Region", "A face of the planar partition of the study area by major roads and barriers, after closing small gaps and merging slivers into their neighbour across the longest shared border. Regions tile the study area."},
		{"Trip", "Origin point and time, destination point and time, travel distance (odometer or summed GPS point distances)."},
		{"Speed", "Travel distance / duration, reported in km/h."},
		{"Detour", "Travel distance / great-circle distance from origin to destination (circuity); 1.00 is a straight line."},
		{"Edge", "A directed region pair A>B on one day and time window: trips = count, speed = median speed, detour = median detour."},
		{"Dominance", "Edge e dominates f when e has at least as many trips, no higher speed and no lower detour, and is strictly worse on one of them."},
		{"Candidate", "An edge of a day with at least the minimum trips that no other such edge dominates and that passes the badness gates (detour at least a floor, speed below the day's trip-weighted median); optionally the k-skyband."},
		{"Weak link (finding)", "A connected set of candidate edges (connected through shared regions, direction ignored) present together on at least the support share of the analysed days; only closed sets are reported."},
		{"Recurrence share", "Days on which the finding recurred / analysed days."},
		{"Trips per day", "Median over the finding's days of the edge's daily trips; for a finding, the sum over its edges."},
		{"Finding speed and detour", "Mean of its edges' median speed (detour) weighted by their median trips per day."},
		{"Extra km per day", "Median over the finding's days of travel distance minus straight-line distance, summed over trips."},
		{"Extra vehicle-hours per day", "Median over the finding's days of vehicle-hours beyond those needed at the reference speed over the straight-line distance."},
		{"Rank", "Findings ordered by cost (extra vehicle-hours), 1 = highest."},
		{"Cost", "Extra vehicle-hours per day (veh-h/day); extra vehicle-km per day is veh-km/day. The same words are used in the terminal, this workbook, the HTML page, the GeoJSON keys (extra_vehicle_hours_per_day, extra_vehicle_km_per_day) and the README."},
		{"Edge id", "A directed region pair is written A>B; a finding's id joins its edges with +, as in 18>24+24>18."},
		{"CI", "95 % confidence interval, written (low to high)."},
		{"Cautions", "The cautions of the Summary sheet and the HTML page; the Reason column explains each verdict."},
	}
	if v.comparing() {
		d = append(d, v.comparisonMethod(alpha)...)
		for _, vd := range verdictOrder {
			d = append(d, definition{"Verdict: " + string(vd), verdictMeaning(vd) + "."})
		}
	}
	d = append(d, v.exclusionMethod()...)
	d = append(d,
		definition{"Suppression", fmt.Sprintf("Cells from fewer than %d trips are shown as %q (counts) or %q (values) in grey. Charts skip them.", v.minTrips, v.countMark(), v.valueMark())},
		definition{"Units", "Speeds in km/h, distances in km, times in hours or minutes, areas in km²; days are local calendar days of the study's time zone."},
		definition{"Map data", "Regions derived from OpenStreetMap data, (c) OpenStreetMap contributors, available under the Open Database License (ODbL)."},
	)
	for _, s := range v.in.Inputs {
		d = append(d, definition{"Source file", s.Path + " (SHA-256 " + s.SHA256 + ")"})
	}
	return d
}

// Headline summarises the study in one sentence: in a comparison the
// costliest weak link of the before period by name, its verdict and its
// cost before and after, then the verdicts of the others, such as
// "Across the Orvel between Northbank housing and Southbank works, the
// costliest weak link before, cleared: from 43.2 to 11.7 extra
// vehicle-hours per day (comparison group -9 %; adjusted change -31.3, 95 %
// CI -34.5 to -28.5); of the 5 others, 1
// cleared, 2 eased and 2 unchanged." Each finding's figures are in
// SummaryRows, the network's change in NetworkChange. It returns a note
// when the input has neither a scan nor a comparison.
func Headline(in Input) string {
	switch {
	case in.Comparison != nil && in.Comparison.Before != nil && in.Comparison.After != nil:
		return comparisonHeadline(in.Comparison, in.Regions)
	case in.Scan != nil:
		return scanHeadline(in.Scan, in.Regions)
	}
	return "No scan or comparison to report."
}

// NetworkChange states the change over the whole network in one sentence
// ("" without a comparison).
func NetworkChange(in Input) string {
	if in.Comparison == nil {
		return ""
	}
	return networkSentence(in.Comparison.Network)
}

func comparisonHeadline(c *patterns.Comparison, regions *partition.Partition) string {
	lead := costliestBefore(c)
	others := map[patterns.Verdict]int{}
	n := 0
	for i := range c.Assessments {
		if a := &c.Assessments[i]; a != lead {
			others[a.Verdict]++
			n++
		}
	}
	if lead == nil {
		if n == 0 {
			return fmt.Sprintf("No weak link recurred in the before period (%s) or in the after period (%s).", dayRange(c.Before), dayRange(c.After))
		}
		if n == 1 {
			return fmt.Sprintf("No weak link recurred in the before period (%s); the one weak link of the after period is %s.", dayRange(c.Before), verdictList(others)[2:])
		}
		return fmt.Sprintf("No weak link recurred in the before period (%s); of the %d weak links of the after period, %s.", dayRange(c.Before), n, verdictList(others))
	}
	cost := lead.Effects[patterns.Cost]
	s := fmt.Sprintf("%s, the costliest weak link before, %s: from %s to %s extra vehicle-hours per day (%s)",
		upperFirst(PlaceName(lead.Finding, regions)), lead.Verdict, fmtFixed(cost.Before, 1), fmtFixed(cost.After, 1), adjustedPhrase(lead))
	if n == 0 {
		return s + "; no other weak link recurred."
	}
	if n == 1 {
		return s + "; the other is " + verdictList(others)[2:] + "."
	}
	return fmt.Sprintf("%s; of the %d others, %s.", s, n, verdictList(others))
}

// adjustedPhrase gives a finding's cost change beyond the network's: its
// comparison group's change, then the adjusted change with its 95 %
// interval, as in "comparison group -9 %; adjusted change -31.3, 95 % CI
// -34.5 to -28.5".
func adjustedPhrase(a *patterns.Assessment) string {
	cost := a.Effects[patterns.Cost]
	group := "no comparison group"
	if len(a.Group.Edges) > 0 {
		group = "comparison group " + formatPercentChange(cost.Group)
	}
	s := group + "; adjusted change " + signed("%+.1f", cost.Adjusted.Shift)
	if finite(cost.Adjusted.Low) && finite(cost.Adjusted.High) {
		s += ", 95 % CI " + signed("%+.1f", cost.Adjusted.Low) + " to " + signed("%+.1f", cost.Adjusted.High)
	}
	return s
}

// verdictList names the counts of the verdicts present in severity order:
// "1 cleared, 2 eased and 2 unchanged".
func verdictList(counts map[patterns.Verdict]int) string {
	var parts []string
	for _, vd := range verdictOrder {
		if counts[vd] > 0 {
			parts = append(parts, strconv.Itoa(counts[vd])+" "+string(vd))
		}
	}
	for vd, k := range counts { // verdicts outside the known set, sorted below
		if !knownVerdict(vd) && k > 0 {
			parts = append(parts, strconv.Itoa(k)+" "+string(vd))
		}
	}
	slices.Sort(parts[min(len(parts), countKnown(counts)):])
	switch len(parts) {
	case 0:
		return "none"
	case 1:
		return parts[0]
	}
	return strings.Join(parts[:len(parts)-1], ", ") + " and " + parts[len(parts)-1]
}

func countKnown(counts map[patterns.Verdict]int) int {
	n := 0
	for _, vd := range verdictOrder {
		if counts[vd] > 0 {
			n++
		}
	}
	return n
}

// upperFirst capitalises the first letter of s.
func upperFirst(s string) string {
	for i, r := range s {
		return strings.ToUpper(string(r)) + s[i+utf8.RuneLen(r):]
	}
	return s
}

// levelWithCI writes a daily median with its 95 % interval: "43.2 (41.0 to
// 45.1)"; without an interval the median alone.
func levelWithCI(v, low, high float64) string {
	if !finite(low) || !finite(high) {
		return fmtFixed(v, 1)
	}
	return fmt.Sprintf("%s (%s to %s)", fmtFixed(v, 1), fmtFixed(low, 1), fmtFixed(high, 1))
}

// networkSentence states the change over the whole network.
func networkSentence(n patterns.NetworkChange) string {
	return fmt.Sprintf("Across the network, trips per day changed by %s, travel time per trip by %s and speed by %s; the verdicts allow for such changes through each weak link's comparison group.",
		formatPercentChange(n.Trips.Relative), formatPercentChange(n.TravelTime.Relative), formatPercentChange(n.Speed.Relative))
}

func scanHeadline(s *patterns.Scan, regions *partition.Partition) string {
	share := formatPercent(support(s))
	n := len(s.Findings)
	if n == 0 {
		return fmt.Sprintf("No weak link recurred on at least %s of the %d analysed days (%s).", share, len(s.Days), dayRange(s))
	}
	top := s.Findings[0]
	for _, f := range s.Findings {
		if f.Rank < top.Rank {
			top = f
		}
	}
	if n == 1 {
		return fmt.Sprintf("One weak link recurred on at least %s of the %d analysed days (%s): %s (%s), with %s extra vehicle-km and %s extra vehicle-hours per day.",
			share, len(s.Days), dayRange(s), PlaceName(top, regions), top.ID,
			strconv.FormatFloat(roundTo(top.ExtraKMPerDay, 0), 'f', -1, 64), strconv.FormatFloat(roundTo(top.ExtraHoursPerDay, 1), 'f', -1, 64))
	}
	return fmt.Sprintf("The costliest of %d %s recurring on at least %s of the %d analysed days (%s) is %s (%s), with %s extra vehicle-km and %s extra vehicle-hours per day.",
		n, plural(n, "weak link", "weak links"), share, len(s.Days), dayRange(s), PlaceName(top, regions), top.ID,
		strconv.FormatFloat(roundTo(top.ExtraKMPerDay, 0), 'f', -1, 64), strconv.FormatFloat(roundTo(top.ExtraHoursPerDay, 1), 'f', -1, 64))
}

func plural(n int, one, many string) string {
	if n == 1 {
		return one
	}
	return many
}

func formatPercent(share float64) string {
	return strconv.FormatFloat(roundTo(share*100, 1), 'f', -1, 64) + " %"
}

// roundTo rounds x to d decimals; non-finite values pass through.
func roundTo(x float64, d int) float64 {
	if !finite(x) {
		return x
	}
	p := math.Pow(10, float64(d))
	r := math.Round(x*p) / p
	if r == 0 {
		return 0 // no negative zero in outputs
	}
	return r
}

// mapCaption says how to read the map, in the workbook and on the page.
func (v *view) mapCaption() string {
	s := "Regions bounded by major roads are grey, numbered by region id"
	if len(v.focus) > 0 {
		s += "; the focus area is yellow"
	}
	s += ". Each weak link edge is an arrow from its origin region to its destination region, drawn a little to the right of travel so that both directions show."
	if v.comparing() {
		s += " Arrows are coloured by verdict as in the verdict table; dashed: cleared, dotted: new."
	}
	if _, ok := v.in.Appraisal.best(); ok {
		s += " The black line dashed white is the " + v.in.Appraisal.bestLabel() + " of weak link " + v.in.Appraisal.FindingID + ", not a built road."
	}
	return s
}

// timelineTitle is the title of the daily timeline chart, which names the
// periods because the chart draws them as one run of days.
func (v *view) timelineTitle() string {
	s := "Candidates and weak links per day"
	if v.comparing() {
		b, a := v.periods[0].Scan, v.periods[1].Scan
		s += " (before: " + dayRange(b) + "; after: " + dayRange(a)
		if day, _ := v.openingMark(); day != "" {
			s += "; the scheme opened on " + day
		}
		s += ")"
	}
	return s
}
