package explore

import (
	"bytes"
	"context"
	"maps"
	"math"
	"slices"
	"time"

	"narrows/partition/geodesy"
	"narrows/patterns"
	"narrows/report"
)

// State is what the page shows: the settings and exclusions, and the
// analysis they give.
type State struct {
	Title      string              `json:"title"`
	Settings   Settings            `json:"settings"`
	Exclusions patterns.Exclusions `json:"exclusions"`
	Mode       string              `json:"mode"` // "scan" or "compare"
	Window     string              `json:"window"`
	Windows    []string            `json:"windows"`
	// Findings are ranked by cost (before period in compare mode; then the
	// after-only ones).
	Findings []FindingState `json:"findings"`
	// TotalCost is the sum of the findings' extra vehicle-hours per day
	// (before period in compare mode).
	TotalCost float64    `json:"total_cost"`
	Days      []DayState `json:"days"`
	Regions   []Region   `json:"regions"`
	Map       string     `json:"map"` // SVG
	Headline  string     `json:"headline"`
	Note      string     `json:"note,omitempty"`
	Caution   string     `json:"caution"`
	CanSave   bool       `json:"can_save"`
	Saved     string     `json:"saved,omitempty"`
	// Millis is the time the analysis took on the server.
	Millis float64 `json:"millis"`
}

// FindingState is one finding with its edges and daily timeline.
type FindingState struct {
	Rank    int     `json:"rank"`
	ID      string  `json:"id"`
	Name    string  `json:"name"`
	Regions []int   `json:"regions"`
	Cost    float64 `json:"cost"` // extra vehicle-hours per day of the period
	KM      float64 `json:"km"`   // extra vehicle-km per day
	Share   float64 `json:"share"`
	Period  string  `json:"period"` // "study", "before" or "after" (after-only)
	// Focus marks a finding in the focus area: a comparison's own mark;
	// in a scan, a finding touching one of the focus's regions.
	Focus bool `json:"focus,omitempty"`
	// Compare mode: the verdict, the cost before and after (daily
	// medians) and the evidence in words.
	Verdict    string      `json:"verdict,omitempty"`
	CostBefore float64     `json:"cost_before,omitempty"`
	CostAfter  float64     `json:"cost_after,omitempty"`
	Reason     string      `json:"reason,omitempty"`
	Edges      []EdgeState `json:"edges"`
	Daily      []DailyCost `json:"daily"`
}

// EdgeState is one directed edge of a finding.
type EdgeState struct {
	From     int     `json:"from"`
	To       int     `json:"to"`
	Share    float64 `json:"share"`
	Trips    float64 `json:"trips"`
	SpeedKMH float64 `json:"speed_kmh"`
	Detour   float64 `json:"detour"`
	Cost     float64 `json:"cost"`
}

// DailyCost is a finding's day: its edges together.
type DailyCost struct {
	Day      string  `json:"day"`
	Cost     float64 `json:"cost"` // extra vehicle-hours
	Trips    int     `json:"trips"`
	SpeedKMH float64 `json:"speed_kmh"` // vehicle-km over vehicle-hours
	Detour   float64 `json:"detour"`    // travel over straight-line km
	Weak     bool    `json:"weak"`      // an edge was a candidate
}

// DayState is one day of the store in the calendar strip.
type DayState struct {
	Day string `json:"day"`
	// Cost is the network's extra vehicle-hours that day: every pair with
	// at least the minimum trips in the window, excluded pairs left out.
	Cost     float64 `json:"cost"`
	Period   string  `json:"period,omitempty"` // "study", "before", "after" when analysed
	Excluded string  `json:"excluded,omitempty"`
	Weekday  int     `json:"weekday"` // 0 Sunday
}

// Region is a region's id and name for the page's pickers.
type Region struct {
	ID   int    `json:"id"`
	Name string `json:"name"`
}

