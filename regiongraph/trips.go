package regiongraph

import (
	"context"
	"fmt"
	"sync"
	"sync/atomic"

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
		return ReasonUnparseable, colStartTime
	}
	if tr.endMS, err = parseTime(fields[c.idx[1]], z); err != nil {
		return ReasonUnparseable, colEndTime
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
		return fmt.Sprintf("%.2f km/h (allowed %g-%g km/h)", tr.distance/duration*3.6, st.opts.MinSpeedKMH, st.opts.MaxSpeedKMH)
	case ReasonDetourFloor:
		return fmt.Sprintf("distance %.0f m over straight line %.0f m is %.3f, under %g", tr.distance, straight, tr.distance/straight, st.minDetour)
	case ReasonGPSJump:
		return fmt.Sprintf("a step between points faster than %g km/h", st.opts.MaxJumpKMH)
	}
	return ""
}

// fieldFault is the fault of a trip table row whose column col failed to
// parse (r is ReasonMissingField or ReasonUnparseable).
func fieldFault(r Reason, col string, fields [][]byte, c *tripColumns) fault {
	f := fault{reason: r, column: col}
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
		progress: progress, stop: func(seq int64) bool { return seq > stopSeq.Load() }}

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
			fields := make([][]byte, 0, len(c.header))
			var tr trip
			for ch := range k.out {
				if ch.seq <= stopSeq.Load() {
					if e := tripChunk(st, t, c.path, &cols, ch, fields, &tr); e != nil {
						fail(ch.seq, e)
					}
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

// tripChunk parses and tallies the rows of one chunk of file. In strict
// mode it returns the first row with bad data.
func tripChunk(st *settings, t *tally, file string, cols *tripColumns, ch chunk, fields [][]byte, tr *trip) *RowError {
	sp := lineSplitter{data: ch.data, line: ch.firstLine, quoted: ch.quoted}
	for {
		rec, line, slow, ok := sp.next()
		if !ok {
			return nil
		}
		if line == 1 {
			continue // the header
		}
		var err error
		if slow {
			fields, err = splitQuoted(rec, fields)
		} else {
			fields = splitFields(rec, fields)
		}
		var r Reason
		var col string
		if err != nil {
			r, col = ReasonUnparseable, "record"
		} else {
			r, col = parseTripFields(st, t.zone, cols, fields, tr)
			if r == reasonUsed {
				r = t.add(tr)
				col = ""
			}
		}
		t.count(r, 1)
		if r != reasonUsed && st.opts.Strict && r.isDataError() {
			f := fault{reason: r, detail: explain(st, tr, r)}
			if col == "record" {
				f = fault{reason: r, err: err}
			} else if col != "" {
				f = fieldFault(r, col, fields, cols)
			}
			return f.at(file, line, 0)
		}
	}
}
