package regiongraph

import (
	"context"
	"fmt"
	"math"
	"strconv"
	"sync"
	"sync/atomic"
	"time"

	"narrows/partition/geodesy"
)

// tripColumns are the field indexes of the trip table columns.
type tripColumns struct {
	idx  [7]int // start_time, end_time, start_lon, start_lat, end_lon, end_lat, distance
	need int    // fields a row must have
}

var tripRequired = []string{colStartTime, colEndTime, colStartLon, colStartLat, colEndLon, colEndLat, colDistance}

func newTripColumns(m map[string]int) tripColumns {
	var c tripColumns
	for i, name := range tripRequired {
		c.idx[i] = m[name]
		c.need = max(c.need, m[name]+1)
	}
	return c
}

// parseTripFields fills tr from the fields of a trip table row. On failure it
// returns the reason and the logical column at fault.
func parseTripFields(st *settings, z *zoneCache, c *tripColumns, fields [][]byte, tr *trip) (Reason, string) {
	if len(fields) < c.need {
		for i, name := range tripRequired {
			if c.idx[i] >= len(fields) {
				return ReasonMissingField, name
			}
		}
	}
	for i, name := range tripRequired {
		if len(fields[c.idx[i]]) == 0 {
			return ReasonMissingField, name
		}
	}
	var err error
	if tr.startMS, err = parseTime(fields[c.idx[0]], z); err != nil {
		return timeReason(err), colStartTime
	}
	if tr.endMS, err = parseTime(fields[c.idx[1]], z); err != nil {
		return timeReason(err), colEndTime
	}
	if !st.plausible(tr.startMS) {
		return ReasonImplausibleTime, colStartTime
	}
	if !st.plausible(tr.endMS) {
		return ReasonImplausibleTime, colEndTime
	}
	var v [5]float64
	for k := 0; k < 5; k++ {
		f, err := parseFloat(fields[c.idx[2+k]])
		if err != nil {
			return ReasonUnparseable, tripRequired[2+k]
		}
		v[k] = f
	}
	return tr.setPlaces(st, v)
}

// setPlaces checks a trip row's origin longitude and latitude,
// destination longitude and latitude and distance, in that order, and sets
// them on tr; shared by the CSV and Parquet readers.
func (tr *trip) setPlaces(st *settings, v [5]float64) (Reason, string) {
	for k, limit := range [4]float64{180, 90, 180, 90} {
		if v[k] < -limit || v[k] > limit {
			return ReasonUnparseable, tripRequired[2+k]
		}
	}
	if v[4] < 0 {
		return ReasonUnparseable, colDistance
	}
	tr.origin = [2]float64{v[0], v[1]}
	tr.dest = [2]float64{v[2], v[3]}
	tr.distance = v[4] * st.distanceScale
	tr.jump = false
	return reasonUsed, ""
}

// explain says what a parsed trip's failed check measured, for strict mode
// messages; "" for a reason without measure.
func explain(st *settings, tr *trip, r Reason) string {
	straight := geodesy.GreatCircleMetres(tr.origin, tr.dest)
	duration := float64(tr.endMS-tr.startMS) / 1000
	switch r {
	case ReasonShortTrip:
		return fmt.Sprintf("origin-destination %.0f m, under %g m", straight, st.minStraight)
	case ReasonBadDuration:
		return fmt.Sprintf("%g s (want more than 0 and at most %v)", duration, st.opts.MaxDuration)
	case ReasonBadSpeed:
		return fmt.Sprintf("%s km/h (allowed %g-%g km/h)", shortNumber(tr.distance/duration*3.6), st.opts.MinSpeedKMH, st.opts.MaxSpeedKMH)
	case ReasonDetourFloor:
		return fmt.Sprintf("distance %s m over straight line %.0f m is %.3f, under %g", shortNumber(tr.distance), straight, tr.distance/straight, st.minDetour)
	case ReasonGPSJump:
		return fmt.Sprintf("a step between points faster than %g km/h", st.opts.MaxJumpKMH)
	}
	return ""
}

