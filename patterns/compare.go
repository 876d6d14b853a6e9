package patterns

import (
	"context"
	"fmt"
	"math"
	"sort"
	"strings"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/planar"

	"narrows/partition"
	"narrows/patterns/stats"
	"narrows/regiongraph"
)

// earthRadiusMetres is the mean Earth radius (IUGG R1) used for local
// projections around a focus point.
const earthRadiusMetres = 6371008.8

// Focus marks the findings around a scheme (a new link road, a bridge) so
// that a report can give them their own section. A finding is in focus when
// any of its regions is listed in Regions, or when Point is set and any of
// its regions' polygons comes within RadiusMetres of Point (a region
// containing Point is at distance 0, so RadiusMetres 0 selects the region the
// point lies in).
type Focus struct {
	Regions      []int
	Point        *orb.Point // WGS84 longitude, latitude
	RadiusMetres float64
}

// CompareOptions sets the decision rule of Compare. The zero value is not the
// default; use DefaultCompareOptions.
type CompareOptions struct {
	// Alpha is the significance level applied to Benjamini-Hochberg adjusted
	// p-values (default 0.05).
	Alpha float64
	// Focus, when not nil, marks the findings around a scheme.
	Focus *Focus
	// MinShiftSpeed is the smallest change of daily speed, in m/s, that
	// counts as material (default 1 km/h): a significant shift smaller than
	// this is treated as no change.
	MinShiftSpeed float64
	// MinShiftDetour is the smallest change of the daily detour ratio that
	// counts as material (default 0.05).
	MinShiftDetour float64
	// MinDayTrips leaves out of a finding's daily speed and detour series the
	// days with fewer trips than this on the finding's edges together
	// (default 1: every analysed day with trips).
	MinDayTrips int
}

// DefaultCompareOptions returns the documented defaults.
func DefaultCompareOptions() CompareOptions {
	return CompareOptions{
		Alpha:          0.05,
		MinShiftSpeed:  1 / 3.6,
		MinShiftDetour: 0.05,
		MinDayTrips:    1,
	}
}

func (o CompareOptions) validate(regions *partition.Partition) error {
	if !(o.Alpha > 0 && o.Alpha < 1) {
		return fmt.Errorf("compare: alpha %v must lie strictly between 0 and 1", o.Alpha)
	}
	if !(o.MinShiftSpeed >= 0) || math.IsInf(o.MinShiftSpeed, 0) {
		return fmt.Errorf("compare: minimum speed shift %v m/s must be a finite number ≥ 0", o.MinShiftSpeed)
	}
	if !(o.MinShiftDetour >= 0) || math.IsInf(o.MinShiftDetour, 0) {
		return fmt.Errorf("compare: minimum detour shift %v must be a finite number ≥ 0", o.MinShiftDetour)
	}
	if o.MinDayTrips < 0 {
		return fmt.Errorf("compare: minimum trips per day %d must be ≥ 0", o.MinDayTrips)
	}
	f := o.Focus
	if f == nil {
		return nil
	}
	if f.Point != nil {
		if regions == nil {
			return fmt.Errorf("compare: a focus point needs the regions' polygons, but no partition was given")
		}
		lon, lat := f.Point.Lon(), f.Point.Lat()
		if !(lon >= -180 && lon <= 180 && lat >= -90 && lat <= 90) {
			return fmt.Errorf("compare: focus point (%v, %v) is not a WGS84 longitude, latitude", lon, lat)
		}
		if !(f.RadiusMetres >= 0) || math.IsInf(f.RadiusMetres, 0) {
			return fmt.Errorf("compare: focus radius %v m must be a finite number ≥ 0", f.RadiusMetres)
		}
	}
	if regions != nil {
		known := regionIDs(regions)
		for _, id := range f.Regions {
			if !known[id] {
				return fmt.Errorf("compare: focus region %d is not among the %d regions of %q", id, len(regions.Regions), regions.Source)
			}
		}
	}
	return nil
}

func regionIDs(p *partition.Partition) map[int]bool {
	ids := make(map[int]bool, len(p.Regions))
	for _, r := range p.Regions {
		ids[r.ID] = true
	}
	return ids
}

