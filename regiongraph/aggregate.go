package regiongraph

import (
	"cmp"
	"math"
	"runtime"
	"slices"
	"sync"
)

// record is one trip in one window, kept until the end of the ingest for
// the exact quantiles. Regions are locator indexes (ascending with the
// region ids), the window is its rank by name, so that sorting records by
// (window, pair) gives the store's edge order within a day. float32 values
// (relative rounding at most 6e-8) keep 10 million trips in 200 MB.
type record struct {
	pair     uint32 // from index << 16 | to index
	distance float32
	duration float32
	straight float32
	window   uint8
}

// dayRecords holds one local day's records in chunks that are never
// reallocated (appending does not copy, and a chunk is freed as a whole).
type dayRecords struct {
	day    int32 // days since 1970-01-01 of the local calendar
	chunks [][]record
}

const (
	firstChunk = 256
	maxChunk   = 1 << 16
)

func (d *dayRecords) add(r record) {
	n := len(d.chunks)
	if n == 0 || len(d.chunks[n-1]) == cap(d.chunks[n-1]) {
		size := firstChunk
		if n > 0 {
			size = min(2*cap(d.chunks[n-1]), maxChunk)
		}
		d.chunks = append(d.chunks, make([]record, 0, size))
		n++
	}
	d.chunks[n-1] = append(d.chunks[n-1], r)
}

// tally is the state of one reader goroutine: trip records by day and row
// counts. Tallies of parallel readers are combined by finish.
type tally struct {
	st         *settings
	loc        *locator
	zone       *zoneCache
	windowRank []uint8 // window index -> rank by name
	days       map[int32]*dayRecords
	last       *dayRecords // trips mostly come in time order
	read       int64
	used       int64
	reasons    [numReasons]int64
}

func newTally(st *settings, loc *locator) *tally {
	return &tally{st: st, loc: loc, zone: newZoneCache(st.loc), windowRank: windowRanks(st.windows),
		days: make(map[int32]*dayRecords)}
}

// windowRanks orders windows by name, the order of edges in the store.
func windowRanks(windows []Window) []uint8 {
	order := make([]int, len(windows))
	for i := range order {
		order[i] = i
	}
	slices.SortFunc(order, func(a, b int) int { return cmp.Compare(windows[a].Name, windows[b].Name) })
	rank := make([]uint8, len(windows))
	for r, wi := range order {
		rank[wi] = uint8(r)
	}
	return rank
}

// count books n rows under r.
func (t *tally) count(r reason, n int64) {
	t.read += n
	if r == reasonUsed {
		t.used += n
	} else {
		t.reasons[r] += n
	}
}

// trip is a parsed trip ready for the checks.
type trip struct {
	startMS, endMS int64
	origin, dest   [2]float64 // lon, lat
	distance       float64    // metres of travel
	jump           bool       // a step between points faster than MaxJumpKMH
}

// add runs the trip checks in the order of RejectReasons, and aggregates the
// trip when it passes. It returns the row's outcome; the caller counts rows.
func (t *tally) add(tr *trip) reason {
	st := t.st
	from := t.loc.locate(tr.origin)
	if from == 0 {
		return rOutside
	}
	to := t.loc.locate(tr.dest)
	if to == 0 {
		return rOutside
	}
	if from == to {
		return rIntraRegion
	}
	straight := GreatCircleMetres(tr.origin, tr.dest)
	if straight < st.minStraight {
		return rShortTrip
	}
	duration := float64(tr.endMS-tr.startMS) / 1000
	if !(duration > 0) || duration > st.maxDurationS {
		return rBadDuration
	}
	if tr.jump {
		return rGPSJump
	}
	speed := tr.distance / duration
	if !(speed >= st.minSpeed && speed <= st.maxSpeed) {
		return rBadSpeed
	}
	if !(tr.distance/straight >= st.minDetour) {
		return rDetourFloor
	}
	local := t.zone.local(floorDiv(tr.startMS, 1000))
	day := floorDiv(local, 86400)
	minute := int((local - day*86400) / 60)
	if day < math.MinInt32 || day > math.MaxInt32 {
		return rUnparseable
	}
	d := t.last
	if d == nil || d.day != int32(day) {
		d = t.days[int32(day)]
		if d == nil {
			d = &dayRecords{day: int32(day)}
			t.days[int32(day)] = d
		}
		t.last = d
	}
	in := false
	rec := record{pair: uint32(from)<<16 | uint32(to),
		distance: float32(tr.distance), duration: float32(duration), straight: float32(straight)}
	for wi, w := range st.windows {
		if w.contains(minute) {
			in = true
			rec.window = t.windowRank[wi]
			d.add(rec)
		}
	}
	if !in {
		return rOutsideTimes
	}
	return reasonUsed
}

