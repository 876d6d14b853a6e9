package town

import (
	"math"
	"sort"
)

// zone is a demand zone: an arterial cell, or the part of one on one side of
// the river or the railway.
type zone struct {
	// x0..x1, y0..y1 bound the zone in grid metres; trip points are drawn
	// from the inset rectangle px0..px1, py0..py1.
	x0, x1, y0, y1     float64
	px0, px1, py0, py1 float64
	nodes              []int32 // network node indices of the zone's trip ends
	ends               []int32 // the same as indices into the trip-end list
	segs               []segment
	population, jobs   float64
}

// segment is a street segment inside a zone between two of its trip-end
// nodes (k and l index nodes and ends); trips start and end along it.
type segment struct {
	k, l int
}

func (z *zone) centre() (float64, float64) { return (z.x0 + z.x1) / 2, (z.y0 + z.y1) / 2 }

// interval is a piece of an arterial cell along one axis; inner edges are
// those on the river or the railway.
type interval struct {
	a, b           float64
	innerA, innerB bool
}

func cellIntervals(cells int, edge func(c int) float64, split float64) []interval {
	var out []interval
	for c := 0; c < cells; c++ {
		a, b := edge(c), edge(c+1)
		if split > a && split < b {
			out = append(out, interval{a, split, false, true}, interval{split, b, true, false})
			continue
		}
		out = append(out, interval{a, b, false, false})
	}
	return out
}

// zonesOf builds the zones of t over network nw; perZone limits the trip ends per zone (0: all nodes of the zone).
func (t *Town) zonesOf(nw *network, perZone int) []zone {
	lay := t.lay
	// Network index of each grid node.
	netOf := make(map[int64]int32, len(nw.osm))
	for v, id := range nw.osm {
		netOf[id] = int32(v)
	}
	gap := lay.meander() + 0.15*lay.block
	inset := 0.08 * lay.block
	xs := cellIntervals(lay.nx, func(c int) float64 { return float64(c*lay.k) * lay.block }, lay.railX())
	ys := cellIntervals(lay.ny, func(c int) float64 { return lay.gyOf(c * lay.k) }, lay.riverY())
	var zones []zone
	for _, iy := range ys {
		for _, ix := range xs {
			z := zone{x0: ix.a, x1: ix.b, y0: iy.a, y1: iy.b}
			z.px0, z.px1, z.py0, z.py1 = ix.a+inset, ix.b-inset, iy.a+inset, iy.b-inset
			if ix.innerA {
				z.px0 = ix.a + gap
			}
			if ix.innerB {
				z.px1 = ix.b - gap
			}
			if iy.innerA {
				z.py0 = iy.a + gap
			}
			if iy.innerB {
				z.py1 = iy.b - gap
			}
			zones = append(zones, z)
		}
	}
	const eps = 1e-6
	for zi := range zones {
		z := &zones[zi]
		var refs []gridRef
		var far []float64
		cx, cy := z.centre()
		i0, i1 := int(math.Ceil(z.x0/lay.block-eps)), int(math.Floor(z.x1/lay.block+eps))
		for j := 0; j <= lay.NY(); j++ {
			if gy := lay.gyOf(j); gy < z.y0-eps || gy > z.y1+eps {
				continue
			}
			for i := i0; i <= i1; i++ {
				if i < 0 || i > lay.NX() {
					continue
				}
				g := t.grid[j*(lay.NX()+1)+i]
				if g.id == 0 {
					continue
				}
				v, ok := netOf[g.id]
				if !ok {
					continue
				}
				refs = append(refs, gridRef{v: v, i: i, j: j})
				far = append(far, math.Hypot(g.gx-cx, g.gy-cy))
			}
		}
		if perZone > 0 && len(refs) > perZone {
			idx := make([]int, len(refs))
			for k := range idx {
				idx[k] = k
			}
			sort.SliceStable(idx, func(a, b int) bool { return far[idx[a]] < far[idx[b]] })
			keep := make([]gridRef, 0, perZone)
			for _, k := range idx[:perZone] {
				keep = append(keep, refs[k])
			}
			sort.Slice(keep, func(a, b int) bool { return keep[a].v < keep[b].v })
			refs = keep
		}
		for _, r := range refs {
			z.nodes = append(z.nodes, r.v)
		}
		z.segs = zoneSegments(nw, z, refs, lay)
	}
	t.landUse(zones)
	return zones
}

