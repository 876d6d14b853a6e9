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
	otherBetaFactor  = 1.5  // other trips are shorter than commutes
	incidentCapacity = 0.35 // share of capacity left on an incident link
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

// build builds the network state with or without the link: its zones and
// trip ends, their daily demand, the peak-hour demand between trip ends
// and its congested assignment, the incidents of the state's days, and the
// route table.
func (s *sim) build(ctx context.Context, withLink bool) (*netState, error) {
	nw, err := s.t.networkOf(withLink)
	if err != nil {
		return nil, err
	}
	zones := s.zones(nw)
	ends := indexTripEnds(zones)
	rs := &netState{nw: nw, zones: zones, incidents: map[int]int{}}
	if err := s.demand(rs); err != nil {
		return nil, err
	}
	peakMinute := s.peakMinute(rs)
	od := s.peakOD(rs, ends, peakMinute)
	a, err := msa(ctx, nw, od, s.o.MSARounds)
	if err != nil {
		return nil, err
	}
	rs.od, rs.assign = od, a
	incLinks := s.planIncidents(rs, withLink)
	rs.table, err = routes(ctx, nw, od, a, incLinks, s.o.TraceEvery > 0)
	if err != nil {
		return nil, err
	}
	rs.stats = rs.summary(withLink, peakMinute)
	return rs, nil
}

// zones returns the demand zones over nw with ZoneNodes trip ends each; by
// default all of a zone's nodes, or one when the town has more than 1,000
// such nodes.
func (s *sim) zones(nw *network) []zone {
	t := s.t
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
	return zones
}

// indexTripEnds returns the trip ends, the union of the zones' nodes in
// ascending order, and sets each zone's ends to its nodes' indices in it.
func indexTripEnds(zones []zone) []int32 {
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
	return ends
}

// demand sets the daily zone-to-zone demand of both purposes, from the
// gravity model, and the cumulative sums trips are drawn from.
func (s *sim) demand(rs *netState) error {
	t, zones := s.t, rs.zones
	h, jb := t.plantedZones(zones)
	rh := t.railHousingZone(zones)
	commuteK := func(i, j int) float64 {
		if (i == h || (rh >= 0 && i == rh)) && j == jb {
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
		return errors.New("town: no demand between zones")
	}
	rs.shareC = 2 * rs.totalC / (2*rs.totalC + rs.totalO)
	return nil
}

// peakMinute sets rs.peak, the weekday traffic density at its peak, and
// returns the minute of the day of the peak.
func (s *sim) peakMinute(rs *netState) int {
	peakMinute := 0
	for m := 0; m < 1440; m++ {
		if d := s.traffic(rs, float64(m*60), false); d > rs.peak {
			rs.peak, peakMinute = d, m
		}
	}
	return peakMinute
}

// peakOD returns the peak-hour demand between trip ends: the morning peak,
// with commuters heading to work. Evening commuters meet the mirror image
// of it (see dayTrips).
func (s *sim) peakOD(rs *netState, ends []int32, peakMinute int) *odMatrix {
	zones := rs.zones
	nz := len(zones)
	tp := float64(peakMinute * 60)
	p := s.prof
	dOut := 3600 * p.commuteAM.density(tp)
	dBack := 3600 * p.commutePM.density(tp)
	dOther := 3600 * p.otherWeekday.density(tp)
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
	return od
}

// planIncidents picks the incident link of each incident day in this
// network state, among the loaded arterial links (all arterial links if
// none is loaded), records each incident's extra peak-hour delay, and
// returns the incident links in incident order.
func (s *sim) planIncidents(rs *netState, withLink bool) []int32 {
	nw, a := rs.nw, rs.assign
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
	return incLinks
}

// summary describes the state's assignment.
func (rs *netState) summary(withLink bool, peakMinute int) assignmentStats {
	nw, od, a := rs.nw, rs.od, rs.assign
	st := assignmentStats{WithLink: withLink, Zones: len(rs.zones), TripEnds: od.m, Nodes: len(nw.pos), Links: len(nw.links),
		PeakMinute:   peakMinute,
		RelativeGaps: append([]float64(nil), a.RelativeGaps...)}
	for _, x := range od.v {
		st.PeakHourVehicles += x
	}
	for li, l := range nw.links {
		st.MaxVolumeToCapacity = math.Max(st.MaxVolumeToCapacity, a.Volume[li]/l.capacity)
	}
	return st
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