// quantile returns the p-quantile of sorted values by linear interpolation
// between closest ranks (Hyndman-Fan type 7, the default of R and NumPy):
// h = (n-1)p, q = x[floor h] + (h - floor h)(x[floor h + 1] - x[floor h]).
func quantile(sorted []float32, p float64) float64 {
	n := len(sorted)
	if n == 0 {
		return math.NaN()
	}
	h := float64(n-1) * p
	lo := int(h)
	if lo >= n-1 {
		return float64(sorted[n-1])
	}
	frac := h - float64(lo)
	a, b := float64(sorted[lo]), float64(sorted[lo+1])
	return a + frac*(b-a)
}

// finish combines the tallies into sorted edges and the quality counts. Day
// by day, it gathers the day's records, sorts them by window and pair, and
// reads each edge's count, sums and quantiles; the tallies' records are
// released as they are used.
func finish(st *settings, loc *locator, tallies []*tally) ([]Edge, Quality) {
	q := Quality{Rejected: make(map[string]int64)}
	for _, r := range RejectReasons() {
		q.Rejected[r] = 0
	}
	dayParts := make(map[int32][]*dayRecords)
	for _, t := range tallies {
		q.Read += t.read
		q.Used += t.used
		for r, n := range t.reasons {
			q.Rejected[reason(r).String()] += n
		}
		for day, d := range t.days {
			dayParts[day] = append(dayParts[day], d)
		}
		t.days, t.last = nil, nil
	}
	days := make([]int32, 0, len(dayParts))
	for day := range dayParts {
		days = append(days, day)
	}
	slices.Sort(days)
	byRank := make([]string, len(st.windows))
	for wi, r := range windowRanks(st.windows) {
		byRank[r] = st.windows[wi].Name
	}

	// Days are independent: a few goroutines take them in turn.
	results := make([][]Edge, len(days))
	workers := max(1, min(runtime.GOMAXPROCS(0), maxParsers, len(days)))
	next := make(chan int)
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			var buf []record
			var scratch []float32
			for i := range next {
				buf = buf[:0]
				for _, part := range dayParts[days[i]] {
					for _, c := range part.chunks {
						buf = append(buf, c...)
					}
					part.chunks = nil
				}
				results[i], scratch = dayEdges(dayString(int64(days[i])), buf, byRank, loc, scratch)
			}
		}()
	}
	for i := range days {
		next <- i
	}
	close(next)
	wg.Wait()
	var n int
	for _, r := range results {
		n += len(r)
	}
	edges := make([]Edge, 0, n)
	for _, r := range results {
		edges = append(edges, r...)
	}
	return edges, q
}

func recordKey(r *record) uint64 { return uint64(r.window)<<32 | uint64(r.pair) }

// dayEdges turns one day's records into its edges, in window and pair order.
func dayEdges(day string, recs []record, windowNames []string, loc *locator, scratch []float32) ([]Edge, []float32) {
	slices.SortFunc(recs, func(a, b record) int { return cmp.Compare(recordKey(&a), recordKey(&b)) })
	var edges []Edge
	for start := 0; start < len(recs); {
		key := recordKey(&recs[start])
		end := start + 1
		for end < len(recs) && recordKey(&recs[end]) == key {
			end++
		}
		group := recs[start:end]
		r0 := &group[0]
		e := Edge{Day: day, Window: windowNames[r0.window],
			From: loc.regions[r0.pair>>16-1].id, To: loc.regions[r0.pair&0xffff-1].id, Trips: len(group)}
		// Sums in integer millimetres and milliseconds: exact, and
		// independent of the order of the trips.
		var distMM, straightMM, durMS int64
		for i := range group {
			distMM += int64(math.Round(float64(group[i].distance) * 1000))
			straightMM += int64(math.Round(float64(group[i].straight) * 1000))
			durMS += int64(math.Round(float64(group[i].duration) * 1000))
		}
		e.DistanceSum, e.StraightSum, e.DurationSum = float64(distMM)/1000, float64(straightMM)/1000, float64(durMS)/1000
		scratch = slices.Grow(scratch[:0], len(group))[:len(group)]
		for m := 0; m < 4; m++ {
			for i := range group {
				r := &group[i]
				switch m {
				case 0:
					scratch[i] = float32(float64(r.distance) / float64(r.duration))
				case 1:
					scratch[i] = float32(float64(r.distance) / float64(r.straight))
				case 2:
					scratch[i] = r.distance
				case 3:
					scratch[i] = r.duration
				}
			}
			slices.Sort(scratch)
			switch m {
			case 0:
				e.SpeedP25, e.SpeedMedian, e.SpeedP75 = quantile(scratch, 0.25), quantile(scratch, 0.5), quantile(scratch, 0.75)
			case 1:
				e.DetourP25, e.DetourMedian, e.DetourP75 = quantile(scratch, 0.25), quantile(scratch, 0.5), quantile(scratch, 0.75)
			case 2:
				e.DistanceMedian = quantile(scratch, 0.5)
			case 3:
				e.DurationMedian = quantile(scratch, 0.5)
			}
		}
		edges = append(edges, e)
		start = end
	}
	return edges, scratch
}
