package town

import (
	"bufio"
	"cmp"
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"slices"
	"sort"
	"strconv"
	"time"

	"github.com/paulmach/orb"
)

// SimOptions controls Simulate. Zero Days, TripsPerDay, MSARounds,
// Location and Start take their defaults; the shares and rates are used as
// given (0 means none), so start from Plan.SimOptions.
type SimOptions struct {
	// Seed drives every random draw of the simulation. Default 1.
	Seed int64
	// Start is the first day, at local midnight. Default 2026-03-02
	// (a Monday) in Location.
	Start time.Time
	// Days is the number of days simulated. Default 7.
	Days int
	// TripsPerDay is the number of fleet trips written on an average
	// weekday. Default 10,000.
	TripsPerDay int
	// LinkOpens is the day from which the new link exists (its calendar
	// day in Location counts). Nil: the link never opens.
	LinkOpens *time.Time
	// Location is the study's time zone. Default Etc/GMT-1 (UTC+1), or a
	// fixed +01:00 zone if the time zone database is not available.
	Location *time.Location
	// MSARounds is the number of MSA rounds per network state. Default 4.
	MSARounds int
	// IncidentRate is the share of days with an incident: one arterial link
	// keeps 35 % of its capacity for the day. Default 0.1.
	IncidentRate float64
	// DayVariation is the standard deviation of the daily demand factor
	// (mean 1). Default 0.08.
	DayVariation float64
	// ZoneNodes is the number of network nodes per zone that serve as trip
	// ends (the nodes nearest the zone's centre). 0: automatic, all the
	// zone's nodes when the town has at most 1,000 such nodes, else 1.
	ZoneNodes int
	// TraceEvery gives every n-th trip (by trip id) a GPS trace, passed to
	// OnTrace. 0: no traces.
	TraceEvery int
	// TraceInterval is the time between GPS fixes. Default 15 s.
	TraceInterval time.Duration
	// OnTrace receives the traces in trip order; an error from it stops
	// the simulation. Write them with a PointsWriter or WriteGPX.
	OnTrace func(Trace) error
}

// defaultSimOptions returns the documented defaults.
func defaultSimOptions() SimOptions {
	loc := studyLocation()
	return SimOptions{
		Seed: 1, Start: time.Date(2026, 3, 2, 0, 0, 0, 0, loc), Days: 7, TripsPerDay: 10000,
		Location: loc, MSARounds: 4, IncidentRate: 0.1, DayVariation: 0.08,
	}
}

// studyLocation returns the demo's time zone, Etc/GMT-1 (UTC+1 all year),
// or a fixed zone of the same name and offset if the time zone database is
// missing.
func studyLocation() *time.Location {
	if loc, err := time.LoadLocation("Etc/GMT-1"); err == nil {
		return loc
	}
	return time.FixedZone("Etc/GMT-1", 3600)
}

// Stats summarises a simulation.
type Stats struct {
	Days, Trips, IncidentDays int
	// assignments has one entry per network state used (without the link,
	// then with it).
	assignments []assignmentStats
}

// assignmentStats describes the congested assignment of one network state.
type assignmentStats struct {
	WithLink            bool
	Zones, TripEnds     int
	Nodes, Links        int
	PeakHourVehicles    float64 // all traffic in the weekday peak hour
	PeakMinute          int     // minute of the day of the weekday peak
	MaxVolumeToCapacity float64
	RelativeGaps        []float64
}

// Trip demand constants. From memory, orders of magnitude for a car-oriented
// town: per resident and weekday about 0.4 commuting car tours (out and
// back) and 0.7 other car trips; at weekends a sixth of the commuting and
// most of the other trips remain.
const (
	commuteTours     = 0.4
	otherTrips       = 0.7
	weekendCommute   = 0.15
	weekendOther     = 0.9
	otherBetaFactor  = 1.5    // other trips are shorter than commutes
	incidentCapacity = 0.35   // share of capacity left on an incident link
	incidentMaxDelay = 1200.0 // s, cap on one trip's incident delay
	accessSpeed      = 5.0    // m/s, driving from the trip point to the first junction
	durationNoise    = 0.1    // lognormal sigma of the driving time
	setback          = 12.0   // m, largest distance of a trip point from its street
)

// tripHeader is the first line of the trip CSV.
const tripHeader = "trip_id,start_time,end_time,start_lon,start_lat,end_lon,end_lat,distance_m"

