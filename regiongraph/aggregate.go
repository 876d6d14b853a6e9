package regiongraph

import (
	"cmp"
	"math"
	"runtime"
	"slices"
	"strconv"

	"narrows/partition/geodesy"
)

// record is one trip in one window, kept until the end of the ingest for
// the exact quantiles. Regions are locator indexes (ascending with the
// region ids), so that sorting records by pair gives the store's edge order.
// float32 values (relative rounding at most 6e-8) keep 10 million trips in
// 160 MB.
type record struct {
	pair     uint32 // from index << 16 | to index
	distance float32
	duration float32
	straight float32
}

// bucketKey packs a local day (days since 1970-01-01 of the local calendar)
// and a window rank (by name): ascending keys are the store's edge order.
type bucketKey int64

func makeBucketKey(day int32, windowRank uint8) bucketKey {
	return bucketKey(int64(day)<<8 | int64(windowRank))
}

func (k bucketKey) day() int32        { return int32(int64(k) >> 8) }
func (k bucketKey) windowRank() uint8 { return uint8(k & 0xff) }

// dayRecords holds the records of one day and window in chunks that are
// never reallocated (appending does not copy, and a chunk is freed whole).
type dayRecords struct {
	key    bucketKey
	chunks [][]record
}

const (
	firstChunk = 256
	maxChunk   = 1 << 14 // 256 KB: the unfilled tail of each bucket stays small
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
	buckets    map[bucketKey]*dayRecords
	last       []*dayRecords // by window index: trips mostly come in time order
	read       int64
	used       int64
	rejected   map[Reason]int64
	visit      func(tr *trip, from, to int, day int32, window int) // when set, sees each used trip per window (ReadTrips)
}

