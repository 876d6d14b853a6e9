package patterns

import (
	"cmp"
	"slices"

	"narrows/patterns/stats"
	"narrows/regiongraph"
)

// periodData is what the comparison reads from the store for the two
// periods (index 0 before, 1 after): per edge its totals over each period,
// per day the network's totals, and the before period's fixed speed bar.
type periodData struct {
	days    [2][]string
	summary *edgeTable
	network [2][]dayTotals
	// barSpeed is the median over the before days of each day's
	// trip-weighted median edge speed (m/s): the speed gate of the
	// skyline, held fixed at its before-period level.
	barSpeed float64
}

// edgeSummary is one edge's totals over each period.
type edgeSummary struct {
	days                                         [2]int
	trips, distanceSum, straightSum, durationSum [2]float64
}

// edgeTable holds the edges' summaries by key. A city's year has millions
// of edge-days to add up; with region ids below denseLimit the summaries
// are found through a square table indexed by from and to, which is
// several times quicker than a map, else through a map.
type edgeTable struct {
	side  int     // region ids are below side; 0 when sparse
	dense []int32 // index of the summary + 1, 0 when none, at from*side+to
	index map[EdgeKey]int32
	keys  []EdgeKey // in the order first seen
	rows  []edgeSummary
}

// denseLimit bounds the cells of an edgeTable's square table (64 MiB of
// int32): 4,096 regions.
const denseLimit = 1 << 24

func newEdgeTable(maxID int) *edgeTable {
	if side := maxID + 1; maxID >= 0 && side*side <= denseLimit {
		return &edgeTable{side: side, dense: make([]int32, side*side)}
	}
	return &edgeTable{index: map[EdgeKey]int32{}}
}

// find returns k's summary index + 1, or 0 when k has none.
func (t *edgeTable) find(k EdgeKey) int32 {
	if t.side > 0 {
		if k.From < 0 || k.To < 0 || k.From >= t.side || k.To >= t.side {
			return 0
		}
		return t.dense[k.From*t.side+k.To]
	}
	return t.index[k]
}

// get returns k's summary, or nil.
func (t *edgeTable) get(k EdgeKey) *edgeSummary {
	if i := t.find(k); i > 0 {
		return &t.rows[i-1]
	}
	return nil
}

// add returns k's summary, added empty when k has none yet. The pointer is
// valid until the next add.
func (t *edgeTable) add(k EdgeKey) *edgeSummary {
	if i := t.find(k); i > 0 {
		return &t.rows[i-1]
	}
	t.keys = append(t.keys, k)
	t.rows = append(t.rows, edgeSummary{})
	i := int32(len(t.rows))
	if t.side > 0 {
		t.dense[k.From*t.side+k.To] = i
	} else {
		t.index[k] = i
	}
	return &t.rows[i-1]
}

// straight returns the edge's mean straight-line distance per trip (m),
// detour (travel over straight-line distance) and speed (m/s) over period
// p, from the sums.
func (s *edgeSummary) features(p int) (straight, detour, speed float64) {
	return s.straightSum[p] / s.trips[p], s.distanceSum[p] / s.straightSum[p], s.distanceSum[p] / s.durationSum[p]
}

// dayLookup maps the store's days to (period, index) with a one-entry
// cache, since the store is sorted by day.
type dayLookup struct {
	index    [2]map[regiongraph.Day]int
	lastDay  regiongraph.Day
	lastP    int
	lastI    int
	lastSeen bool
}

func newDayLookup(days [2][]string) *dayLookup {
	l := &dayLookup{}
	for p := range days {
		l.index[p] = make(map[regiongraph.Day]int, len(days[p]))
		for i, d := range days[p] {
			if day, err := regiongraph.ParseDay(d); err == nil { // the scans' days are
				l.index[p][day] = i
			}
		}
	}
	return l
}

