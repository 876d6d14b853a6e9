// A network state: the town's network with or without the link, its
// demand, its congested assignment, routes and incidents.

package town

import (
	"context"
	"errors"
	"math"
	"sort"
)

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

func cumulative(xs []float64) ([]float64, float64) {
	out := make([]float64, len(xs))
	var acc float64
	for i, x := range xs {
		acc += x
		out[i] = acc
	}
	return out, acc
}