// analyse runs the analysis of the choices and returns the page's state.
// The cache holds what earlier calls derived from the study (nil: a new
// one, derived afresh).
func analyse(ctx context.Context, st *Study, c Choices, cache *cache) (*State, error) {
	start := time.Now()
	if cache == nil {
		cache = newCache(st.Store)
	}
	store, opts, err := cache.without(st, c.Exclusions, c.Scan)
	if err != nil {
		return nil, err
	}
	in := report.Input{Title: st.Title, Regions: st.Regions, Store: &store.Meta, Scheme: st.Scheme}
	s := &State{Title: st.Title, Settings: settingsOf(c), Exclusions: c.Exclusions, Caution: report.Caution, CanSave: st.Save != nil}
	periods := map[string]string{}
	focus, err := focusOf(st, c)
	if err != nil {
		return nil, err
	}
	if c.Before != "" {
		s.Mode = "compare"
		b, a := opts, opts
		b.From, b.To, _ = patterns.ParsePeriod(c.Before)
		a.From, a.To, _ = patterns.ParsePeriod(c.After)
		copts := st.Compare
		copts.Focus = focus
		cmp, err := patterns.Compare(ctx, store, st.Regions, b, a, copts)
		if err != nil {
			return nil, err
		}
		in.Comparison, in.Scan = cmp, cmp.Before
		s.Window = cmp.Before.Window
		for _, d := range cmp.Before.Days {
			periods[d] = "before"
		}
		for _, d := range cmp.After.Days {
			periods[d] = "after"
		}
		s.Findings = compareFindings(st, cmp)
		s.Note = report.GroupBoundNote(cmp.Before) + report.GroupBoundNote(cmp.After)
	} else {
		s.Mode = "scan"
		// The scan reads only the edges with the minimum of trips; a
		// comparison reads every edge for the network's totals.
		scan, err := patterns.ScanStore(ctx, cache.atLeastTrips(opts.Skyline.MinTrips), opts)
		if err != nil {
			return nil, err
		}
		in.Scan = scan
		s.Window = scan.Window
		for _, d := range scan.Days {
			periods[d] = "study"
		}
		for _, f := range scan.Findings {
			fs := findingState(st, f, "study", scan)
			fs.Focus = focus != nil && slices.ContainsFunc(f.Regions, func(id int) bool { return slices.Contains(focus.Regions, id) })
			s.Findings = append(s.Findings, fs)
		}
		s.Note = report.GroupBoundNote(scan)
	}
	for _, f := range s.Findings {
		if f.Period != "after" {
			s.TotalCost += f.Cost
		}
	}
	var svg bytes.Buffer
	if err := report.WriteMapSVG(&svg, in); err != nil {
		return nil, err
	}
	s.Map = svg.String()
	s.Headline = report.Headline(in)
	s.Days = dayStrip(cache.days, cache.strip[s.Window], opts.Skyline.MinTrips, periods, c.Exclusions)
	for _, w := range store.Meta.Windows {
		s.Windows = append(s.Windows, w.Name)
	}
	for i, r := range st.Regions.Regions {
		s.Regions = append(s.Regions, Region{ID: i + 1, Name: r.Name})
	}
	if s.Findings == nil {
		s.Findings = []FindingState{}
	}
	s.Millis = float64(time.Since(start).Microseconds()) / 1000
	return s, nil
}

// focusOf reads the choices' focus area (nil for none).
func focusOf(st *Study, c Choices) (*patterns.Focus, error) {
	if c.Focus == "" || st.ParseFocus == nil {
		return nil, nil
	}
	return st.ParseFocus(c.Focus)
}

// compareFindings lists the assessments in rank order: the before
// period's findings by rank, then the after-only ones by rank.
func compareFindings(st *Study, cmp *patterns.Comparison) []FindingState {
	as := slices.Clone(cmp.Assessments)
	slices.SortStableFunc(as, func(a, b patterns.Assessment) int {
		if a.InBefore != b.InBefore {
			if a.InBefore {
				return -1
			}
			return 1
		}
		return a.Finding.Rank - b.Finding.Rank
	})
	var out []FindingState
	for i := range as {
		a := &as[i]
		period, scan := "before", cmp.Before
		if !a.InBefore {
			period, scan = "after", cmp.After
		}
		f := findingState(st, a.Finding, period, scan)
		f.Verdict = string(a.Verdict)
		f.Focus = a.Focus
		f.CostBefore = a.Effects[patterns.Cost].Before
		f.CostAfter = a.Effects[patterns.Cost].After
		f.Reason = report.Reason(a)
		// The timeline runs over both periods.
		f.Daily = dailyCosts(a.Finding, []*patterns.Scan{cmp.Before, cmp.After})
		out = append(out, f)
	}
	return out
}