// timeReason is the reason of a time that parseTime refused.
func timeReason(err error) Reason {
	switch err {
	case errDSTGap:
		return ReasonDSTGap
	case errDSTOverlap:
		return ReasonDSTOverlap
	}
	return ReasonUnparseable
}

// plausible reports whether a time (Unix milliseconds) lies in the span
// of EarliestTime and LatestTime.
func (st *settings) plausible(ms int64) bool { return ms >= st.earliestMS && ms <= st.latestMS }

// timeDetail says why a time was refused, for strict mode messages.
func (st *settings) timeDetail(r Reason) string {
	switch r {
	case ReasonDSTGap:
		return "the clocks skip this local time in " + st.opts.TimeZone + "; give an offset or UTC"
	case ReasonDSTOverlap:
		return "the clocks show this local time twice in " + st.opts.TimeZone + "; give an offset or UTC"
	case ReasonImplausibleTime:
		to := "the ingest's day + 1"
		if !st.opts.LatestTime.IsZero() {
			to = st.opts.LatestTime.UTC().Format(time.RFC3339)
		}
		from := "any time"
		if !st.opts.EarliestTime.IsZero() {
			from = st.opts.EarliestTime.UTC().Format(time.RFC3339)
		}
		return "plausible times are " + from + " to " + to + " (EarliestTime, LatestTime)"
	}
	return ""
}

// shortNumber formats a measured value for a message: two decimals, or
// four significant digits when it is so large that a file's typo (a
// hundred-digit distance) would fill the screen.
func shortNumber(v float64) string {
	if math.Abs(v) < 1e7 {
		return strconv.FormatFloat(v, 'f', 2, 64)
	}
	return strconv.FormatFloat(v, 'g', 4, 64)
}

// fieldFault is the fault of a trip table row whose column col failed to
// parse or check (r is a reason of the row's fields).
func fieldFault(st *settings, r Reason, col string, fields [][]byte, c *tripColumns) fault {
	f := fault{reason: r, column: col, detail: st.timeDetail(r)}
	if r == ReasonMissingField {
		return f
	}
	for i, name := range tripRequired {
		if name == col && c.idx[i] < len(fields) {
			f.value = string(fields[c.idx[i]])
		}
	}
	return f
}

// ingestTripCSV reads a trip table CSV with one parser goroutine per tally.
func ingestTripCSV(ctx context.Context, st *settings, c *csvFile, tallies []*tally, progress func(int64)) (string, error) {
	m, err := c.requireColumns(st, tripRequired, []string{colTripID})
	if err != nil {
		return "", err
	}
	cols := newTripColumns(m)
	ctx, cancel := context.WithCancel(ctx)
	defer cancel()

	workers := len(tallies)
	free := make(chan []byte, 2*workers+2)
	for i := 0; i < cap(free); i++ {
		free <- make([]byte, chunkSize)
	}
	var stopSeq atomic.Int64
	stopSeq.Store(1<<62 - 1)
	k := &chunker{src: c.br, hash: newHash(), free: free, out: make(chan chunk, workers),
		limits: st.quoteLimits(), progress: progress, stop: func(seq int64) bool { return seq > stopSeq.Load() }}
	r := &tripReader{st: st, file: c.path, cols: cols, idCol: m[colTripID], order: newTurnstile()}

	var mu sync.Mutex
	var first firstFault
	fail := func(seq int64, e *RowError) {
		mu.Lock()
		defer mu.Unlock()
		first.keep(seq, e)
		for {
			cur := stopSeq.Load()
			if seq >= cur || stopSeq.CompareAndSwap(cur, seq) {
				break
			}
		}
	}

	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func(t *tally) {
			defer wg.Done()
			var w tripWorker
			w.fields = make([][]byte, 0, len(c.header))
			for ch := range k.out {
				if e := r.chunk(t, &w, ch, ch.seq <= stopSeq.Load()); e != nil {
					fail(ch.seq, e)
				}
				free <- ch.buf[:0]
			}
		}(tallies[w])
	}
	runErr := k.run(ctx)
	if runErr != nil {
		cancel()
	}
	// The chunker closed its output: the parsers drain it and stop.
	wg.Wait()
	if first.err != nil {
		return "", first.err
	}
	if runErr != nil {
		if ctx.Err() != nil && runErr == ctx.Err() {
			return "", runErr
		}
		return "", fmt.Errorf("regiongraph: %s: %w", c.path, runErr)
	}
	return hexSum(k.hash), nil
}

