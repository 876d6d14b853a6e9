package patterns

import (
	"context"
	"fmt"
	"math"
	"sort"
	"time"

	"narrows/partition"
	"narrows/regiongraph"
)

// CompareOptions sets the decision rule of Compare. The zero value is not the
// default; use DefaultCompareOptions. The toml tags are the keys of a study
// file's [compare] table.
type CompareOptions struct {
	// Alpha is the significance level applied to Benjamini-Hochberg adjusted
	// p-values (default 0.05).
	Alpha float64 `toml:"alpha"`
	// Focus, when not nil, marks the findings around a scheme; its pairs
	// are left out of every comparison group.
	Focus *Focus `toml:"-"`
	// Opening is the day YYYY-MM-DD the scheme opened, for the report's
	// timeline (default none). It does not enter the verdicts.
	Opening string `toml:"opening"`
	// MaterialCost is the smallest adjusted change of a finding's cost
	// (extra vehicle-hours per day), as a share of its before level, that
	// counts (default 0.25: a quarter).
	MaterialCost float64 `toml:"material_cost"`
	// MaterialTime is the smallest adjusted change of the travel time per
	// trip, as a share of its before level, that counts (default 0.10).
	MaterialTime float64 `toml:"material_time"`
	// ClearCost is the adjusted fall of the cost, as a share of its before
	// level, that clears a finding (default 0.5: by half).
	ClearCost float64 `toml:"clear_cost"`
	// ClearBarShare: a finding that is better and met the fixed bar on
	// fewer than this share of the after days (and fewer than before) is
	// cleared (default 0.5: no longer on most days).
	ClearBarShare float64 `toml:"clear_bar_share"`
	// GroupSize is the number of pairs in a comparison group (default 20).
	GroupSize int `toml:"group_size"`
	// GroupMinSize is the fewest pairs of a distance band for a comparison
	// group; with fewer the band widens (default 5).
	GroupMinSize int `toml:"group_min_size"`
	// GroupMinDays is the share of each period's analysed days on which a
	// pair must carry trips to be in a comparison group (default 0.5).
	GroupMinDays float64 `toml:"group_min_days"`
	// MinDayTrips leaves out of a finding's daily series the days with
	// fewer trips than this on the finding's edges together (default 1:
	// every analysed day with trips).
	MinDayTrips int `toml:"-"`
}

// DefaultCompareOptions returns the documented defaults.
func DefaultCompareOptions() CompareOptions {
	return CompareOptions{
		Alpha:         0.05,
		MaterialCost:  0.25,
		MaterialTime:  0.10,
		ClearCost:     0.5,
		ClearBarShare: 0.5,
		GroupSize:     20,
		GroupMinSize:  5,
		GroupMinDays:  0.5,
		MinDayTrips:   1,
	}
}