// Compare scans two periods of the same store (and so the same regions) and
// gives every finding of either period a verdict with its evidence.
//
// For each finding (the union of both scans' findings by ID; the Finding
// recorded is the before one when it exists):
//
//   - Recurrence: the days of each period on which all the finding's edges
//     were candidates together (from Scan.DayCandidates, so it is counted
//     even in a period where the group is not a finding), compared with a
//     two-sided Fisher exact test of [[days before, other days before],
//     [days after, other days after]].
//   - Daily series: for every analysed day of a period on which the
//     finding's edges carried at least MinDayTrips trips together, the
//     trip-weighted mean over the edges with trips that day of their median
//     speed, and likewise of their median detour ratio. Days on which only
//     some edges had trips count, so that a group whose traffic moves to a
//     new road keeps a series. The values come from the store itself, since
//     an edge need not be a candidate in either period.
//   - Shift: a two-sided Mann-Whitney U test (stats.Auto) of after against
//     before and the Hodges-Lehmann shift, after minus before, with its
//     95 % confidence interval. A period without a day in the series gives
//     NaN for P, PAdjusted, Shift, Low and High.
//
// p-values are adjusted with Benjamini-Hochberg in three families, each
// across all findings: the Fisher tests, the speed tests and the detour
// tests.
//
// Decision rule. With α = opts.Alpha, a change is significant when its
// adjusted p-value is below α, and a speed or detour change is material when
// also its Hodges-Lehmann shift is at least MinShiftSpeed or MinShiftDetour
// in size. Improvements are: significantly lower recurrence share, material
// speed increase, material detour decrease; deteriorations are the
// opposites. Then, in order:
//
//  1. both improvements and deteriorations: Unchanged (mixed evidence);
//  2. a finding before but not after, recurring significantly less: Cleared;
//  3. a finding after but not before, recurring significantly more: New;
//  4. any deterioration: Worse;
//  5. any improvement: Eased;
//  6. otherwise Unchanged (this includes a group that crossed the support
//     threshold without a significant change in recurrence).
//
// Assessments are ordered by verdict, most urgent first: worse, new,
// unchanged, eased, cleared; then by Finding.Rank and ID. Counts holds all
// five verdicts, zero or not.
//
// regions is used for the focus (and may be nil when Focus has no Point);
// when given, every region of every finding must be in it, which catches a
// partition that does not belong to the store. It returns an error if a
// scan fails, a period has no analysed days, the two scans use different
// time windows, or the options are invalid.
func Compare(ctx context.Context, store *regiongraph.Store, regions *partition.Partition, before, after ScanOptions, opts CompareOptions) (*Comparison, error) {
	if store == nil {
		return nil, fmt.Errorf("compare: no day-graph store")
	}
	if err := opts.validate(regions); err != nil {
		return nil, err
	}
	sb, err := ScanStore(ctx, store, before)
	if err != nil {
		return nil, fmt.Errorf("compare: before period: %w", err)
	}
	sa, err := ScanStore(ctx, store, after)
	if err != nil {
		return nil, fmt.Errorf("compare: after period: %w", err)
	}
	for _, p := range []struct {
		name string
		scan *Scan
		opts ScanOptions
	}{{"before", sb, before}, {"after", sa, after}} {
		if len(p.scan.Days) == 0 {
			return nil, fmt.Errorf("compare: the %s period (%s to %s, %s days, window %q) has no analysed days in the store",
				p.name, orOpen(p.opts.From), orOpen(p.opts.To), orAll(p.opts.Days), p.scan.Window)
		}
	}
	if sb.Window != sa.Window {
		return nil, fmt.Errorf("compare: the periods use different time windows (%q before, %q after)", sb.Window, sa.Window)
	}

	union := unionFindings(sb.Findings, sa.Findings)
	if regions != nil {
		known := regionIDs(regions)
		for _, u := range union {
			for _, id := range u.finding.Regions {
				if !known[id] {
					return nil, fmt.Errorf("compare: finding %s refers to region %d, which is not among the %d regions of %q; is the partition the one the store was built from?",
						u.finding.ID, id, len(regions.Regions), regions.Source)
				}
			}
		}
	}
	var needed []EdgeKey
	for _, u := range union {
		needed = append(needed, findingKeys(u.finding)...)
	}
	valuesBefore := edgeDayValues(store, sb, needed)
	valuesAfter := edgeDayValues(store, sa, needed)
	if err := ctx.Err(); err != nil {
		return nil, err
	}

	assessments := make([]Assessment, len(union))
	for i, u := range union {
		keys := findingKeys(u.finding)
		a := Assessment{
			Finding:     u.finding,
			InBefore:    u.inBefore,
			InAfter:     u.inAfter,
			DaysBefore:  recurrenceDays(sb, keys),
			TotalBefore: len(sb.Days),
			DaysAfter:   recurrenceDays(sa, keys),
			TotalAfter:  len(sa.Days),
		}
		a.FisherP, _ = stats.FisherExact([2][2]int{
			{a.DaysBefore, a.TotalBefore - a.DaysBefore},
			{a.DaysAfter, a.TotalAfter - a.DaysAfter},
		})
		speedBefore, detourBefore := dailySeries(valuesBefore, sb.Days, keys, opts.MinDayTrips)
		speedAfter, detourAfter := dailySeries(valuesAfter, sa.Days, keys, opts.MinDayTrips)
		a.Speed = shiftTest(speedBefore, speedAfter)
		a.Detour = shiftTest(detourBefore, detourAfter)
		a.Focus = inFocus(u.finding, opts.Focus, regions)
		assessments[i] = a
		if i%64 == 0 {
			if err := ctx.Err(); err != nil {
				return nil, err
			}
		}
	}

	adjust(assessments, func(a *Assessment) (*float64, *float64) { return &a.FisherP, &a.FisherPAdjusted })
	adjust(assessments, func(a *Assessment) (*float64, *float64) { return &a.Speed.P, &a.Speed.PAdjusted })
	adjust(assessments, func(a *Assessment) (*float64, *float64) { return &a.Detour.P, &a.Detour.PAdjusted })

	counts := map[Verdict]int{Worse: 0, New: 0, Unchanged: 0, Eased: 0, Cleared: 0}
	for i := range assessments {
		a := &assessments[i]
		e := evidenceOf(a)
		var signals []signal
		a.Verdict, signals = decide(e, opts)
		a.Reason = reason(a, signals)
		counts[a.Verdict]++
	}
	sort.SliceStable(assessments, func(i, j int) bool {
		si, sj := severity(assessments[i].Verdict), severity(assessments[j].Verdict)
		if si != sj {
			return si < sj
		}
		if ri, rj := assessments[i].Finding.Rank, assessments[j].Finding.Rank; ri != rj {
			return ri < rj
		}
		return assessments[i].Finding.ID < assessments[j].Finding.ID
	})
	return &Comparison{Before: sb, After: sa, Assessments: assessments, Counts: counts, Alpha: opts.Alpha}, nil
}

