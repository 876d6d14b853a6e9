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
