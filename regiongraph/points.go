package regiongraph

import (
	"cmp"
	"context"
	"fmt"
	"slices"

	"narrows/partition/geodesy"
)

// gpsPoint is one GPS fix. Points of all vehicles are held in memory until
// the file is read (about 48 bytes each), because rows need not be sorted.
type gpsPoint struct {
	ms       int64 // Unix milliseconds
	lon, lat float64
	line     int64
	vehicle  uint32
	occupied int8 // -1 no column, 0 vacant, 1 occupied
}

var pointRequired = []string{colVehicleID, colTime, colLon, colLat}

// ingestPointsCSV reads a GPS point table, cuts each vehicle's points into
// trips and tallies them.
func ingestPointsCSV(ctx context.Context, st *settings, c *csvFile, t *tally, progress func(int64)) (string, error) {
	var fail firstFault
	points, sum, err := readPoints(ctx, st, c, t, &fail, progress)
	if err != nil {
		return "", err
	}
	// In strict mode a trip-level failure may sit on an earlier line than
	// the first parse failure: cut the trips before reporting either.
	seg := pointSegmenter{st: st, t: t, file: c.path, fail: &fail}
	if err := seg.vehicles(ctx, points); err != nil {
		return "", err
	}
	if fail.err != nil {
		return "", fail.err
	}
	return sum, nil
}

// readPoints parses the rows of a GPS point table and returns the points
// and the file's SHA-256. Rejected rows are counted in t, and in strict
// mode kept in fail.
func readPoints(ctx context.Context, st *settings, c *csvFile, t *tally, fail *firstFault, progress func(int64)) ([]gpsPoint, string, error) {
	m, err := c.requireColumns(st, pointRequired, []string{colOccupied})
	if err != nil {
		return nil, "", err
	}
	iv, it, ilon, ilat, iocc := m[colVehicleID], m[colTime], m[colLon], m[colLat], m[colOccupied]
	need := max(iv, it, ilon, ilat, iocc) + 1

	free := make(chan []byte, 3)
	for i := 0; i < cap(free); i++ {
		free <- make([]byte, chunkSize)
	}
	ctx, cancel := context.WithCancel(ctx)
	defer cancel()
	lim := st.quoteLimits()
	k := &chunker{src: c.br, hash: newHash(), limits: lim, free: free, out: make(chan chunk, 1), progress: progress}
	errc := make(chan error, 1)
	go func() { errc <- k.run(ctx) }()

	vehicles := make(map[string]uint32)
	var points []gpsPoint
	fields := make([][]byte, 0, len(c.header))
	var buf []byte
	for ch := range k.out {
		sp := lineSplitter{data: ch.data, line: ch.firstLine, atEOF: ch.last, limits: lim}
		for {
			rec, line, kind, ok := sp.next()
			if !ok {
				break
			}
			if line == 1 {
				continue
			}
			var err error
			switch kind {
			case badQuote:
				err = errQuote
			case quotedRecord:
				fields, buf, err = splitQuoted(rec, fields, buf)
			default:
				fields = splitFields(rec, fields)
			}
			r, col := ReasonUnbalancedQuote, ""
			var p gpsPoint
			if err == nil {
				r, col = parsePointFields(st, t.zone, fields, need, iv, it, ilon, ilat, iocc, &p)
			}
			if r != reasonUsed {
				t.count(r, 1)
				if st.opts.Strict && r.isDataError() {
					f := quoteFault(lim)
					if err == nil {
						f = pointFault(st, r, col, fields, m)
					}
					fail.keep(0, f.at(c.path, line, 0))
				}
				continue
			}
			id, ok := vehicles[bytesString(fields[iv])]
			if !ok {
				id = uint32(len(vehicles))
				vehicles[string(fields[iv])] = id
			}
			p.vehicle, p.line = id, line
			points = append(points, p)
		}
		free <- ch.buf[:0]
	}
	if err := <-errc; err != nil {
		if ctx.Err() != nil && err == ctx.Err() {
			return nil, "", err
		}
		return nil, "", fmt.Errorf("regiongraph: %s: %w", c.path, err)
	}
	return points, hexSum(k.hash), nil
}