func orOpen(day string) string {
	if day == "" {
		return "open"
	}
	return day
}

func orAll(d DaySelector) DaySelector {
	if d == "" {
		return AllDays
	}
	return d
}

type unionEntry struct {
	finding           Finding
	inBefore, inAfter bool
}

// unionFindings merges the findings of both periods by ID, sorted by ID.
func unionFindings(before, after []Finding) []unionEntry {
	byID := make(map[string]*unionEntry, len(before)+len(after))
	var ids []string
	for _, f := range before {
		if _, ok := byID[f.ID]; ok {
			continue
		}
		byID[f.ID] = &unionEntry{finding: f, inBefore: true}
		ids = append(ids, f.ID)
	}
	for _, f := range after {
		if u, ok := byID[f.ID]; ok {
			u.inAfter = true
			continue
		}
		byID[f.ID] = &unionEntry{finding: f, inAfter: true}
		ids = append(ids, f.ID)
	}
	sort.Strings(ids)
	out := make([]unionEntry, len(ids))
	for i, id := range ids {
		out[i] = *byID[id]
	}
	return out
}

func findingKeys(f Finding) []EdgeKey {
	keys := make([]EdgeKey, len(f.Edges))
	for i, e := range f.Edges {
		keys[i] = EdgeKey{From: e.From, To: e.To}
	}
	return keys
}

