package patterns

import (
	"narrows/patterns/stats"
	"narrows/regiongraph"
)

// periodData is what the comparison reads from the store for the two
// periods (index 0 before, 1 after): per edge its totals over each period,
// per day the network's totals, and the before period's fixed speed bar.
type periodData struct {
	days    [2][]string
	window  regiongraph.WindowIndex // the scans' window
	summary *edgeTable
	// parts are the edges each period reads: with cut, each period's part
	// of the store (see periodParts), else the whole store, parts[0].
	parts   [2][]regiongraph.Edge
	cut     bool
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
// summaries and the bar speed over the pairs with at least the scan's
// minimum trips; the network's daily totals over every pair with trips
// are the store's day totals (totals). With
// the store cut into the periods' parts (see periodParts) the two parts
// are read at once, each into its own summaries, and these are then
// joined in the order of the parts in the store: the summaries' keys keep
// the order in which a pass over the store first sees them, and each
// period's sums are added in the store's order as before.
func readPeriods(parts [2][]regiongraph.Edge, cut bool, totals []regiongraph.DayTotal, window regiongraph.WindowIndex, sb, sa *Scan) *periodData {
	days := [2][]string{sb.Days, sa.Days}
	if !cut {
		r := newPeriodReader(days, maxRegion(parts[0]), window, sb)
		r.read(parts[0], -1)
		return r.finish(parts, cut, totals)
	}
	var maxIDs [2]int
	both(func(p int) { maxIDs[p] = maxRegion(parts[p]) })
	var rs [2]*periodReader
	both(func(p int) {
		rs[p] = newPeriodReader(days, max(maxIDs[0], maxIDs[1]), window, sb)
		rs[p].read(parts[p], p)
	})
	first, second := 0, 1
	if parts[1][0].Day < parts[0][0].Day {
		first, second = 1, 0
	}
	rs[first].join(rs[second], second)
	return rs[first].finish(parts, cut, totals)
}

// maxRegion returns the largest region id of edges, -1 when there are
// none or an id is negative (an edgeTable then uses its map).
func maxRegion(edges []regiongraph.Edge) int {
	maxID, minID := -1, 0
	for i := range edges {
		maxID = max(maxID, edges[i].From, edges[i].To)
		minID = min(minID, edges[i].From, edges[i].To)
	}
	if minID < 0 {
		return -1
	}
	return maxID
}

// speedTrips is an edge's median speed on a day and its trips.
type speedTrips struct{ speed, trips float64 }

// periodReader adds up edges of the store into periodData.
type periodReader struct {
	pd       *periodData
	look     *dayLookup
	window   regiongraph.WindowIndex
	minTrips int
	// daySpeeds holds, per before day, the speeds and trips of the
	// edges with at least minTrips trips, for the bar speed.
	daySpeeds [][]speedTrips
}

func newPeriodReader(days [2][]string, maxID int, window regiongraph.WindowIndex, sb *Scan) *periodReader {
	pd := &periodData{days: days, window: window, summary: newEdgeTable(maxID)}
	for p := range pd.network {
		pd.network[p] = make([]dayTotals, len(pd.days[p]))
	}
	return &periodReader{pd: pd, look: newDayLookup(days), window: window, minTrips: sb.Options.Skyline.MinTrips,
		daySpeeds: make([][]speedTrips, len(days[0]))}
}

// read adds up the edges of analysed days of period only (of either
// period when only is -1).
func (r *periodReader) read(edges []regiongraph.Edge, only int) {
	pd := r.pd
	for i := range edges {
		e := &edges[i]
		if !usable(e, r.window, r.minTrips) {
			continue
		}
		p, d, ok := r.look.find(e.Day)
		if !ok || only >= 0 && p != only {
			continue
		}
		s := pd.summary.add(EdgeKey{From: e.From, To: e.To})
		s.days[p]++
		s.trips[p] += float64(e.Trips)
		s.distanceSum[p] += e.DistanceSum
		s.straightSum[p] += e.StraightSum
		s.durationSum[p] += e.DurationSum
		if p == 0 {
			r.daySpeeds[d] = append(r.daySpeeds[d], speedTrips{e.SpeedMedian, float64(e.Trips)})
		}
	}
}

// join takes period p's summaries and (for the before period) day speeds
// from o, which read period p only. o's keys not yet in r's summaries are
// added after r's, in o's order.
func (r *periodReader) join(o *periodReader, p int) {
	for i, k := range o.pd.summary.keys {
		src, dst := &o.pd.summary.rows[i], r.pd.summary.add(k)
		dst.days[p] = src.days[p]
		dst.trips[p] = src.trips[p]
		dst.distanceSum[p] = src.distanceSum[p]
		dst.straightSum[p] = src.straightSum[p]
		dst.durationSum[p] = src.durationSum[p]
	}
	if p == 0 {
		r.daySpeeds = o.daySpeeds
	}
}

// finish sets the bar speed, the median over the before days of each
// day's trip-weighted median speed, and the network's daily totals of the
// window from the store's day totals, and returns the data read.
func (r *periodReader) finish(parts [2][]regiongraph.Edge, cut bool, totals []regiongraph.DayTotal) *periodData {
	// The network's totals count every pair with trips, however few:
	// with a minimum, a fall of demand would also drop the pairs near it
	// and overstate the fall.
	for _, t := range totals {
		if t.Window != r.window {
			continue
		}
		if p, d, ok := r.look.find(t.Day); ok {
			r.pd.network[p][d] = dayTotals{trips: float64(t.Trips), distanceSum: t.DistanceSum, durationSum: t.DurationSum}
		}
	}
	var medians []float64
	for _, v := range r.daySpeeds {
		if len(v) > 0 {
			medians = append(medians, weightedLowerMedian(v))
		}
	}
	r.pd.barSpeed = stats.Median(medians)
	r.pd.parts, r.pd.cut = parts, cut
	return r.pd
}

// weightedLowerMedian returns the trip-weighted lower median of the
// speeds: the least speed s such that the edges at s or slower carry at
// least half of the trips. It is the speed at which the running total of
// trips, in order of speed, first reaches half of all, found by
// selection in linear time rather than by sorting; v is reordered. v must
// not be empty, and the trips must be positive.
func weightedLowerMedian(v []speedTrips) float64 {
	var total float64
	for _, x := range v {
		total += x.trips
	}
	half := total / 2
	below := 0.0 // trips of the edges known to be slower than v[lo:hi]
	lo, hi := 0, len(v)
	for {
		pivot := v[lo+(hi-lo)/2].speed
		// Three-way partition of v[lo:hi]: slower, as fast, faster.
		lt, i, gt := lo, lo, hi
		var slower, same float64
		for i < gt {
			switch x := v[i]; {
			case x.speed < pivot:
				slower += x.trips
				v[lt], v[i] = v[i], v[lt]
				lt++
				i++
			case x.speed > pivot:
				gt--
				v[i], v[gt] = v[gt], v[i]
			default:
				same += x.trips
				i++
			}
		}
		switch {
		case below+slower >= half:
			hi = lt
		case below+slower+same >= half:
			return pivot
		default:
			below += slower + same
			lo = gt
		}
	}
}

// edgeDays reads the days of the given edges in both periods.
func (pd *periodData) edgeDays(minTrips int, keys map[EdgeKey]bool) [2]map[EdgeKey][]edgeDay {
	// The keys are found through an edgeTable (its square table for a
	// city's region ids), much quicker than the map for each of the
	// store's edges.
	maxID, minID := -1, 0
	for k := range keys {
		maxID, minID = max(maxID, k.From, k.To), min(minID, k.From, k.To)
	}
	if minID < 0 {
		maxID = -1 // the map
	}
	wanted := newEdgeTable(maxID)
	for k, ok := range keys {
		if ok {
			wanted.add(k)
		}
	}
	read := func(edges []regiongraph.Edge, only int) [2]map[EdgeKey][]edgeDay {
		out := [2]map[EdgeKey][]edgeDay{{}, {}}
		look := newDayLookup(pd.days)
		for i := range edges {
			e := &edges[i]
			k := EdgeKey{From: e.From, To: e.To}
			if wanted.find(k) == 0 || !usable(e, pd.window, minTrips) {
				continue
			}
			p, d, ok := look.find(e.Day)
			if !ok || only >= 0 && p != only {
				continue
			}
			out[p][k] = append(out[p][k], newEdgeDay(d, e))
		}
		return out
	}
	if !pd.cut {
		return read(pd.parts[0], -1)
	}
	var out [2]map[EdgeKey][]edgeDay
	both(func(p int) { out[p] = read(pd.parts[p], p)[p] })
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