// pointFault is the fault of a point row rejected for r at column col; m
// maps logical columns to fields.
func pointFault(st *settings, r Reason, col string, fields [][]byte, m map[string]int) fault {
	f := fault{reason: r, column: col, detail: st.timeDetail(r)}
	if i := m[col]; r != ReasonMissingField && i >= 0 && i < len(fields) {
		f.value = string(fields[i])
	}
	return f
}

func parsePointFields(st *settings, z *zoneCache, fields [][]byte, need, iv, it, ilon, ilat, iocc int, p *gpsPoint) (Reason, string) {
	if len(fields) < need {
		for _, c := range []struct {
			i    int
			name string
		}{{iv, colVehicleID}, {it, colTime}, {ilon, colLon}, {ilat, colLat}, {iocc, colOccupied}} {
			if c.i >= len(fields) {
				return ReasonMissingField, c.name
			}
		}
	}
	for _, c := range []struct {
		i    int
		name string
	}{{iv, colVehicleID}, {it, colTime}, {ilon, colLon}, {ilat, colLat}} {
		if len(fields[c.i]) == 0 {
			return ReasonMissingField, c.name
		}
	}
	var err error
	if p.ms, err = parseTime(fields[it], z); err != nil {
		return timeReason(err), colTime
	}
	if !st.plausible(p.ms) {
		return ReasonImplausibleTime, colTime
	}
	if p.lon, err = parseFloat(fields[ilon]); err != nil || p.lon < -180 || p.lon > 180 {
		return ReasonUnparseable, colLon
	}
	if p.lat, err = parseFloat(fields[ilat]); err != nil || p.lat < -90 || p.lat > 90 {
		return ReasonUnparseable, colLat
	}
	p.occupied = -1
	if iocc >= 0 {
		if len(fields[iocc]) == 0 {
			return ReasonMissingField, colOccupied
		}
		occ, err := parseBool(fields[iocc])
		if err != nil {
			return ReasonUnparseable, colOccupied
		}
		p.occupied = 0
		if occ {
			p.occupied = 1
		}
	}
	return reasonUsed, ""
}

// pointSegmenter cuts one vehicle's time-sorted points into trips.
type pointSegmenter struct {
	st   *settings
	t    *tally
	file string
	fail *firstFault // in strict mode
}

// reject counts the points p under r; in strict mode bad data is a fault
// at the first point, with the detail of the failed check.
func (s *pointSegmenter) reject(p []gpsPoint, r Reason, detail string) {
	s.t.count(r, int64(len(p)))
	if s.st.opts.Strict && len(p) > 0 && r != reasonUsed && r.isDataError() {
		s.fail.keep(0, fault{reason: r, detail: detail}.at(s.file, p[0].line, 0))
	}
}

// vehicles sorts the points by vehicle and time, drops repeated points
// and cuts each vehicle's points into trips.
func (s *pointSegmenter) vehicles(ctx context.Context, points []gpsPoint) error {
	slices.SortFunc(points, func(a, b gpsPoint) int {
		if c := cmp.Compare(a.vehicle, b.vehicle); c != 0 {
			return c
		}
		if c := cmp.Compare(a.ms, b.ms); c != 0 {
			return c
		}
		return cmp.Compare(a.line, b.line)
	})
	points = s.dropRepeats(points)
	for start := 0; start < len(points); {
		if err := ctx.Err(); err != nil {
			return err
		}
		end := start + 1
		for end < len(points) && points[end].vehicle == points[start].vehicle {
			end++
		}
		s.vehicle(points[start:end])
		start = end
	}
	return nil
}