// recurrenceDays counts the analysed days of s on which every key was a
// candidate. An empty key set recurs on no day.
func recurrenceDays(s *Scan, keys []EdgeKey) int {
	if len(keys) == 0 {
		return 0
	}
	n := 0
	for _, cands := range s.DayCandidates {
		all := true
		for _, k := range keys {
			if !containsKey(cands, k) {
				all = false
				break
			}
		}
		if all {
			n++
		}
	}
	return n
}

// containsKey reports whether k is in cands, which is sorted by From, To.
func containsKey(cands []EdgeKey, k EdgeKey) bool {
	i := sort.Search(len(cands), func(i int) bool {
		c := cands[i]
		return c.From > k.From || (c.From == k.From && c.To >= k.To)
	})
	return i < len(cands) && cands[i] == k
}

// edgeValue is one edge's trips and medians on one day.
type edgeValue struct {
	trips         int
	speed, detour float64
}

// edgeDayValues reads from the store the values of the given edges on the
// analysed days of s, in its time window: result[key][dayIndex].
func edgeDayValues(store *regiongraph.Store, s *Scan, keys []EdgeKey) map[EdgeKey]map[int]edgeValue {
	dayIndex := make(map[string]int, len(s.Days))
	for i, d := range s.Days {
		dayIndex[d] = i
	}
	wanted := make(map[EdgeKey]bool, len(keys))
	for _, k := range keys {
		wanted[k] = true
	}
	out := make(map[EdgeKey]map[int]edgeValue, len(keys))
	for _, e := range store.Edges {
		if e.Window != s.Window || e.Trips <= 0 {
			continue
		}
		k := EdgeKey{From: e.From, To: e.To}
		if !wanted[k] {
			continue
		}
		d, ok := dayIndex[e.Day]
		if !ok {
			continue
		}
		if math.IsNaN(e.SpeedMedian) || math.IsNaN(e.DetourMedian) {
			continue
		}
		m := out[k]
		if m == nil {
			m = make(map[int]edgeValue)
			out[k] = m
		}
		m[d] = edgeValue{trips: e.Trips, speed: e.SpeedMedian, detour: e.DetourMedian}
	}
	return out
}

// dailySeries returns, for each day (in order) on which keys carried at
// least minTrips trips together, the trip-weighted means of the edges'
// median speeds and median detours.
func dailySeries(values map[EdgeKey]map[int]edgeValue, days []string, keys []EdgeKey, minTrips int) (speed, detour []float64) {
	for d := range days {
		var trips, speedSum, detourSum float64
		for _, k := range keys {
			v, ok := values[k][d]
			if !ok {
				continue
			}
			w := float64(v.trips)
			trips += w
			speedSum += w * v.speed
			detourSum += w * v.detour
		}
		if trips == 0 || trips < float64(minTrips) {
			continue
		}
		speed = append(speed, speedSum/trips)
		detour = append(detour, detourSum/trips)
	}
	return speed, detour
}

// shiftTest compares after with before. Without data in a period every
// figure is NaN.
func shiftTest(before, after []float64) Shift {
	s := Shift{Before: before, After: after}
	r, err := stats.MannWhitneyU(after, before, stats.Auto)
	if err != nil {
		nan := math.NaN()
		s.U, s.P, s.PAdjusted, s.Shift, s.Low, s.High = nan, nan, nan, nan, nan, nan
		return s
	}
	s.U, s.P = r.U, r.P
	s.Shift = stats.HodgesLehmann(after, before)
	s.Low, s.High = stats.HodgesLehmannCI(after, before, 0.95)
	return s
}

// adjust applies Benjamini-Hochberg to one family of p-values across the
// assessments; field returns pointers to the raw and the adjusted value.
func adjust(as []Assessment, field func(*Assessment) (raw, adjusted *float64)) {
	p := make([]float64, len(as))
	for i := range as {
		raw, _ := field(&as[i])
		p[i] = *raw
	}
	for i, q := range stats.BenjaminiHochberg(p) {
		_, adj := field(&as[i])
		*adj = q
	}
}

// evidence is what the decision rule looks at.
type evidence struct {
	InBefore, InAfter       bool
	ShareBefore, ShareAfter float64
	FisherPAdjusted         float64
	SpeedShift, SpeedPAdj   float64 // m/s, after − before
	DetourShift, DetourPAdj float64
}