func newTally(st *settings, loc *locator) *tally {
	return &tally{st: st, loc: loc, zone: newZoneCache(st.loc), windowRank: windowRanks(st.windows),
		buckets: make(map[bucketKey]*dayRecords), last: make([]*dayRecords, len(st.windows)),
		rejected: make(map[Reason]int64)}
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
func (t *tally) count(r Reason, n int64) {
	t.read += n
	if r == reasonUsed {
		t.used += n
	} else {
		t.rejected[r] += n
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
func (t *tally) add(tr *trip) Reason {
	st := t.st
	if !st.plausible(tr.startMS) || !st.plausible(tr.endMS) {
		return ReasonImplausibleTime // CSV readers check it per field; Parquet and GPX here
	}
	from := t.loc.locate(tr.origin)
	if from == 0 {
		return ReasonOutside
	}
	to := t.loc.locate(tr.dest)
	if to == 0 {
		return ReasonOutside
	}
	if from == to {
		return ReasonIntraRegion
	}
	straight := geodesy.GreatCircleMetres(tr.origin, tr.dest)
	if straight < st.minStraight {
		return ReasonShortTrip
	}
	duration := float64(tr.endMS-tr.startMS) / 1000
	if !(duration > 0) || duration > st.maxDurationS {
		return ReasonBadDuration
	}
	if tr.jump {
		return ReasonGPSJump
	}
	speed := tr.distance / duration
	if !(speed >= st.minSpeed && speed <= st.maxSpeed) {
		return ReasonBadSpeed
	}
	if !(tr.distance/straight >= st.minDetour) {
		return ReasonDetourFloor
	}
	local := t.zone.local(floorDiv(tr.startMS, 1000))
	day := floorDiv(local, 86400)
	minute := int((local - day*86400) / 60)
	if day < math.MinInt32 || day > math.MaxInt32 {
		return ReasonUnparseable
	}
	in := false
	rec := record{pair: uint32(from)<<16 | uint32(to),
		distance: float32(tr.distance), duration: float32(duration), straight: float32(straight)}
	for wi, w := range st.windows {
		if !w.contains(minute) {
			continue
		}
		in = true
		if t.visit != nil {
			t.visit(tr, from, to, int32(day), wi)
			continue
		}
		key := makeBucketKey(int32(day), t.windowRank[wi])
		d := t.last[wi]
		if d == nil || d.key != key {
			d = t.buckets[key]
			if d == nil {
				d = &dayRecords{key: key}
				t.buckets[key] = d
			}
			t.last[wi] = d
		}
		d.add(rec)
	}
	if !in {
		return ReasonOutsideTimes
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

// decimal32 widens a float32 to the float64 of its shortest decimal form, so
// that a stored 6550.4 m reads back as 6550.4, not 6550.39990234375.
func decimal32(f float32) float64 {
	var buf [32]byte
	v, err := strconv.ParseFloat(bytesString(strconv.AppendFloat(buf[:0], float64(f), 'g', -1, 32)), 64)
	if err != nil {
		return float64(f)
	}
	return v
}

// medianDecimal is the type-7 median of sorted values read through
// decimal32: distances and durations are given in decimal, and an edge's
// median is usually one of them (or halfway between two).
func medianDecimal(sorted []float32) float64 {
	n := len(sorted)
	if n == 0 {
		return math.NaN()
	}
	if n%2 == 1 {
		return decimal32(sorted[n/2])
	}
	a, b := decimal32(sorted[n/2-1]), decimal32(sorted[n/2])
	return a + 0.5*(b-a)
}

// finish combines the tallies into sorted edges and the quality counts. Day
// by day, it gathers the day's records, sorts them by window and pair, and
// reads each edge's count, sums and quantiles; the tallies' records are
// released as they are used.
func finish(st *settings, loc *locator, tallies []*tally) ([]Edge, Quality) {
	q, parts := gather(tallies)
	keys := make([]bucketKey, 0, len(parts))
	for key := range parts {
		keys = append(keys, key)
	}
	slices.Sort(keys)
	byRank := make([]string, len(st.windows))
	for wi, r := range windowRanks(st.windows) {
		byRank[r] = st.windows[wi].Name
	}
	// Day strings, shared by a day's edges.
	dayNames := make([]string, len(keys))
	for i, k := range keys {
		if i > 0 && keys[i-1].day() == k.day() {
			dayNames[i] = dayNames[i-1]
		} else {
			dayNames[i] = dayString(int64(k.day()))
		}
	}
	edges := bucketsToEdges(loc, parts, keys, func(k bucketKey, i int) (string, string) {
		return dayNames[i], byRank[k.windowRank()]
	})
	return edges, q
}

// gather sums the tallies' row counts and collects their records by
// bucket; the tallies give their records up.
func gather(tallies []*tally) (Quality, map[bucketKey][]*dayRecords) {
	q := Quality{Rejected: make(map[string]int64)}
	for _, r := range RejectReasons() {
		q.Rejected[string(r)] = 0
	}
	parts := make(map[bucketKey][]*dayRecords)
	for _, t := range tallies {
		q.Read += t.read
		q.Used += t.used
		q.OffsetTimes += t.zone.offsetTimes
		q.OffsetMismatch += t.zone.offsetMismatch
		for r, n := range t.rejected {
			q.Rejected[string(r)] += n
		}
		for key, d := range t.buckets {
			parts[key] = append(parts[key], d)
		}
		t.buckets, t.last = nil, nil
	}
	return q, parts
}

// bucketsToEdges returns the edges of the buckets keys (sorted), named by
// names(key, index). Buckets are independent: a few goroutines take them
// in turn, and their edges are appended in bucket order as they come.
func bucketsToEdges(loc *locator, parts map[bucketKey][]*dayRecords, keys []bucketKey, names func(k bucketKey, i int) (day, window string)) []Edge {
	capacity, largest := edgeCapacity(parts, keys, len(loc.regions))
	edges := make([]Edge, 0, capacity)

	type bucketResult struct {
		i     int
		edges []Edge
	}
	workers := max(1, min(runtime.GOMAXPROCS(0), maxParsers, len(keys)))
	next := make(chan int)
	results := make(chan bucketResult, workers)
	spare := make(chan []Edge, 2*workers) // buffers handed back once copied into edges
	for w := 0; w < workers; w++ {
		go func() {
			// Sized once for the largest bucket: growing them would leave
			// garbage while the records are still held.
			buf := make([]record, 0, largest)
			var tmp []record
			if largest >= radixMin {
				tmp = make([]record, largest)
			}
			var scratch []float32
			for i := range next {
				buf = buf[:0]
				for _, part := range parts[keys[i]] {
					for _, c := range part.chunks {
						buf = append(buf, c...)
					}
					part.chunks = nil
				}
				tmp = sortByPair(buf, tmp, len(loc.regions))
				var es []Edge
				select {
				case es = <-spare:
				default:
				}
				day, window := names(keys[i], i)
				es, scratch = bucketEdges(es[:0], day, window, buf, loc, scratch)
				results <- bucketResult{i, es}
			}
		}()
	}
	go func() {
		for i := range keys {
			next <- i
		}
		close(next)
	}()
	pending := make(map[int][]Edge)
	for want, got := 0, 0; got < len(keys); got++ {
		r := <-results
		pending[r.i] = r.edges
		for es, ok := pending[want]; ok; es, ok = pending[want] {
			edges = append(edges, es...)
			delete(pending, want)
			want++
			select {
			case spare <- es[:0]:
			default:
			}
		}
	}
	return edges
}

// edgeCapacity returns the most edges the buckets can give and the records
// of the largest bucket. A bucket gives at most one edge per record and per
// region pair; sizing the result up front avoids a second copy of the
// edges.
func edgeCapacity(parts map[bucketKey][]*dayRecords, keys []bucketKey, regions int) (capacity, largest int) {
	pairs := regions * (regions - 1)
	for _, k := range keys {
		n := 0
		for _, part := range parts[k] {
			for _, c := range part.chunks {
				n += len(c)
			}
		}
		capacity += min(n, pairs)
		largest = max(largest, n)
	}
	return capacity, largest
}

// radixMin is the least bucket size sorted by radix.
const radixMin = 4096

// sortByPair sorts records by region pair: a two-pass radix sort (destination
// index, then origin index) for large buckets, pdqsort for small ones. tmp is
// scratch space, returned for reuse.
func sortByPair(recs, tmp []record, regions int) []record {
	if len(recs) < radixMin {
		slices.SortFunc(recs, func(a, b record) int { return cmp.Compare(a.pair, b.pair) })
		return tmp
	}
	tmp = slices.Grow(tmp[:0], len(recs))[:len(recs)]
	counts := make([]int, regions+2)
	pass := func(src, dst []record, digit func(uint32) uint32) {
		clear(counts)
		for i := range src {
			counts[digit(src[i].pair)+1]++
		}
		for i := 1; i < len(counts); i++ {
			counts[i] += counts[i-1]
		}
		for i := range src {
			d := digit(src[i].pair)
			dst[counts[d]] = src[i]
			counts[d]++
		}
	}
	pass(recs, tmp, func(p uint32) uint32 { return p & 0xffff })
	pass(tmp, recs, func(p uint32) uint32 { return p >> 16 })
	return tmp
}

// bucketEdges appends the edges of one day and window to edges, from its
// records sorted by pair.
func bucketEdges(edges []Edge, day, window string, recs []record, loc *locator, scratch []float32) ([]Edge, []float32) {
	for start := 0; start < len(recs); {
		end := start + 1
		for end < len(recs) && recs[end].pair == recs[start].pair {
			end++
		}
		group := recs[start:end]
		r0 := &group[0]
		e := Edge{Day: day, Window: window,
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
				e.DistanceMedian = medianDecimal(scratch)
			case 3:
				e.DurationMedian = medianDecimal(scratch)
			}
		}
		edges = append(edges, e)
		start = end
	}
	return edges, scratch
}