// Simulate writes the fleet trips of opts.Days days to trips in the ingest
// trip CSV format (header line first), day by day in start-time order. The
// same town and options give the same bytes.
func (t *Town) Simulate(ctx context.Context, opts SimOptions, trips io.Writer) (Stats, error) {
	var st Stats
	if t == nil || t.grid == nil {
		return st, errors.New("town: Simulate needs a Town made by Generate")
	}
	o, err := t.normalise(opts)
	if err != nil {
		return st, err
	}
	s, err := t.newSim(o)
	if err != nil {
		return st, err
	}
	bw := bufio.NewWriterSize(trips, 1<<16)
	if _, err := bw.WriteString(tripHeader + "\n"); err != nil {
		return st, fmt.Errorf("town: writing trips: %w", err)
	}
	var nextID int64 = 1
	var buf []byte
	for d := 0; d < o.Days; d++ {
		if err := ctx.Err(); err != nil {
			return st, err
		}
		day := s.days[d]
		rs, err := s.state(ctx, day.withLink)
		if err != nil {
			return st, err
		}
		rows := s.dayTrips(day, rs)
		for i := range rows {
			buf = s.appendRow(buf[:0], nextID, &rows[i], day)
			if _, err := bw.Write(buf); err != nil {
				return st, fmt.Errorf("town: writing trips: %w", err)
			}
			if o.TraceEvery > 0 && nextID%int64(o.TraceEvery) == 0 {
				if err := o.OnTrace(s.trace(rs, nextID, &rows[i], day)); err != nil {
					return st, fmt.Errorf("town: trace of trip %d: %w", nextID, err)
				}
			}
			nextID++
		}
		st.Trips += len(rows)
		if day.incident {
			st.IncidentDays++
		}
	}
	st.Days = o.Days
	st.assignments = s.built
	if err := bw.Flush(); err != nil {
		return st, fmt.Errorf("town: writing trips: %w", err)
	}
	return st, nil
}

func (t *Town) normalise(o SimOptions) (SimOptions, error) {
	def := defaultSimOptions()
	if o.Location == nil {
		o.Location = def.Location
	}
	if o.Start.IsZero() {
		o.Start = time.Date(2026, 3, 2, 0, 0, 0, 0, o.Location)
	}
	if o.Days == 0 {
		o.Days = def.Days
	}
	if o.TripsPerDay == 0 {
		o.TripsPerDay = def.TripsPerDay
	}
	if o.MSARounds == 0 {
		o.MSARounds = def.MSARounds
	}
	switch {
	case o.Days < 0 || o.Days > 3660:
		return o, fmt.Errorf("town: Days = %d, want 1..3660", o.Days)
	case o.TripsPerDay < 0 || o.TripsPerDay > 10_000_000:
		return o, fmt.Errorf("town: TripsPerDay = %d, want 1..10,000,000", o.TripsPerDay)
	case o.MSARounds < 0 || o.MSARounds > 100:
		return o, fmt.Errorf("town: MSARounds = %d, want 1..100", o.MSARounds)
	case !(o.IncidentRate >= 0 && o.IncidentRate <= 1):
		return o, fmt.Errorf("town: IncidentRate = %v, want 0..1", o.IncidentRate)
	case !(o.DayVariation >= 0 && o.DayVariation <= 1):
		return o, fmt.Errorf("town: DayVariation = %v, want 0..1", o.DayVariation)
	case o.ZoneNodes < 0:
		return o, fmt.Errorf("town: ZoneNodes = %d, want >= 0", o.ZoneNodes)
	case o.TraceEvery < 0 || (o.TraceEvery > 0 && o.OnTrace == nil):
		return o, fmt.Errorf("town: TraceEvery = %d, want >= 0, and OnTrace set when positive", o.TraceEvery)
	case o.TraceInterval < 0:
		return o, fmt.Errorf("town: TraceInterval = %v, want > 0", o.TraceInterval)
	}
	if o.TraceInterval == 0 {
		o.TraceInterval = 15 * time.Second
	}
	o.Start = o.Start.In(o.Location)
	return o, nil
}

// sim is the state of one Simulate call.
type sim struct {
	t      *Town
	o      SimOptions
	prof   *profiles
	days   []dayPlan
	states [2]*netState // without, with the link
	built  []assignmentStats
}