func evidenceOf(a *Assessment) evidence {
	return evidence{
		InBefore:        a.InBefore,
		InAfter:         a.InAfter,
		ShareBefore:     share(a.DaysBefore, a.TotalBefore),
		ShareAfter:      share(a.DaysAfter, a.TotalAfter),
		FisherPAdjusted: a.FisherPAdjusted,
		SpeedShift:      a.Speed.Shift,
		SpeedPAdj:       a.Speed.PAdjusted,
		DetourShift:     a.Detour.Shift,
		DetourPAdj:      a.Detour.PAdjusted,
	}
}

func share(days, total int) float64 {
	if total == 0 {
		return 0
	}
	return float64(days) / float64(total)
}

// signal is one significant, material change found by decide.
type signal int

const (
	recursLess signal = iota
	recursMore
	faster
	slower
	lessCircuitous
	moreCircuitous
)

func (s signal) improvement() bool { return s == recursLess || s == faster || s == lessCircuitous }

func (s signal) phrase() string {
	switch s {
	case recursLess:
		return "recurs on significantly fewer days"
	case recursMore:
		return "recurs on significantly more days"
	case faster:
		return "is significantly faster"
	case slower:
		return "is significantly slower"
	case lessCircuitous:
		return "is significantly less circuitous"
	case moreCircuitous:
		return "is significantly more circuitous"
	}
	return "changed"
}

// decide applies the decision rule documented at Compare. NaN p-values
// (tests that could not be done) are never significant. It returns the
// verdict and the significant, material changes behind it.
func decide(e evidence, opts CompareOptions) (Verdict, []signal) {
	significant := func(p float64) bool { return p < opts.Alpha } // false for NaN
	var signals []signal
	if significant(e.FisherPAdjusted) {
		switch {
		case e.ShareAfter < e.ShareBefore:
			signals = append(signals, recursLess)
		case e.ShareAfter > e.ShareBefore:
			signals = append(signals, recursMore)
		}
	}
	if significant(e.SpeedPAdj) {
		switch {
		case e.SpeedShift >= opts.MinShiftSpeed && e.SpeedShift > 0:
			signals = append(signals, faster)
		case e.SpeedShift <= -opts.MinShiftSpeed && e.SpeedShift < 0:
			signals = append(signals, slower)
		}
	}
	if significant(e.DetourPAdj) {
		switch {
		case e.DetourShift <= -opts.MinShiftDetour && e.DetourShift < 0:
			signals = append(signals, lessCircuitous)
		case e.DetourShift >= opts.MinShiftDetour && e.DetourShift > 0:
			signals = append(signals, moreCircuitous)
		}
	}
	var better, worse bool
	for _, s := range signals {
		if s.improvement() {
			better = true
		} else {
			worse = true
		}
	}
	has := func(want signal) bool {
		for _, s := range signals {
			if s == want {
				return true
			}
		}
		return false
	}
	switch {
	case better && worse:
		return Unchanged, signals
	case e.InBefore && !e.InAfter && has(recursLess):
		return Cleared, signals
	case e.InAfter && !e.InBefore && has(recursMore):
		return New, signals
	case worse:
		return Worse, signals
	case better:
		return Eased, signals
	}
	return Unchanged, signals
}

// severity orders verdicts for the report, most urgent first.
func severity(v Verdict) int {
	switch v {
	case Worse:
		return 0
	case New:
		return 1
	case Unchanged:
		return 2
	case Eased:
		return 3
	case Cleared:
		return 4
	}
	return 5
}

