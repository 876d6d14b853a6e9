package patterns

import (
	"context"
	"fmt"
	"math"
	"sort"

	"narrows/partition"
	"narrows/partition/geodesy"
	"narrows/regiongraph"
)

// CompareOptions sets the decision rule of Compare. The zero value is not the
// default; use DefaultCompareOptions. The toml tags are the keys of a study
// file's [compare] table.
type CompareOptions struct {
	// Alpha is the significance level applied to Benjamini-Hochberg adjusted
	// p-values (default 0.05).
	Alpha float64 `toml:"alpha"`
	// Focus, when not nil, marks the findings around a scheme.
	Focus *Focus `toml:"-"`
	// MinShiftSpeed is the smallest change of daily speed, in m/s, that
	// counts as material (default 1 km/h): a significant shift smaller than
	// this is treated as no change.
	MinShiftSpeed float64 `toml:"-"`
	// MinShiftDetour is the smallest change of the daily detour ratio that
	// counts as material (default 0.05).
	MinShiftDetour float64 `toml:"-"`
	// MinDayTrips leaves out of a finding's daily speed and detour series the
	// days with fewer trips than this on the finding's edges together
	// (default 1: every analysed day with trips).
	MinDayTrips int `toml:"-"`
}

// DefaultCompareOptions returns the documented defaults.
func DefaultCompareOptions() CompareOptions {
	return CompareOptions{
		Alpha:          0.05,
		MinShiftSpeed:  geodesy.MPS(1),
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

// Compare scans two periods of the same store (and so the same regions) and
// gives every finding of either period a verdict with its evidence.
//
// For each finding (the union of both scans' findings by ID; the Finding
// recorded is the before one when it exists):
//
//   - Recurrence: the days of each period on which at least one of the
//     finding's edges was a candidate (from Scan.DayCandidates, so it is
//     counted even in a period where the place is not a finding), compared with a
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
// The changes the rule counted are kept with the verdict, as numbers rather
// than words: Assessment.Recurrence, Speed.Change and Detour.Change (a
// report puts them into sentences).
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
	sb, sa, err := scanPeriods(ctx, store, before, after)
	if err != nil {
		return nil, err
	}
	union := unionFindings(sb.Findings, sa.Findings)
	if err := checkFindingRegions(union, regions); err != nil {
		return nil, err
	}
	assessments, err := assess(ctx, store, regions, sb, sa, union, opts)
	if err != nil {
		return nil, err
	}
	adjustFamilies(assessments)
	counts := map[Verdict]int{Worse: 0, New: 0, Unchanged: 0, Eased: 0, Cleared: 0}
	for i := range assessments {
		a := &assessments[i]
		var c changes
		a.Verdict, c = decide(evidenceOf(a), opts)
		a.Recurrence, a.Speed.Change, a.Detour.Change = c.recurrence, c.speed, c.detour
		counts[a.Verdict]++
	}
	sortBySeverity(assessments)
	return &Comparison{Before: sb, After: sa, Assessments: assessments, Counts: counts, Alpha: opts.Alpha}, nil
}

// scanPeriods scans both periods and checks that each has analysed days and
// that both use the same time window.
func scanPeriods(ctx context.Context, store *regiongraph.Store, before, after ScanOptions) (sb, sa *Scan, err error) {
	sb, err = ScanStore(ctx, store, before)
	if err != nil {
		return nil, nil, fmt.Errorf("compare: before period: %w", err)
	}
	sa, err = ScanStore(ctx, store, after)
	if err != nil {
		return nil, nil, fmt.Errorf("compare: after period: %w", err)
	}
	for _, p := range []struct {
		name string
		scan *Scan
		opts ScanOptions
	}{{"before", sb, before}, {"after", sa, after}} {
		if len(p.scan.Days) == 0 {
			return nil, nil, fmt.Errorf("compare: the %s period (%s to %s, %s days, window %q) has no analysed days in the store",
				p.name, orOpen(p.opts.From), orOpen(p.opts.To), orAll(p.opts.Days), p.scan.Window)
		}
	}
	if sb.Window != sa.Window {
		return nil, nil, fmt.Errorf("compare: the periods use different time windows (%q before, %q after)", sb.Window, sa.Window)
	}
	return sb, sa, nil
}

// checkFindingRegions checks that every region of every finding is among
// regions (when given).
func checkFindingRegions(union []unionEntry, regions *partition.Partition) error {
	if regions == nil {
		return nil
	}
	known := regionIDs(regions)
	for _, u := range union {
		for _, id := range u.finding.Regions {
			if !known[id] {
				return fmt.Errorf("compare: finding %s refers to region %d, which is not among the %d regions of %q; is the partition the one the store was built from?",
					u.finding.ID, id, len(regions.Regions), regions.Source)
			}
		}
	}
	return nil
}

// assess gathers the evidence of every finding of the union: recurrence
// with its Fisher test, the daily series with their shift tests, and the
// focus. The p-values are not yet adjusted and there is no verdict.
func assess(ctx context.Context, store *regiongraph.Store, regions *partition.Partition, sb, sa *Scan, union []unionEntry, opts CompareOptions) ([]Assessment, error) {
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
		a.FisherP = recurrenceTest(&a)
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
	return assessments, nil
}

// sortBySeverity orders assessments by verdict, most urgent first, then by
// Finding.Rank and ID.
func sortBySeverity(assessments []Assessment) {
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