// dropRepeats counts and drops the points of points (sorted by vehicle,
// time and line) that repeat an earlier line's vehicle, time, place and
// flag: the same fix written twice, or by two overlapping exports.
func (s *pointSegmenter) dropRepeats(points []gpsPoint) []gpsPoint {
	out := points[:0]
	for i, p := range points {
		if len(out) > 0 {
			// Points of one vehicle and time are adjacent; compare with
			// each kept one of them.
			repeat := false
			for j := len(out) - 1; j >= 0 && out[j].vehicle == p.vehicle && out[j].ms == p.ms; j-- {
				if q := out[j]; q.lon == p.lon && q.lat == p.lat && q.occupied == p.occupied {
					repeat = true
					break
				}
			}
			if repeat {
				s.t.count(ReasonDuplicatePoint, 1)
				continue
			}
		}
		out = append(out, points[i])
	}
	return out
}

// vehicle handles all points of one vehicle: with an occupied flag, each
// occupied run is a trip and vacant points are not; without, the points are
// cut at time gaps and then at dwells.
func (s *pointSegmenter) vehicle(p []gpsPoint) {
	if len(p) == 0 {
		return
	}
	if p[0].occupied >= 0 {
		for start := 0; start < len(p); {
			end := start + 1
			for end < len(p) && p[end].occupied == p[start].occupied {
				end++
			}
			if p[start].occupied == 1 {
				s.trip(p[start:end])
			} else {
				s.reject(p[start:end], ReasonNotOccupied, "")
			}
			start = end
		}
		return
	}
	for start := 0; start < len(p); {
		end := start + 1
		for end < len(p) && p[end].ms-p[end-1].ms <= s.st.gapMS {
			end++
		}
		s.dwells(p[start:end])
		start = end
	}
}

// dwells cuts a gap-free run at dwells: a cluster of points that stay within
// DwellMetres of its first point for more than DwellMinutes. The trip before
// a dwell ends at the cluster's first point, the next starts at its last; the
// points between are stationary.
func (s *pointSegmenter) dwells(p []gpsPoint) {
	n := len(p)
	start, anchor := 0, 0
	for i := 1; i <= n; i++ {
		if i < n && geodesy.GreatCircleMetres([2]float64{p[anchor].lon, p[anchor].lat}, [2]float64{p[i].lon, p[i].lat}) <= s.st.dwellMetres {
			continue
		}
		last := i - 1 // cluster is anchor..last
		if p[last].ms-p[anchor].ms > s.st.dwellMS {
			if anchor > start {
				s.trip(p[start : anchor+1])
			} else {
				s.reject(p[anchor:anchor+1], ReasonStationary, "")
			}
			if last-anchor > 1 {
				s.reject(p[anchor+1:last], ReasonStationary, "")
			}
			start = last
			if i == n {
				s.reject(p[last:last+1], ReasonStationary, "")
				start = n
			}
		}
		anchor = i
	}
	if start < n {
		s.trip(p[start:])
	}
}

// trip builds a trip from time-sorted points and tallies all its points.
func (s *pointSegmenter) trip(p []gpsPoint) {
	if len(p) < 2 {
		s.reject(p, ReasonShortTrip, "a single point")
		return
	}
	tr := trip{startMS: p[0].ms, endMS: p[len(p)-1].ms,
		origin: [2]float64{p[0].lon, p[0].lat}, dest: [2]float64{p[len(p)-1].lon, p[len(p)-1].lat}}
	tr.distance, tr.jump = pathLength(p, s.st.maxJump)
	r := s.t.add(&tr)
	detail := ""
	if r != reasonUsed {
		detail = fmt.Sprintf("%s (trip of %d points to line %d)", explain(s.st, &tr, r), len(p), p[len(p)-1].line)
	}
	s.reject(p, r, detail)
}

// pathLength sums the great-circle lengths of consecutive steps and reports
// whether any step implies a speed over maxJump (m/s); a step with no time
// between two different places counts as a jump.
func pathLength(p []gpsPoint, maxJump float64) (metres float64, jump bool) {
	for i := 1; i < len(p); i++ {
		d := geodesy.GreatCircleMetres([2]float64{p[i-1].lon, p[i-1].lat}, [2]float64{p[i].lon, p[i].lat})
		metres += d
		dt := float64(p[i].ms-p[i-1].ms) / 1000
		if d > 0 && (dt <= 0 || d/dt > maxJump) {
			jump = true
		}
	}
	return metres, jump
}