func (o CompareOptions) validate(regions *partition.Partition) error {
	if !(o.Alpha > 0 && o.Alpha < 1) {
		return fmt.Errorf("compare: alpha %v must lie strictly between 0 and 1", o.Alpha)
	}
	for _, s := range []struct {
		name string
		v    float64
	}{{"material cost share", o.MaterialCost}, {"material travel time share", o.MaterialTime}, {"clearing cost share", o.ClearCost}, {"clearing bar share", o.ClearBarShare}, {"group minimum days share", o.GroupMinDays}} {
		if !(s.v >= 0 && s.v <= 1) {
			return fmt.Errorf("compare: %s %v must lie between 0 and 1", s.name, s.v)
		}
	}
	if o.GroupSize < 1 || o.GroupMinSize < 1 || o.GroupMinSize > o.GroupSize {
		return fmt.Errorf("compare: group size %d and minimum group size %d must be at least 1, the minimum no larger than the size", o.GroupSize, o.GroupMinSize)
	}
	if o.Opening != "" {
		if _, err := time.Parse(dayLayout, o.Opening); err != nil {
			return fmt.Errorf("compare: opening %q is not a date YYYY-MM-DD", o.Opening)
		}
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
//   - Daily measures (see Measure): on every analysed day of a period on
//     which the finding's edges carried at least MinDayTrips trips
//     together (and its comparison group carried trips), its cost (extra
//     vehicle-hours), travel time per trip, trips, speed, detour ratio and
//     extra vehicle-km, read from the store itself, since an edge need not
//     be a candidate in either period.
//   - Comparison group (matchGroup): GroupSize region pairs like the
//     finding, matched on straight-line distance band and before-period
//     detour and speed, outside every finding of either period and outside
//     the focus area, with trips on at least GroupMinDays of each period's
//     days.
//   - Effects: each day's value divided by the group's index that day (the
//     group's value over its before-period median; for the costs, its
//     vehicle-hours and vehicle-km travelled), then the Hodges-Lehmann
//     shift of after against before with its 95 % confidence interval and
//     a two-sided Mann-Whitney test: a difference in differences on daily
//     values, taken on the ratio scale so that a change of the whole
//     network by a share (a season, growth) cancels whatever a pair's
//     size. The raw change and the group's change are kept beside it.
//   - Fixed bar: the days on which any edge was at least as circuitous as
//     the skyline's detour floor and slower than the before period's median
//     speed (Comparison.BarSpeed), thresholds held fixed across periods.
//   - Skyline recurrence, as context: the days of each period on which any
//     edge was a candidate, with a two-sided Fisher exact test. It never
//     decides a verdict: skyline membership is relative to the rest of
//     the day, so when the worst pair improves others join it.
//
// p-values are adjusted with Benjamini-Hochberg, each measure a family
// across all findings, and the Fisher tests a family of their own. The
// verdict is Decide(EvidenceOf(a), opts).
//
// Assessments are ordered by verdict, most urgent first: worse, new,
// unchanged, eased, cleared; then by Finding.Rank and ID. Counts holds all
// five verdicts, zero or not. Network is the change over every pair.
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
	totals, ok := store.DayTotals()
	if !ok {
		return nil, fmt.Errorf("compare: the store was read with a minimum of trips and records no day totals, so its network totals are not known: read it without a minimum")
	}
	parts, cut := periodParts(store, [2]ScanOptions{before, after})
	sb, sa, err := scanPeriods(ctx, store, parts, cut, before, after)
	if err != nil {
		return nil, err
	}
	union := unionFindings(sb.Findings, sa.Findings)
	if err := checkFindingRegions(union, regions); err != nil {
		return nil, err
	}
	if !cut {
		parts = [2][]regiongraph.Edge{store.Edges, store.Edges}
	}
	pd := readPeriods(parts, cut, totals, windowIndex(store, sb.Window), sb, sa)
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	c := &Comparison{Before: sb, After: sa, Alpha: opts.Alpha, Options: opts, BarSpeed: pd.barSpeed}
	c.Network = networkChange(pd)
	assessments, poolSize, err := assess(ctx, regions, pd, sb, sa, union, opts)
	if err != nil {
		return nil, err
	}
	c.PoolSize = poolSize
	adjustFamilies(assessments)
	c.Counts = map[Verdict]int{Worse: 0, New: 0, Unchanged: 0, Eased: 0, Cleared: 0}
	for i := range assessments {
		a := &assessments[i]
		d := Decide(EvidenceOf(a), opts)
		a.Verdict, a.Basis = d.Verdict, d.Basis
		a.Effects[Cost].Adjusted.Change, a.Effects[TravelTime].Adjusted.Change = d.Cost, d.Time
		c.Counts[a.Verdict]++
	}
	sortBySeverity(assessments)
	c.Assessments = assessments
	return c, nil
}

// scanPeriods scans both periods and checks that each has analysed days and
// that both use the same time window. With the store cut into the
// periods' parts (see periodParts), the two scans run at once, each on
// its part; should either fail, both are run again on the whole store, one
// after the other, so that the error is the whole store's.
func scanPeriods(ctx context.Context, store *regiongraph.Store, parts [2][]regiongraph.Edge, cut bool, before, after ScanOptions) (sb, sa *Scan, err error) {
	if cut {
		periods := [2]ScanOptions{before, after}
		progress := sharedProgress(before.Progress, after.Progress)
		var scans [2]*Scan
		var errs [2]error
		both(func(p int) {
			o := periods[p]
			o.Progress = progress[p]
			scans[p], errs[p] = ScanStore(ctx, partStore(store, parts[p]), o)
		})
		if err := ctx.Err(); err != nil {
			return nil, nil, fmt.Errorf("compare: %w", err)
		}
		if errs[0] == nil && errs[1] == nil {
			// Each scan's Options keep the period's own callback.
			scans[0].Options.Progress, scans[1].Options.Progress = before.Progress, after.Progress
			sb, sa = scans[0], scans[1]
		}
	}
	if sb == nil {
		if sb, err = ScanStore(ctx, store, before); err != nil {
			return nil, nil, fmt.Errorf("compare: before period: %w", err)
		}
		if sa, err = ScanStore(ctx, store, after); err != nil {
			return nil, nil, fmt.Errorf("compare: after period: %w", err)
		}
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

// assess gathers the evidence of every finding of the union: daily
// measures, comparison group and effects, the fixed bar, skyline recurrence
// with its Fisher test, and the focus. The p-values are not yet adjusted
// and there is no verdict. It also returns the size of the pool of pairs
// the comparison groups were drawn from.
func assess(ctx context.Context, regions *partition.Partition, pd *periodData, sb, sa *Scan, union []unionEntry, opts CompareOptions) ([]Assessment, int, error) {
	exclude := map[EdgeKey]bool{}
	for _, u := range union {
		for _, k := range findingKeys(u.finding) {
			exclude[k] = true
		}
	}
	pool := matchPool(pd, exclude, focusRegionSet(opts.Focus, regions), opts)
	spread := poolSpread(pool)
	groupsOf := make([]ComparisonGroup, len(union))
	needed := map[EdgeKey]bool{}
	for k := range exclude {
		needed[k] = true
	}
	for i, u := range union {
		straight, detour, speed := findingFeatures(pd, findingKeys(u.finding))
		groupsOf[i] = matchGroup(pool, spread, straight, detour, speed, opts)
		for _, k := range groupsOf[i].Edges {
			needed[k] = true
		}
	}
	if err := ctx.Err(); err != nil {
		return nil, 0, err
	}
	days := pd.edgeDays(sb.Options.Skyline.MinTrips, needed)
	bar := newFixedBar(sb.Options.Skyline, pd.barSpeed)
	ref := sb.Options.ReferenceSpeed
	minTrips := float64(max(opts.MinDayTrips, 1))

	assessments := make([]Assessment, len(union))
	for i, u := range union {
		keys := findingKeys(u.finding)
		a := Assessment{
			Finding:     u.finding,
			InBefore:    u.inBefore,
			InAfter:     u.inAfter,
			Group:       groupsOf[i],
			DaysBefore:  recurrenceDays(sb, keys),
			TotalBefore: len(sb.Days),
			DaysAfter:   recurrenceDays(sa, keys),
			TotalAfter:  len(sa.Days),
		}
		a.FisherP = recurrenceTest(&a)
		var own, group [2][NumMeasures][]float64
		hasGroup := len(a.Group.Edges) > 0
		for p := range 2 {
			ft := dailyTotals(days[p], len(pd.days[p]), keys, ref, bar)
			var gt []dayTotals
			if hasGroup {
				gt = dailyTotals(days[p], len(pd.days[p]), a.Group.Edges, ref, nil)
			}
			for d := range ft {
				if ft[d].trips < minTrips || (hasGroup && gt[d].trips == 0) {
					continue
				}
				a.DaysWithTrips[p]++
				a.DailyCost[p] = append(a.DailyCost[p], DayValue{Day: pd.days[p][d], Value: ft[d].value(Cost)})
				if ft[d].bar {
					a.BarDays[p]++
				}
				for m := range NumMeasures {
					own[p][m] = append(own[p][m], ft[d].value(m))
					if hasGroup {
						group[p][m] = append(group[p][m], gt[d].scale(m))
					}
				}
			}
		}
		for m := range NumMeasures {
			a.Effects[m] = effect(own[0][m], own[1][m], group[0][m], group[1][m], true)
		}
		a.Focus = inFocus(u.finding, opts.Focus, regions)
		assessments[i] = a
		if i%64 == 0 {
			if err := ctx.Err(); err != nil {
				return nil, 0, err
			}
		}
	}
	return assessments, len(pool), nil
}

// findingFeatures returns the straight-line distance per trip, detour and
// speed of a set of edges over the before period, or over the after period
// when they carried no trips before.
func findingFeatures(pd *periodData, keys []EdgeKey) (straight, detour, speed float64) {
	for _, p := range []int{0, 1} {
		var s edgeSummary
		for _, k := range keys {
			if e := pd.summary.get(k); e != nil {
				s.trips[0] += e.trips[p]
				s.distanceSum[0] += e.distanceSum[p]
				s.straightSum[0] += e.straightSum[p]
				s.durationSum[0] += e.durationSum[p]
			}
		}
		if s.trips[0] > 0 {
			return s.features(0)
		}
	}
	return math.NaN(), math.NaN(), math.NaN()
}

// focusRegionSet lists the regions of the focus area: those named, and
// with a point and the regions those within the radius (see Focus).
func focusRegionSet(focus *Focus, regions *partition.Partition) map[int]bool {
	out := map[int]bool{}
	if focus == nil {
		return out
	}
	for _, id := range focus.Regions {
		out[id] = true
	}
	if focus.Point != nil && regions != nil {
		for i := range regions.Regions {
			r := &regions.Regions[i]
			if regionDistance(r, *focus.Point) <= focus.RadiusMetres {
				out[r.ID] = true
			}
		}
	}
	return out
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