// tripReader reads the chunks of one trip table CSV.
type tripReader struct {
	st    *settings
	file  string
	cols  tripColumns
	idCol int // field of trip_id, -1 without
	order *turnstile
}

// tripWorker is one reader goroutine's scratch space.
type tripWorker struct {
	fields [][]byte
	buf    []byte
	rows   []parsedTrip
}

// parsedTrip is a row of a chunk between parsing and tallying.
type parsedTrip struct {
	line   int64
	reason Reason // reasonUsed when the row parsed
	fault  *RowError
	key    rowKey
	tr     trip
}

// chunk parses the rows of ch, lets the row set judge repeats in file
// order, and tallies the rows. wanted is false for a chunk after a strict
// run's first fault, which only passes the turnstile. In strict mode it
// returns the first row with bad data.
func (r *tripReader) chunk(t *tally, w *tripWorker, ch chunk, wanted bool) *RowError {
	st := r.st
	w.rows = w.rows[:0]
	if wanted {
		r.parse(t, w, ch)
	}
	r.order.pass(ch.seq, func() {
		if st.seen == nil {
			return // placing: the duplicate check is the aggregation's (see Place)
		}
		for i := range w.rows {
			if p := &w.rows[i]; p.reason == reasonUsed {
				p.reason = st.seen.check(p.key)
			}
		}
	})
	for i := range w.rows {
		p := &w.rows[i]
		if p.reason == reasonUsed {
			t.key, t.keyed = p.key, t.place != nil
			p.reason = t.add(&p.tr)
			if p.reason != reasonUsed && p.reason.isDataError() && st.opts.Strict {
				p.fault = fault{reason: p.reason, detail: explain(st, &p.tr, p.reason)}.at(r.file, p.line, 0)
			}
		}
		t.count(p.reason, 1)
		if p.fault != nil && st.opts.Strict {
			return p.fault
		}
	}
	return nil
}

// parse parses the rows of ch into w.rows. In strict mode a row with a
// bad field gets its fault, and parsing stops after it.
func (r *tripReader) parse(t *tally, w *tripWorker, ch chunk) {
	st := r.st
	lim := st.quoteLimits()
	sp := lineSplitter{data: ch.data, line: ch.firstLine, atEOF: ch.last, limits: lim}
	for {
		rec, line, kind, ok := sp.next()
		if !ok {
			return
		}
		if line == 1 {
			continue // the header
		}
		w.rows = append(w.rows, parsedTrip{line: line})
		p := &w.rows[len(w.rows)-1]
		var err error
		switch kind {
		case badQuote:
			p.reason = ReasonUnbalancedQuote
			if st.opts.Strict {
				p.fault = quoteFault(lim).at(r.file, line, 0)
			}
			continue
		case quotedRecord:
			w.fields, w.buf, err = splitQuoted(rec, w.fields, w.buf)
		default:
			w.fields = splitFields(rec, w.fields)
		}
		if err != nil {
			p.reason = ReasonUnbalancedQuote
			if st.opts.Strict {
				p.fault = quoteFault(lim).at(r.file, line, 0)
			}
			continue
		}
		var col string
		p.reason, col = parseTripFields(st, t.zone, &r.cols, w.fields, &p.tr)
		if p.reason != reasonUsed {
			if st.opts.Strict && p.reason.isDataError() {
				p.fault = fieldFault(st, p.reason, col, w.fields, &r.cols).at(r.file, line, 0)
				return
			}
			continue
		}
		var id []byte
		if r.idCol >= 0 && r.idCol < len(w.fields) {
			id = w.fields[r.idCol]
		}
		// Repeats are looked for among the rows starting on the same
		// local day (see rowSet).
		day := floorDiv(t.zone.local(floorDiv(p.tr.startMS, 1000)), 86400)
		p.key = rowKeyOf(Day(max(math.MinInt32, min(math.MaxInt32, day))), rec, id)
	}
}