type dayPlan struct {
	index     int
	midnight  time.Time
	weekend   bool
	withLink  bool
	factor    float64 // demand factor of the day
	incident  bool
	incidentU float64 // draws the incident link
	seed      uint64
}

// netState is everything that depends on the network state.
type netState struct {
	nw             *network
	zones          []zone
	commute, other []float64 // zone OD: daily commuting tours, daily other trips
	cumC, cumO     []float64 // cumulative, for sampling
	shareC         float64   // commuting share of weekday trips
	totalC, totalO float64
	peak           float64 // weekday traffic density at the peak minute (share of weekday trips per second)
	od             *odMatrix
	assign         *assignment
	table          *routeTable
	incidents      map[int]int // day index -> incident number in table
	extra          []float64   // per incident: peak-hour extra delay on the link, s
	stats          assignmentStats
}

func (t *Town) newSim(o SimOptions) (*sim, error) {
	s := &sim{t: t, o: o, prof: newProfiles()}
	rng := rand.New(rand.NewPCG(uint64(o.Seed), 0x5eed0fda75))
	var linkDay time.Time
	if o.LinkOpens != nil {
		l := o.LinkOpens.In(o.Location)
		linkDay = time.Date(l.Year(), l.Month(), l.Day(), 0, 0, 0, 0, o.Location)
	}
	for d := 0; d < o.Days; d++ {
		m := o.Start.AddDate(0, 0, d)
		m = time.Date(m.Year(), m.Month(), m.Day(), 0, 0, 0, 0, o.Location)
		wd := m.Weekday()
		p := dayPlan{index: d, midnight: m, weekend: wd == time.Saturday || wd == time.Sunday}
		p.withLink = o.LinkOpens != nil && !m.Before(linkDay)
		p.factor = math.Max(0.5, 1+o.DayVariation*rng.NormFloat64())
		p.incident = rng.Float64() < o.IncidentRate
		p.incidentU = rng.Float64()
		p.seed = rng.Uint64()
		s.days = append(s.days, p)
	}
	return s, nil
}

// state returns the network state, building it on first use.
func (s *sim) state(ctx context.Context, withLink bool) (*netState, error) {
	k := 0
	if withLink {
		k = 1
	}
	if s.states[k] != nil {
		return s.states[k], nil
	}
	// The other state is no longer needed once days move on.
	s.states[1-k] = nil
	rs, err := s.build(ctx, withLink)
	if err != nil {
		return nil, err
	}
	s.states[k] = rs
	s.built = append(s.built, rs.stats)
	return rs, nil
}

// traffic returns the density of all traffic at sec (share of a
// weekday's trips per second) on a weekday or a weekend day.
func (s *sim) traffic(rs *netState, sec float64, weekend bool) float64 {
	p := s.prof
	wc, wo, other := 1.0, 1.0, &p.otherWeekday
	if weekend {
		wc, wo, other = weekendCommute, weekendOther, &p.otherWeekend
	}
	c := rs.totalC * wc * (p.commuteAM.density(sec) + p.commutePM.density(sec))
	return (c + rs.totalO*wo*other.density(sec)) / (2*rs.totalC + rs.totalO)
}

