package patterns

import (
	"cmp"
	"context"
	"fmt"
	"slices"
	"strings"

	"narrows/patterns/groups"
	"narrows/patterns/stats"
)

// findings turns the places of scan (see places) into ranked findings,
// each with its edges' recurrence and measures and its recurring groups.
//
// Per edge and day, the extra vehicle-kilometres are the travel distance
// beyond the straight-line distance, summed over the day's trips, and the
// extra vehicle-hours are the travel time beyond the time the straight line
// would take at the reference speed. Both are floored at 0 per day: a pair
// whose trips beat the reference speed along the straight line costs
// nothing extra that day, and no day's gain is allowed to offset another
// day's loss. Each edge carries the median over the days it was a
// candidate, and that median spread over the whole period (x its share):
// the extra vehicle-hours per analysed day. A finding's cost is the sum of
// its edges' costs per day of the period; since every edge belongs to one
// finding, the findings' costs add up to the cost of their distinct edges.
//
// Findings are ranked by that cost, then by extra vehicle-km, then by ID.
func findings(ctx context.Context, scan *Scan, places [][]EdgeKey, minSupport int) ([]Finding, error) {
	out := make([]Finding, 0, len(places))
	ref := scan.Options.ReferenceSpeed
	nDays := float64(len(scan.Days))
	budget := scan.Options.MaxGroupVisits
	dayIndex := make(map[string]int, len(scan.Days))
	for i, d := range scan.Days {
		dayIndex[d] = i
	}
	for pi, edges := range places {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		f := Finding{ID: groupID(edges)}
		weak := make([]bool, len(scan.Days))
		for _, key := range edges {
			f.Regions = append(f.Regions, key.From, key.To)
			fe := findingEdge(scan, key, ref)
			for _, d := range fe.Days {
				weak[dayIndex[d]] = true
			}
			f.ExtraKMPerDay += fe.ExtraKMPerDay
			f.ExtraHoursPerDay += fe.ExtraHoursPerDay
			f.Edges = append(f.Edges, fe)
		}
		slices.Sort(f.Regions)
		f.Regions = slices.Compact(f.Regions)
		for d, w := range weak {
			if w {
				f.Days = append(f.Days, scan.Days[d])
			}
		}
		f.Share = float64(len(f.Days)) / nDays

		// The place's recurring groups, mined over its own edges only, so
		// that a group never reaches into another place.
		if scan.GroupsTruncated {
			out = append(out, f)
			continue
		}
		opts := groups.Options{MinSupport: minSupport, MaxEdges: scan.Options.MaxGroupEdges, MaximalOnly: scan.Options.MaximalOnly}
		if budget > 0 {
			opts.MaxVisits = budget - scan.GroupVisits
		}
		res, err := groups.MineBounded(ctx, placeDays(scan.DayCandidates, edges), opts)
		if err != nil {
			return nil, err
		}
		scan.GroupVisits += res.Visited
		scan.GroupsTruncated = res.Truncated
		for _, g := range res.Groups {
			rg := RecurringGroup{Edges: g.Edges, Days: make([]string, len(g.Days)), Share: float64(len(g.Days)) / nDays}
			for i, d := range g.Days {
				rg.Days[i] = scan.Days[d]
			}
			f.Groups = append(f.Groups, rg)
		}
		out = append(out, f)
		if p := scan.Options.Progress; p != nil {
			p("groups", pi+1, len(places))
		}
	}
	slices.SortStableFunc(out, func(a, b Finding) int {
		if c := cmp.Compare(b.ExtraHoursPerDay, a.ExtraHoursPerDay); c != 0 {
			return c
		}
		if c := cmp.Compare(b.ExtraKMPerDay, a.ExtraKMPerDay); c != 0 {
			return c
		}
		return strings.Compare(a.ID, b.ID)
	})
	for i := range out {
		out[i].Rank = i + 1
	}
	return out, nil
}

// findingEdge gathers one edge's recurrence, medians over its candidate
// days and cost per day of the period.
func findingEdge(scan *Scan, key EdgeKey, ref float64) FindingEdge {
	daily := scan.EdgeDaily[key]
	var trips, speed, detour, km, hours []float64
	fe := FindingEdge{From: key.From, To: key.To, Daily: slices.Clone(daily)}
	for _, v := range daily {
		if !v.Candidate {
			continue
		}
		fe.Days = append(fe.Days, v.Day)
		trips = append(trips, float64(v.Trips))
		speed = append(speed, v.Speed)
		detour = append(detour, v.Detour)
		km = append(km, max(0, v.DistanceSum-v.StraightSum)/1000)
		hours = append(hours, max(0, v.DurationSum-v.StraightSum/ref)/3600)
	}
	fe.Share = float64(len(fe.Days)) / float64(len(scan.Days))
	fe.TripsMedian = stats.Median(trips)
	fe.SpeedMedian = stats.Median(speed)
	fe.DetourMedian = stats.Median(detour)
	fe.ExtraKMPerWeakDay = stats.Median(km)
	fe.ExtraHoursPerWeakDay = stats.Median(hours)
	fe.ExtraKMPerDay = fe.ExtraKMPerWeakDay * fe.Share
	fe.ExtraHoursPerDay = fe.ExtraHoursPerWeakDay * fe.Share
	return fe
}

// placeDays keeps, of each day's candidates, the edges of one place
// (sorted, as the days are).
func placeDays(days [][]EdgeKey, edges []EdgeKey) [][]EdgeKey {
	out := make([][]EdgeKey, len(days))
	for d, cands := range days {
		for _, e := range cands {
			if _, ok := slices.BinarySearchFunc(edges, e, groups.CompareEdges); ok {
				out[d] = append(out[d], e)
			}
		}
	}
	return out
}

// groupID joins the sorted edges as "12>15+15>18".
func groupID(edges []EdgeKey) string {
	var b strings.Builder
	for i, e := range edges {
		if i > 0 {
			b.WriteByte('+')
		}
		fmt.Fprintf(&b, "%d>%d", e.From, e.To)
	}
	return b.String()
}