// find returns the period and day index of day, or ok false when it is
// analysed in neither period.
func (l *dayLookup) find(day regiongraph.Day) (p, i int, ok bool) {
	if l.lastSeen && day == l.lastDay {
		return l.lastP, l.lastI, l.lastP >= 0
	}
	l.lastDay, l.lastSeen, l.lastP, l.lastI = day, true, -1, -1
	for p := range l.index {
		if i, found := l.index[p][day]; found {
			l.lastP, l.lastI = p, i
			return p, i, true
		}
	}
	return -1, -1, false
}

// readPeriods makes one pass over the store's edges of the window: the
// network's daily totals over every pair with trips, the summaries and the
// bar speed over the pairs with at least the scan's minimum trips.
func readPeriods(store *regiongraph.Store, sb, sa *Scan) *periodData {
	maxID := -1
	for i := range store.Edges {
		maxID = max(maxID, store.Edges[i].From, store.Edges[i].To)
	}
	pd := &periodData{days: [2][]string{sb.Days, sa.Days}, summary: newEdgeTable(maxID)}
	for p := range pd.network {
		pd.network[p] = make([]dayTotals, len(pd.days[p]))
	}
	minTrips := sb.Options.Skyline.MinTrips
	type speedTrips struct{ speed, trips float64 }
	daySpeeds := make([][]speedTrips, len(sb.Days))
	look := newDayLookup(pd.days)
	ref := sb.Options.ReferenceSpeed
	window := windowIndex(store, sb.Window)
	for i := range store.Edges {
		e := &store.Edges[i]
		// The network's totals count every pair with trips, however few:
		// with a minimum, a fall of demand would also drop the pairs near
		// it and overstate the fall.
		if !usable(e, window, 1) {
			continue
		}
		p, d, ok := look.find(e.Day)
		if !ok {
			continue
		}
		ed := newEdgeDay(d, e)
		pd.network[p][d].add(&ed, ref)
		if e.Trips < minTrips {
			continue
		}
		s := pd.summary.add(EdgeKey{From: e.From, To: e.To})
		s.days[p]++
		s.trips[p] += float64(e.Trips)
		s.distanceSum[p] += e.DistanceSum
		s.straightSum[p] += e.StraightSum
		s.durationSum[p] += e.DurationSum
		if p == 0 {
			daySpeeds[d] = append(daySpeeds[d], speedTrips{e.SpeedMedian, float64(e.Trips)})
		}
	}
	var medians []float64
	for _, v := range daySpeeds {
		if len(v) == 0 {
			continue
		}
		slices.SortFunc(v, func(a, b speedTrips) int { return cmp.Compare(a.speed, b.speed) })
		var total float64
		for _, x := range v {
			total += x.trips
		}
		var run float64
		for _, x := range v {
			run += x.trips
			if run >= total/2 {
				medians = append(medians, x.speed)
				break
			}
		}
	}
	pd.barSpeed = stats.Median(medians)
	return pd
}

// edgeDays reads the days of the given edges in both periods.
func (pd *periodData) edgeDays(store *regiongraph.Store, windowName string, minTrips int, keys map[EdgeKey]bool) [2]map[EdgeKey][]edgeDay {
	var out [2]map[EdgeKey][]edgeDay
	for p := range out {
		out[p] = map[EdgeKey][]edgeDay{}
	}
	look := newDayLookup(pd.days)
	window := windowIndex(store, windowName)
	for i := range store.Edges {
		e := &store.Edges[i]
		k := EdgeKey{From: e.From, To: e.To}
		if !keys[k] || !usable(e, window, minTrips) {
			continue
		}
		p, d, ok := look.find(e.Day)
		if !ok {
			continue
		}
		out[p][k] = append(out[p][k], newEdgeDay(d, e))
	}
	return out
}

// dailyTotals sums the given edges per day of period p. With bar set, a
// day's bar flag tells whether some edge met the fixed bar that day.
func dailyTotals(days map[EdgeKey][]edgeDay, nDays int, keys []EdgeKey, ref float64, bar *fixedBar) []dayTotals {
	out := make([]dayTotals, nDays)
	for _, k := range keys {
		for i := range days[k] {
			ed := &days[k][i]
			t := &out[ed.day]
			t.add(ed, ref)
			if bar != nil && bar.met(ed) {
				t.bar = true
			}
		}
	}
	return out
}