func (s *sim) build(ctx context.Context, withLink bool) (*netState, error) {
	t := s.t
	nw, err := t.networkOf(withLink)
	if err != nil {
		return nil, err
	}
	per := s.o.ZoneNodes
	zones := t.zonesOf(nw, 0)
	if per == 0 {
		total := 0
		for _, z := range zones {
			total += len(z.nodes)
		}
		if total > 1000 {
			per = 1
		}
	}
	if per > 0 {
		zones = t.zonesOf(nw, per)
	}
	rs := &netState{nw: nw, zones: zones, incidents: map[int]int{}}
	// Trip ends: the union of the zones' nodes, ascending.
	endOf := make(map[int32]int32)
	var ends []int32
	for _, z := range zones {
		for _, v := range z.nodes {
			if _, ok := endOf[v]; !ok {
				endOf[v] = -1
				ends = append(ends, v)
			}
		}
	}
	sort.Slice(ends, func(a, b int) bool { return ends[a] < ends[b] })
	for i, v := range ends {
		endOf[v] = int32(i)
	}
	for zi := range zones {
		z := &zones[zi]
		z.ends = make([]int32, len(z.nodes))
		for k, v := range z.nodes {
			z.ends[k] = endOf[v]
		}
	}
	nz := len(zones)
	h, jb := t.plantedZones(zones)
	commuteK := func(i, j int) float64 {
		if i == h && j == jb {
			return plantedK
		}
		return 1
	}
	rs.commute = gravity(zones, func(z *zone) float64 { return z.population * commuteTours },
		func(z *zone) float64 { return z.jobs }, t.lay.beta, commuteK)
	rs.other = gravity(zones, func(z *zone) float64 { return z.population * otherTrips },
		func(z *zone) float64 { return z.jobs + 0.5*z.population }, t.lay.beta*otherBetaFactor, nil)
	rs.cumC, rs.totalC = cumulative(rs.commute)
	rs.cumO, rs.totalO = cumulative(rs.other)
	if rs.totalC <= 0 || rs.totalO <= 0 {
		return nil, errors.New("town: no demand between zones")
	}
	rs.shareC = 2 * rs.totalC / (2*rs.totalC + rs.totalO)
	peakMinute := 0
	for m := 0; m < 1440; m++ {
		if d := s.traffic(rs, float64(m*60), false); d > rs.peak {
			rs.peak, peakMinute = d, m
		}
	}
	tp := float64(peakMinute * 60)
	p := s.prof
	dOut := 3600 * p.commuteAM.density(tp)
	dBack := 3600 * p.commutePM.density(tp)
	dOther := 3600 * p.otherWeekday.density(tp)
	// Peak-hour OD between trip ends: the morning peak, with commuters
	// heading to work. Evening commuters meet the mirror image of it (see
	// dayTrips).
	m := len(ends)
	od := &odMatrix{ends: ends, m: m, v: make([]float64, m*m)}
	for i := 0; i < nz; i++ {
		for j := 0; j < nz; j++ {
			q := dOut*rs.commute[i*nz+j] + dBack*rs.commute[j*nz+i] + dOther*rs.other[i*nz+j]
			zi, zj := &zones[i], &zones[j]
			if q <= 0 || len(zi.ends) == 0 || len(zj.ends) == 0 {
				continue
			}
			q /= float64(len(zi.ends) * len(zj.ends))
			for _, a := range zi.ends {
				row := od.v[int(a)*m:]
				for _, b := range zj.ends {
					if a != b {
						row[b] += q
					}
				}
			}
		}
	}
	a, err := msa(ctx, nw, od, s.o.MSARounds)
	if err != nil {
		return nil, err
	}
	rs.od, rs.assign = od, a
	// Incidents of the days in this state.
	var cands []int32
	for li, l := range nw.links {
		if l.major && a.Volume[li] >= 0.6*l.capacity {
			cands = append(cands, int32(li))
		}
	}
	if len(cands) == 0 {
		for li, l := range nw.links {
			if l.major {
				cands = append(cands, int32(li))
			}
		}
	}
	var incLinks []int32
	for _, d := range s.days {
		if d.withLink != withLink || !d.incident || len(cands) == 0 {
			continue
		}
		li := cands[min(int(d.incidentU*float64(len(cands))), len(cands)-1)]
		l := nw.links[li]
		rs.incidents[d.index] = len(incLinks)
		incLinks = append(incLinks, li)
		rs.extra = append(rs.extra, bpr(l.t0, a.Volume[li], l.capacity*incidentCapacity)-a.Time[li])
	}
	rs.table, err = routes(ctx, nw, od, a, incLinks, s.o.TraceEvery > 0)
	if err != nil {
		return nil, err
	}
	st := assignmentStats{WithLink: withLink, Zones: nz, TripEnds: m, Nodes: len(nw.pos), Links: len(nw.links),
		PeakMinute:   peakMinute,
		RelativeGaps: append([]float64(nil), a.RelativeGaps...)}
	for _, x := range od.v {
		st.PeakHourVehicles += x
	}
	for li, l := range nw.links {
		st.MaxVolumeToCapacity = math.Max(st.MaxVolumeToCapacity, a.Volume[li]/l.capacity)
	}
	rs.stats = st
	return rs, nil
}

// trip is one simulated trip before formatting.
type trip struct {
	start, duration float64   // seconds after midnight, seconds
	o, d            orb.Point // WGS84 origin and destination
	distance        float64
	seq             int
	from, to        int32 // trip ends the route runs between
}