func findingState(st *Study, f patterns.Finding, period string, scan *patterns.Scan) FindingState {
	fs := FindingState{Rank: f.Rank, ID: f.ID, Name: report.PlaceName(f, st.Regions), Regions: f.Regions,
		Cost: f.ExtraHoursPerDay, KM: f.ExtraKMPerDay, Share: f.Share, Period: period}
	for _, e := range f.Edges {
		fs.Edges = append(fs.Edges, EdgeState{From: e.From, To: e.To, Share: e.Share, Trips: e.TripsMedian,
			SpeedKMH: geodesy.KMH(e.SpeedMedian), Detour: e.DetourMedian, Cost: e.ExtraHoursPerDay})
	}
	fs.Daily = dailyCosts(f, []*patterns.Scan{scan})
	return fs
}

// dailyCosts sums a finding's edges day by day over the scans' analysed
// days on which the edges had trips (a scan knows an edge's days only if
// it was a candidate there at least once).
func dailyCosts(f patterns.Finding, scans []*patterns.Scan) []DailyCost {
	type acc struct {
		trips               int
		dist, straight, dur float64
		hours               float64
		weak                bool
	}
	days := map[string]*acc{}
	for _, scan := range scans {
		if scan == nil {
			continue
		}
		ref := scan.Options.ReferenceSpeed
		for _, e := range f.Edges {
			for _, v := range scan.EdgeDaily[patterns.EdgeKey{From: e.From, To: e.To}] {
				a := days[v.Day]
				if a == nil {
					a = &acc{}
					days[v.Day] = a
				}
				a.trips += v.Trips
				a.dist += v.DistanceSum
				a.straight += v.StraightSum
				a.dur += v.DurationSum
				a.hours += max(0, v.DurationSum-v.StraightSum/ref) / 3600
				a.weak = a.weak || v.Candidate
			}
		}
	}
	out := make([]DailyCost, 0, len(days))
	for _, d := range slices.Sorted(maps.Keys(days)) {
		a := days[d]
		dc := DailyCost{Day: d, Cost: a.hours, Trips: a.trips, Weak: a.weak}
		if a.dur > 0 {
			dc.SpeedKMH = geodesy.KMH(a.dist / a.dur)
		}
		if a.straight > 0 {
			dc.Detour = a.dist / a.straight
		}
		out = append(out, dc)
	}
	return out
}

// dayStrip lists every day of the store with the network's extra
// vehicle-hours in the window (pairs with at least the minimum trips,
// excluded pairs left out: costs are the window's, see stripCosts), the
// period it was analysed in, and the reason it was excluded.
func dayStrip(days []string, costs map[string]*tripCosts, minTrips int, periods map[string]string, x patterns.Exclusions) []DayState {
	reasons := map[string]string{}
	for _, r := range x.Days {
		list, _ := r.List()
		for _, d := range list {
			if _, ok := reasons[d]; !ok {
				reasons[d] = r.Reason
			}
		}
	}
	out := make([]DayState, 0, len(days))
	for _, d := range days {
		cost := 0.0
		if t := costs[d]; t != nil {
			cost = t.over(minTrips)
		}
		ds := DayState{Day: d, Cost: math.Round(cost*10) / 10, Period: periods[d], Excluded: reasons[d]}
		if t, err := time.Parse(time.DateOnly, d); err == nil {
			ds.Weekday = int(t.Weekday())
		}
		out = append(out, ds)
	}
	return out
}
