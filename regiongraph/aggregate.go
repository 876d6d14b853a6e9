package regiongraph

import (
	"cmp"
	"context"
	"math"
	"runtime"
	"slices"
	"strconv"
	"sync"
	"sync/atomic"

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

func makeBucketKey(day Day, windowRank uint8) bucketKey {
	return bucketKey(int64(day)<<8 | int64(windowRank))
}

func (k bucketKey) day() Day          { return Day(int64(k) >> 8) }
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
	visit      func(tr *trip, from, to int, day Day, window int) // when set, sees each used trip per window (ReadTrips, Options.KeepTrip)
	visitOnly  bool                                              // visit instead of aggregating (ReadTrips)

	// place, when set (Place), receives each row that passed the trip
	// checks, and each row that was given a duplicate-check key, instead
	// of the buckets and the row counts; placed is the used trip of the
	// row being counted (set by add), key the row's duplicate-check key
	// when keyed. placedRows counts the rows handed to place.
	place      func(*PlacedTrip)
	placed     PlacedTrip
	key        rowKey
	keyed      bool
	placedRows int64

	// Records past budget go to the spill file, bucket by bucket.
	held     int // records in memory
	budget   int
	tallies  int // of the ingest, sharing the duplicate tables' overrun
	spilled  map[bucketKey][]segment
	spillBuf []byte
	err      error // the first spill failure
}

func newTally(st *settings, loc *locator) *tally {
	budget := st.recordBudget
	if budget <= 0 {
		budget = math.MaxInt // no spill file
	}
	return &tally{st: st, loc: loc, zone: newZoneCache(st.loc), windowRank: windowRanks(st.windows),
		buckets: make(map[bucketKey]*dayRecords), last: make([]*dayRecords, len(st.windows)),
		rejected: make(map[Reason]int64), budget: budget, spilled: make(map[bucketKey][]segment)}
}

// spillAll writes every bucket's records to the spill file, a chunk
// (at most maxChunk records) at a time, and frees them.
func (t *tally) spillAll() {
	if t.err != nil {
		return
	}
	for key, d := range t.buckets {
		for _, c := range d.chunks {
			seg, err := t.st.spill.spillRecords(c, &t.spillBuf)
			if err != nil {
				t.err = err
				return
			}
			t.spilled[key] = append(t.spilled[key], seg)
		}
		delete(t.buckets, key)
	}
	clear(t.last)
	t.held = 0
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
	if t.place != nil {
		keyed := t.keyed
		t.keyed = false
		if r == reasonUsed || keyed {
			p := &t.placed
			if r != reasonUsed {
				*p = PlacedTrip{Day: t.key.day}
			}
			p.Rows, p.Outcome, p.Keyed = int32(n), r, keyed
			p.KeyID, p.KeyRow = 0, 0
			if keyed {
				p.KeyID, p.KeyRow = t.key.id, t.key.content
			}
			t.placedRows += n
			t.place(p)
			return
		}
	}
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
	if t.place != nil {
		var mask uint64
		for wi, w := range st.windows {
			if w.contains(minute) {
				mask |= 1 << wi
			}
		}
		if mask == 0 {
			return ReasonOutsideTimes
		}
		t.placed = PlacedTrip{Day: Day(day), Windows: mask, From: int32(t.loc.id(from)), To: int32(t.loc.id(to)),
			Distance: float32(tr.distance), Duration: float32(duration), Straight: float32(straight)}
		return reasonUsed
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
			t.visit(tr, from, to, Day(day), wi)
			if t.visitOnly {
				continue
			}
		}
		t.hold(Day(day), wi, rec)
	}
	if !in {
		return ReasonOutsideTimes
	}
	if t.held > t.budget || t.held > t.sharedBudget() {
		t.spillAll()
	}
	return reasonUsed
}

// sharedBudget is the records the tally may hold while the duplicate
// tables are over their share of the memory (input whose days are
// shuffled keeps every day's table): the overrun comes off the records,
// down to an eighth of the tally's budget.
func (t *tally) sharedBudget() int {
	seen := t.st.seen
	if seen == nil {
		return t.budget
	}
	over := seen.over.Load()
	if over == 0 {
		return t.budget
	}
	return max(t.budget/8, t.budget-int(over/recordBytes)/max(1, t.tallies))
}