func (s *sim) dayTrips(day dayPlan, rs *netState) []trip {
	o := s.o
	p := s.prof
	rng := rand.New(rand.NewPCG(day.seed, uint64(day.index)))
	wc, wo, other := 1.0, 1.0, &p.otherWeekday
	if day.weekend {
		wc, wo, other = weekendCommute, weekendOther, &p.otherWeekend
	}
	base := float64(o.TripsPerDay) * day.factor
	nc := int(math.Round(base * rs.shareC * wc))
	no := int(math.Round(base * (1 - rs.shareC) * wo))
	nz := len(rs.zones)
	inc, hasInc := rs.incidents[day.index]
	rows := make([]trip, 0, nc+no)
	for k := 0; k < nc+no; k++ {
		var sec float64
		var pair int
		swap := false
		purpose := commuteOut
		if k < nc {
			pair = pick(rs.cumC, rs.totalC, rng)
			if rng.Float64() < 0.5 {
				sec = p.commuteAM.draw(rng)
			} else {
				sec, swap, purpose = p.commutePM.draw(rng), true, commuteBack
			}
		} else {
			purpose = otherTrip
			pair = pick(rs.cumO, rs.totalO, rng)
			sec, swap = other.draw(rng), rng.Float64() < 0.5
		}
		zi, zj := pair/nz, pair%nz
		if swap {
			zi, zj = zj, zi
		}
		r := day.factor * s.traffic(rs, sec, day.weekend) / rs.peak
		r4 := r * r * r * r
		op, oEnds := s.t.tripEnd(rng, &rs.zones[zi], rs.nw)
		dp, dEnds := s.t.tripEnd(rng, &rs.zones[zj], rs.nw)
		tb := rs.table
		best, bestTime := -1, math.Inf(1)
		var bestLen, bestDrive, bestAccess float64
		var from, to int32
		for _, a := range oEnds {
			if a.end < 0 {
				continue
			}
			for _, b := range dEnds {
				if b.end < 0 {
					continue
				}
				key := int(a.end)*tb.m + int(b.end)
				length := float64(tb.length[key])
				if math.IsInf(length, 1) {
					continue
				}
				// The peak delay comes from the morning peak: commuters
				// going out meet it as assigned, commuters coming back
				// meet its mirror image (the delay of the reverse route),
				// other trips the mean of both directions.
				var peak float64
				rev := int(b.end)*tb.m + int(a.end)
				switch purpose {
				case commuteOut:
					peak = float64(tb.peak[key])
				case commuteBack:
					peak = float64(tb.peak[rev])
				default:
					peak = (float64(tb.peak[key]) + float64(tb.peak[rev])) / 2
				}
				drive := float64(tb.t0[key]) + peak*r4
				if hasInc && tb.uses(inc, int(a.end), int(b.end)) {
					drive += math.Min(incidentMaxDelay, rs.extra[inc]*r4)
				}
				access := a.access + b.access
				if tt := drive + access/accessSpeed; tt < bestTime {
					best, bestTime = key, tt
					bestLen, bestDrive, bestAccess = length, drive, access
					from, to = a.end, b.end
				}
			}
		}
		if best < 0 {
			continue // unreachable (does not happen on a connected town)
		}
		dur := bestDrive*math.Exp(durationNoise*rng.NormFloat64()) + bestAccess/accessSpeed + 5 + 20*rng.Float64() // parking and starting
		rows = append(rows, trip{start: sec, duration: dur, o: op, d: dp, distance: bestLen + bestAccess, seq: k, from: from, to: to})
	}
	// Rows by start second, then by draw (seq is unique).
	slices.SortFunc(rows, func(a, b trip) int {
		if c := cmp.Compare(math.Floor(a.start), math.Floor(b.start)); c != 0 {
			return c
		}
		return cmp.Compare(a.seq, b.seq)
	})
	return rows
}

type purpose int

const (
	commuteOut purpose = iota
	commuteBack
	otherTrip
)

func pick(cum []float64, total float64, rng *rand.Rand) int {
	i := sort.SearchFloat64s(cum, rng.Float64()*total)
	return min(i, len(cum)-1)
}

// endChoice is a way into the network from a trip point: a trip end and the
// distance driven to reach it.
type endChoice struct {
	end    int32 // -1: none
	access float64
}