// landUse sets population and jobs per zone: residents lean north of the
// river, jobs gather in a centre just south of it, and the planted pair is
// a dense housing district facing a large employer across the river.
func (t *Town) landUse(zones []zone) {
	lay := t.lay
	W, H := lay.width(), lay.height()
	var popSum, jobSum float64
	for zi := range zones {
		z := &zones[zi]
		cx, cy := z.centre()
		u, v := cx/W, cy/H
		area := (z.x1 - z.x0) * (z.y1 - z.y0)
		popD := 1 + 1.2*v
		jobD := 0.4 + 2.5*math.Exp(-((u-0.3)*(u-0.3)+(v-0.78)*(v-0.78))/(2*0.12*0.12))
		z.population, z.jobs = area*popD, area*jobD
		popSum += z.population
		jobSum += z.jobs
	}
	h, j := t.plantedZones(zones)
	for zi := range zones {
		z := &zones[zi]
		z.population *= lay.population / popSum
		z.jobs *= lay.population / jobSum
	}
	if h >= 0 && j >= 0 {
		zones[h].population = lay.plantedHousing * lay.population
		zones[h].jobs *= 0.3
		zones[j].jobs = lay.plantedJobs * lay.population
		zones[j].population *= 0.3
	}
	t.plantRailHousing(zones)
}

// plantedZones returns the indices of the housing and jobs zones.
func (t *Town) plantedZones(zones []zone) (housing, jobs int) {
	housing, jobs = -1, -1
	lay := t.lay
	cx := (float64(lay.plantCol) + 0.5) * lay.cell()
	for zi := range zones {
		z := &zones[zi]
		if cx < z.x0 || cx > z.x1 {
			continue
		}
		if z.y0 == lay.riverY() {
			housing = zi
		}
		if z.y1 == lay.riverY() {
			jobs = zi
		}
	}
	return housing, jobs
}

// plantedK is the K-factor of the planted pair (housing to jobs commuting).
const plantedK = 3

// gravity returns the daily flows F[i*n+j] of a singly (production)
// constrained gravity model, F_ij = P_i A_j K_ij f(d_ij) / sum_k A_k K_ik
// f(d_ik), with exponential deterrence f(d) = exp(-beta d) on the
// straight-line distance between zone centres; k nil means K = 1.
// Intra-zone flows are left out: they never make a region-to-region edge.
func gravity(zones []zone, prod, attr func(*zone) float64, beta float64, k func(i, j int) float64) []float64 {
	n := len(zones)
	F := make([]float64, n*n)
	w := make([]float64, n)
	for i := range zones {
		xi, yi := zones[i].centre()
		var sum float64
		for j := range zones {
			w[j] = 0
			if i == j {
				continue
			}
			xj, yj := zones[j].centre()
			kij := 1.0
			if k != nil {
				kij = k(i, j)
			}
			w[j] = attr(&zones[j]) * kij * math.Exp(-beta*math.Hypot(xi-xj, yi-yj))
			sum += w[j]
		}
		if sum == 0 {
			continue
		}
		p := prod(&zones[i])
		for j := range zones {
			F[i*n+j] = p * w[j] / sum
		}
	}
	return F
}

// gridRef is a network node of a zone with its grid position.
type gridRef struct {
	v    int32
	i, j int
}

// zoneSegments lists the street segments between the zone's trip-end nodes
// that are not on the zone's border (border streets are region borders, and
// a trip point on one would sit on the line between two regions).
func zoneSegments(nw *network, z *zone, refs []gridRef, lay layout) []segment {
	at := make(map[int32]int, len(refs))
	for k, r := range refs {
		at[r.v] = k
	}
	onBorder := func(r gridRef) (w, e, s, n bool) {
		gx, gy := float64(r.i)*lay.block, lay.gyOf(r.j)
		const eps = 1e-6
		return math.Abs(gx-z.x0) < eps, math.Abs(gx-z.x1) < eps, math.Abs(gy-z.y0) < eps, math.Abs(gy-z.y1) < eps
	}
	var segs []segment
	seen := make(map[segment]bool)
	for k, r := range refs {
		v := r.v
		for _, li := range nw.inLinks[nw.inStart[v]:nw.inStart[v+1]] {
			l, ok := at[nw.links[li].from]
			sg := segment{k: min(k, l), l: max(k, l)}
			if !ok || l == k || seen[sg] {
				continue
			}
			seen[sg] = true
			aw, ae, as, an := onBorder(r)
			bw, be, bs, bn := onBorder(refs[l])
			if (aw && bw) || (ae && be) || (as && bs) || (an && bn) {
				continue
			}
			segs = append(segs, sg)
		}
	}
	sort.Slice(segs, func(a, b int) bool {
		if segs[a].k != segs[b].k {
			return segs[a].k < segs[b].k
		}
		return segs[a].l < segs[b].l
	})
	return segs
}
