// Trip generation: a day's trips drawn from the demand, routed through the
// network state and written as CSV rows or GPS traces.

package town

import (
	"cmp"
	"math"
	"math/rand/v2"
	"slices"
	"sort"
	"strconv"
	"time"

	"github.com/paulmach/orb"
)

// Constants of a single trip.
const (
	incidentMaxDelay = 1200.0 // s, cap on one trip's incident delay
	accessSpeed      = 5.0    // m/s, driving from the trip point to the first junction
	durationNoise    = 0.1    // lognormal sigma of the driving time
	setback          = 12.0   // m, largest distance of a trip point from its street
)

// trip is one simulated trip before formatting.
type trip struct {
	start, duration float64   // seconds after midnight, seconds
	o, d            orb.Point // WGS84 origin and destination
	distance        float64
	seq             int
	from, to        int32 // trip ends the route runs between
}

// dayTrips draws the trips of one day, routes each through the network
// state and returns them in start-time order.
func (s *sim) dayTrips(day dayPlan, rs *netState) []trip {
	rng := rand.New(rand.NewPCG(day.seed, uint64(day.index)))
	nc, no := s.tripCounts(day, rs)
	incident := -1 // the day's incident in the route table, -1: none
	if inc, ok := rs.incidents[day.index]; ok {
		incident = inc
	}
	rows := make([]trip, 0, nc+no)
	for k := 0; k < nc+no; k++ {
		sec, zi, zj, kind := s.drawDemand(rng, rs, day.weekend, k < nc)
		r := day.factor * s.traffic(rs, sec, day.weekend) / rs.peak
		r4 := r * r * r * r
		op, oEnds := s.t.tripEnd(rng, &rs.zones[zi], rs.nw)
		dp, dEnds := s.t.tripEnd(rng, &rs.zones[zj], rs.nw)
		rt, ok := rs.quickest(oEnds, dEnds, kind, r4, incident)
		if !ok {
			continue // unreachable (does not happen on a connected town)
		}
		dur := rt.drive*day.pace*math.Exp(durationNoise*rng.NormFloat64()) + rt.access/accessSpeed + 5 + 20*rng.Float64() // parking and starting
		rows = append(rows, trip{start: sec, duration: dur, o: op, d: dp, distance: rt.length + rt.access, seq: k, from: rt.from, to: rt.to})
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

// tripCounts returns the number of commuting and other trips of the day.
func (s *sim) tripCounts(day dayPlan, rs *netState) (commutes, others int) {
	wc, wo := 1.0, 1.0
	if day.weekend {
		wc, wo = weekendCommute, weekendOther
	}
	base := float64(s.o.TripsPerDay) * day.factor * day.volume
	commutes = int(math.Round(base * rs.shareC * wc))
	others = int(math.Round(base * (1 - rs.shareC) * wo))
	return commutes, others
}

// drawDemand draws one trip's start second, origin and destination zones
// and purpose: a commute (out in the morning or back in the evening) or
// another trip (either way at any time of day).
func (s *sim) drawDemand(rng *rand.Rand, rs *netState, weekend, commute bool) (sec float64, zi, zj int, kind purpose) {
	p := s.prof
	other := &p.otherWeekday
	if weekend {
		other = &p.otherWeekend
	}
	var pair int
	swap := false
	kind = commuteOut
	if commute {
		pair = pick(rs.cumC, rs.totalC, rng)
		if rng.Float64() < 0.5 {
			sec = p.commuteAM.draw(rng)
		} else {
			sec, swap, kind = p.commutePM.draw(rng), true, commuteBack
		}
	} else {
		kind = otherTrip
		pair = pick(rs.cumO, rs.totalO, rng)
		sec, swap = other.draw(rng), rng.Float64() < 0.5
	}
	nz := len(rs.zones)
	zi, zj = pair/nz, pair%nz
	if swap {
		zi, zj = zj, zi
	}
	return sec, zi, zj, kind
}

// route is the quickest way between two trip points: the trip ends it runs
// between, the route's length and driving time, and the access distance at
// both ends.
type route struct {
	from, to              int32
	length, drive, access float64
}

// quickest returns the quickest route from one of the origin's ways into
// the network to one of the destination's, its peak delay scaled by r4
// (the fourth power of the traffic relative to the peak), with the delay
// of the day's incident (-1: none); false when no route exists.
func (rs *netState) quickest(oEnds, dEnds [2]endChoice, kind purpose, r4 float64, incident int) (route, bool) {
	tb := rs.table
	best, bestTime := -1, math.Inf(1)
	var rt route
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
			switch kind {
			case commuteOut:
				peak = float64(tb.peak[key])
			case commuteBack:
				peak = float64(tb.peak[rev])
			default:
				peak = (float64(tb.peak[key]) + float64(tb.peak[rev])) / 2
			}
			drive := float64(tb.t0[key]) + peak*r4
			if incident >= 0 && tb.uses(incident, int(a.end), int(b.end)) {
				drive += math.Min(incidentMaxDelay, rs.extra[incident]*r4)
			}
			access := a.access + b.access
			if tt := drive + access/accessSpeed; tt < bestTime {
				best, bestTime = key, tt
				rt = route{from: a.end, to: b.end, length: length, drive: drive, access: access}
			}
		}
	}
	return rt, best >= 0
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