// tripEnd draws a trip point in zone z. When the zone has inner street
// segments, the point lies along one of them (a door on the street; a few
// metres of setback) and the trip can leave by either end of the segment;
// otherwise the point is uniform in the zone and joins the nearest trip-end
// node, the access distance being the Manhattan distance, as if driven
// along the block's streets.
func (t *Town) tripEnd(rng *rand.Rand, z *zone, nw *network) (orb.Point, [2]endChoice) {
	out := [2]endChoice{{end: -1}, {end: -1}}
	if len(z.segs) > 0 {
		sg := z.segs[rng.IntN(len(z.segs))]
		a, b := nw.pos[z.nodes[sg.k]], nw.pos[z.nodes[sg.l]]
		f := 0.05 + 0.9*rng.Float64()
		L := dist(a, b)
		p := lerp(a, b, f)
		off := (rng.Float64()*2 - 1) * setback
		if L > 0 {
			p.X += -(b.Y - a.Y) / L * off
			p.Y += (b.X - a.X) / L * off
		}
		out[0] = endChoice{end: z.ends[sg.k], access: f*L + math.Abs(off)}
		out[1] = endChoice{end: z.ends[sg.l], access: (1-f)*L + math.Abs(off)}
		return t.lonLat(p), out
	}
	gx := z.px0 + rng.Float64()*(z.px1-z.px0)
	gy := z.py0 + rng.Float64()*(z.py1-z.py0)
	w := t.warp.apply(gx, gy)
	p := xy{w.X + t.lay.margin, w.Y + t.lay.margin}
	best, bestD := 0, math.Inf(1)
	for k, v := range z.nodes {
		q := nw.pos[v]
		if d := (q.X-p.X)*(q.X-p.X) + (q.Y-p.Y)*(q.Y-p.Y); d < bestD {
			best, bestD = k, d
		}
	}
	q := nw.pos[z.nodes[best]]
	out[0] = endChoice{end: z.ends[best], access: math.Abs(q.X-p.X) + math.Abs(q.Y-p.Y)}
	return t.lonLat(p), out
}

// trace follows a trip's route through the network state's trees.
func (s *sim) trace(rs *netState, id int64, tr *trip, day dayPlan) Trace {
	nw, tb := rs.nw, rs.table
	n := len(nw.pos)
	root, v := rs.od.ends[tr.from], rs.od.ends[tr.to]
	parents := tb.parents[int(tr.from)*n : (int(tr.from)+1)*n]
	var nodes []int32
	for v != root && v >= 0 {
		nodes = append(nodes, v)
		li := parents[v]
		if li < 0 {
			break
		}
		v = nw.links[li].from
	}
	nodes = append(nodes, root)
	line := []orb.Point{tr.o}
	for k := len(nodes) - 1; k >= 0; k-- {
		line = append(line, s.t.lonLat(nw.pos[nodes[k]]))
	}
	line = append(line, tr.d)
	start := day.midnight.Add(time.Duration(math.Floor(tr.start)) * time.Second)
	return traceOf(id, line, start, math.Round(tr.duration), s.o.TraceInterval.Seconds())
}

func (s *sim) appendRow(b []byte, id int64, tr *trip, day dayPlan) []byte {
	start := day.midnight.Add(time.Duration(math.Floor(tr.start)) * time.Second)
	end := start.Add(time.Duration(math.Round(tr.duration)) * time.Second)
	b = strconv.AppendInt(b, id, 10)
	b = append(b, ',')
	b = start.AppendFormat(b, time.RFC3339)
	b = append(b, ',')
	b = end.AppendFormat(b, time.RFC3339)
	b = append(b, ',')
	b = strconv.AppendFloat(b, tr.o[0], 'f', 6, 64)
	b = append(b, ',')
	b = strconv.AppendFloat(b, tr.o[1], 'f', 6, 64)
	b = append(b, ',')
	b = strconv.AppendFloat(b, tr.d[0], 'f', 6, 64)
	b = append(b, ',')
	b = strconv.AppendFloat(b, tr.d[1], 'f', 6, 64)
	b = append(b, ',')
	b = strconv.AppendFloat(b, tr.distance, 'f', 1, 64)
	b = append(b, '\n')
	return b
}

func cumulative(xs []float64) ([]float64, float64) {
	out := make([]float64, len(xs))
	var acc float64
	for i, x := range xs {
		acc += x
		out[i] = acc
	}
	return out, acc
}