// hold keeps rec in the bucket of day and window wi.
func (t *tally) hold(day Day, wi int, rec record) {
	key := makeBucketKey(day, t.windowRank[wi])
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
	t.held++
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

// finish combines the tallies into sorted edges, handed to sink a day and
// window at a time, and returns the quality counts. Day by day, it gathers
// the day's records (from memory and the spill file), sorts them by pair,
// and reads each edge's count, sums and quantiles; the records are
// released as they are used. sink must not keep the slice it is given.
//
// begin is called with the quality counts before the first edge; it
// returns the sink, or an error that ends finish.
func finish(ctx context.Context, st *settings, loc *locator, tallies []*tally, begin func(Quality) (func([]Edge) error, error)) (Quality, error) {
	for _, t := range tallies {
		if t.err != nil {
			return Quality{}, t.err
		}
	}
	q, parts, spilled := gather(tallies)
	sink, err := begin(q)
	if err != nil {
		return q, err
	}
	keys := make([]bucketKey, 0, len(parts)+len(spilled))
	for key := range parts {
		keys = append(keys, key)
	}
	for key := range spilled {
		if _, ok := parts[key]; !ok {
			keys = append(keys, key)
		}
	}
	slices.Sort(keys)
	byRank := make([]WindowIndex, len(st.windows))
	for wi, r := range windowRanks(st.windows) {
		byRank[r] = WindowIndex(wi)
	}
	b := &buckets{loc: loc, parts: parts, spilled: spilled, spill: st.spill, keys: keys}
	err = b.edges(ctx, func(k bucketKey, i int) (Day, WindowIndex) {
		return k.day(), byRank[k.windowRank()]
	}, sink)
	return q, err
}

// finishEdges is finish collecting the edges in memory.
func finishEdges(ctx context.Context, st *settings, loc *locator, tallies []*tally) ([]Edge, Quality, error) {
	var edges []Edge
	q, err := finish(ctx, st, loc, tallies, func(Quality) (func([]Edge) error, error) {
		return func(es []Edge) error { edges = append(edges, es...); return nil }, nil
	})
	return edges, q, err
}

// gather sums the tallies' row counts and collects their records by
// bucket, in memory and spilled; the tallies give their records up.
func gather(tallies []*tally) (Quality, map[bucketKey][]*dayRecords, map[bucketKey][]segment) {
	q := Quality{Rejected: make(map[string]int64)}
	for _, r := range RejectReasons() {
		q.Rejected[string(r)] = 0
	}
	parts := make(map[bucketKey][]*dayRecords)
	spilled := make(map[bucketKey][]segment)
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
		for key, segs := range t.spilled {
			spilled[key] = append(spilled[key], segs...)
		}
		t.buckets, t.last, t.spilled = nil, nil, nil
	}
	return q, parts, spilled
}

// buckets are the records of an ingest by day and window, in memory and
// in the spill file, with their keys sorted.
type buckets struct {
	loc     *locator
	parts   map[bucketKey][]*dayRecords
	spilled map[bucketKey][]segment
	spill   *spillFile
	keys    []bucketKey
}

// size returns the records of bucket k.
func (b *buckets) size(k bucketKey) int {
	n := 0
	for _, part := range b.parts[k] {
		for _, c := range part.chunks {
			n += len(c)
		}
	}
	for _, seg := range b.spilled[k] {
		n += seg.n
	}
	return n
}

// edges hands the edges of the buckets to sink in bucket order, named by
// names(key, index). Buckets are independent: a few goroutines take them
// in turn while sink (the Parquet writer, with its compression) takes the
// finished ones in order.
func (b *buckets) edges(ctx context.Context, names func(k bucketKey, i int) (Day, WindowIndex), sink func([]Edge) error) error {
	largest := 0
	for _, k := range b.keys {
		largest = max(largest, b.size(k))
	}
	type bucketResult struct {
		i     int
		edges []Edge
		err   error
	}
	workers := max(1, min(runtime.GOMAXPROCS(0), maxParsers, len(b.keys)))
	next := make(chan int)
	// Unbuffered: a finished bucket waits for the sink (the writer is
	// the slower) rather than add to the edges held.
	results := make(chan bucketResult)
	spare := make(chan []Edge, workers) // buffers handed back once sunk
	var stopped atomic.Bool
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			// Sized once for the largest bucket: growing them would leave
			// garbage while the records are still held.
			buf := make([]record, 0, largest)
			var tmp []record
			if largest >= radixMin {
				tmp = make([]record, largest)
			}
			var scratch []float32
			var raw []byte
			for i := range next {
				buf = buf[:0]
				var err error
				for _, part := range b.parts[b.keys[i]] {
					for _, c := range part.chunks {
						buf = append(buf, c...)
					}
					part.chunks = nil
				}
				for _, seg := range b.spilled[b.keys[i]] {
					if buf, err = b.spill.appendRecords(buf, seg, &raw); err != nil {
						break
					}
				}
				var es []Edge
				if err == nil {
					tmp = sortByPair(buf, tmp, len(b.loc.regions))
					select {
					case es = <-spare:
					default:
					}
					// Sized for the bucket's pairs: grown by appending,
					// a day of a city's edges would leave a third more
					// than it holds, and garbage.
					if pairs := countPairs(buf); cap(es) < pairs {
						es = make([]Edge, 0, pairs)
					}
					day, window := names(b.keys[i], i)
					es, scratch = bucketEdges(es[:0], day, window, buf, b.loc, scratch)
				}
				results <- bucketResult{i, es, err}
			}
		}()
	}
	go func() {
		defer close(next)
		for i := range b.keys {
			if stopped.Load() {
				return
			}
			next <- i
		}
	}()
	go func() {
		wg.Wait()
		close(results)
	}()
	var first error
	pending := make(map[int]bucketResult)
	want := 0
	for r := range results {
		if first != nil {
			continue // draining after a failure
		}
		pending[r.i] = r
		for p, ok := pending[want]; ok; p, ok = pending[want] {
			delete(pending, want)
			want++
			if first = p.err; first == nil {
				first = ctx.Err()
			}
			if first == nil {
				first = sink(p.edges)
			}
			if first != nil {
				stopped.Store(true)
				break
			}
			select {
			case spare <- p.edges[:0]:
			default:
			}
		}
	}
	return first
}

// countPairs returns the number of region pairs of records sorted by pair.
func countPairs(recs []record) int {
	n := 0
	for i := range recs {
		if i == 0 || recs[i].pair != recs[i-1].pair {
			n++
		}
	}
	return n
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
func bucketEdges(edges []Edge, day Day, window WindowIndex, recs []record, loc *locator, scratch []float32) ([]Edge, []float32) {
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