// reason writes one plain sentence: the verdict's grounds, then the figures
// (speeds in km/h, as reported).
func reason(a *Assessment, signals []signal) string {
	phrases := make([]string, len(signals))
	for i, s := range signals {
		phrases[i] = s.phrase()
	}
	changes := joinPhrases(phrases)
	var lead string
	switch {
	case a.Verdict == Cleared:
		lead = "No longer a finding: it " + changes
	case a.Verdict == New:
		lead = "Now a finding: it " + changes
	case a.Verdict == Worse || a.Verdict == Eased:
		lead = "It " + changes
	case len(signals) > 0:
		lead = "Mixed evidence: it " + changes
	case a.InBefore != a.InAfter:
		lead = "It crossed the support threshold, but no change is both significant and material"
	default:
		lead = "No change is both significant and material"
	}
	recurrence := fmt.Sprintf("recurred on %d of %d days before and %d of %d after (Fisher p %s, adjusted %s)",
		a.DaysBefore, a.TotalBefore, a.DaysAfter, a.TotalAfter, formatP(a.FisherP), formatP(a.FisherPAdjusted))
	speed := describeShift("daily speed", a.Speed, 3.6, "%+.1f", " km/h")
	detour := describeShift("detour ratio", a.Detour, 1, "%+.2f", "")
	return lead + "; " + recurrence + "; " + speed + "; " + detour + "."
}

// joinPhrases joins "a", "b", "c" as "a, b and c".
func joinPhrases(p []string) string {
	if len(p) <= 1 {
		return strings.Join(p, "")
	}
	return strings.Join(p[:len(p)-1], ", ") + " and " + p[len(p)-1]
}

func describeShift(name string, s Shift, scale float64, format, unit string) string {
	if math.IsNaN(s.P) {
		return fmt.Sprintf("%s not tested (%d days with trips before, %d after)", name, len(s.Before), len(s.After))
	}
	ci := "too few days for a 95 % interval"
	if !math.IsInf(s.Low, 0) && !math.IsInf(s.High, 0) {
		ci = "95 % CI " + signed(format, s.Low*scale) + " to " + signed(format, s.High*scale) + unit
	}
	return fmt.Sprintf("%s changed by %s%s (%s; Mann-Whitney p %s, adjusted %s)",
		name, signed(format, s.Shift*scale), unit, ci, formatP(s.P), formatP(s.PAdjusted))
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

func formatP(p float64) string {
	switch {
	case math.IsNaN(p):
		return "n/a"
	case p < 0.0001:
		return "< 0.0001"
	}
	return fmt.Sprintf("%.4f", p)
}

// inFocus reports whether the finding lies in the focus area.
func inFocus(f Finding, focus *Focus, regions *partition.Partition) bool {
	if focus == nil {
		return false
	}
	for _, id := range f.Regions {
		for _, want := range focus.Regions {
			if id == want {
				return true
			}
		}
	}
	if focus.Point == nil || regions == nil {
		return false
	}
	byID := make(map[int]*partition.Region, len(regions.Regions))
	for i := range regions.Regions {
		byID[regions.Regions[i].ID] = &regions.Regions[i]
	}
	for _, id := range f.Regions {
		if r := byID[id]; r != nil && regionDistance(r, *focus.Point) <= focus.RadiusMetres {
			return true
		}
	}
	return false
}

// regionDistance returns the distance in metres from p to the region's
// polygon (0 inside it), measured in a local equirectangular projection
// centred on p. Within the tens of kilometres a focus radius spans, that
// projection distorts distances by well under 1 % (common practice for
// city-scale work). A region without a polygon is measured to its
// representative point.
func regionDistance(r *partition.Region, p orb.Point) float64 {
	lat0 := p.Lat() * math.Pi / 180
	project := func(q orb.Point) orb.Point {
		dlon := q.Lon() - p.Lon()
		// Take the short way round the antimeridian.
		if dlon > 180 {
			dlon -= 360
		} else if dlon < -180 {
			dlon += 360
		}
		return orb.Point{
			earthRadiusMetres * math.Cos(lat0) * dlon * math.Pi / 180,
			earthRadiusMetres * (q.Lat() - p.Lat()) * math.Pi / 180,
		}
	}
	origin := orb.Point{0, 0}
	if len(r.Polygon) == 0 || len(r.Polygon[0]) == 0 {
		return planar.Distance(project(r.Point), origin)
	}
	poly := make(orb.Polygon, len(r.Polygon))
	for i, ring := range r.Polygon {
		pr := make(orb.Ring, len(ring))
		for j, q := range ring {
			pr[j] = project(q)
		}
		poly[i] = pr
	}
	if planar.PolygonContains(poly, origin) {
		return 0
	}
	return planar.DistanceFrom(poly, origin)
}
