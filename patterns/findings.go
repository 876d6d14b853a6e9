package patterns

import (
	"cmp"
	"fmt"
	"slices"
	"strings"

	"narrows/patterns/groups"
	"narrows/patterns/stats"
)

// findings turns the mined groups of scan into ranked findings.
//
// Per edge and finding day, the extra vehicle-kilometres are the travel
// distance beyond the straight-line distance, summed over the day's trips,
// and the extra vehicle-hours are the travel time beyond the time the
// straight line would take at the reference speed. Both are floored at 0
// per day: a pair whose trips beat the reference speed along the straight
// line costs nothing extra that day, and no day's gain is allowed to offset
// another day's loss. Each edge carries the median over the finding's days;
// a finding's cost is the sum over its edges.
//
// Findings are ranked by their cost spread over the whole period, cost x
// share: the extra vehicle-hours per analysed day. A group always costs at
// least as much as any group inside it on the days it recurs, but recurs on
// fewer days; ranking by the cost on recurrence days alone would put every
// rarely seen superset above the core pair that recurs every day.
func findings(scan *Scan, found []groups.Group) []Finding {
	out := make([]Finding, 0, len(found))
	ref := scan.Options.ReferenceSpeed
	for _, g := range found {
		f := Finding{
			ID:    groupID(g.Edges),
			Days:  make([]string, len(g.Days)),
			Share: float64(len(g.Days)) / float64(len(scan.Days)),
		}
		for i, d := range g.Days {
			f.Days[i] = scan.Days[d]
		}
		for _, e := range g.Edges {
			f.Regions = append(f.Regions, e.From, e.To)
		}
		slices.Sort(f.Regions)
		f.Regions = slices.Compact(f.Regions)

		n := len(f.Days)
		trips, speed, detour := make([]float64, 0, n), make([]float64, 0, n), make([]float64, 0, n)
		km, hours := make([]float64, 0, n), make([]float64, 0, n)
		for _, key := range g.Edges {
			daily := scan.EdgeDaily[key]
			trips, speed, detour, km, hours = trips[:0], speed[:0], detour[:0], km[:0], hours[:0]
			i := 0
			for _, day := range f.Days {
				for i < len(daily) && daily[i].Day < day {
					i++
				}
				if i == len(daily) || daily[i].Day != day {
					continue // cannot happen: the edge was a candidate that day
				}
				v := daily[i]
				trips = append(trips, float64(v.Trips))
				speed = append(speed, v.Speed)
				detour = append(detour, v.Detour)
				km = append(km, max(0, v.DistanceSum-v.StraightSum)/1000)
				hours = append(hours, max(0, v.DurationSum-v.StraightSum/ref)/3600)
			}
			fe := FindingEdge{
				From:             key.From,
				To:               key.To,
				TripsMedian:      stats.Median(trips),
				SpeedMedian:      stats.Median(speed),
				DetourMedian:     stats.Median(detour),
				ExtraKMPerDay:    stats.Median(km),
				ExtraHoursPerDay: stats.Median(hours),
				Daily:            slices.Clone(daily),
			}
			f.ExtraKMPerDay += fe.ExtraKMPerDay
			f.ExtraHoursPerDay += fe.ExtraHoursPerDay
			f.Edges = append(f.Edges, fe)
		}
		out = append(out, f)
	}
	slices.SortStableFunc(out, func(a, b Finding) int {
		if c := cmp.Compare(b.ExtraHoursPerDay*b.Share, a.ExtraHoursPerDay*a.Share); c != 0 {
			return c
		}
		if c := cmp.Compare(b.ExtraKMPerDay*b.Share, a.ExtraKMPerDay*a.Share); c != 0 {
			return c
		}
		return strings.Compare(a.ID, b.ID)
	})
	for i := range out {
		out[i].Rank = i + 1
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
