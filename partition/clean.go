package partition

import (
	"container/heap"
	"math"
)

// closeGaps returns connectors that join line ends to nearby lines. An end
// is a vertex of degree one; it is joined to the nearest point within snap
// metres on another edge, unless the network already links the two
// closely (network distance at most the gap plus snap), which would only
// add a sliver. A connector to the middle of an edge overshoots it by a
// millimetre so that noding finds the crossing despite rounding; the
// overshoot is a dangle and is dropped with the others.
func closeGaps(a *arrangement, snap float64) []seg {
	deg := make([]int32, len(a.pts)+1)
	for _, ed := range a.edges {
		deg[ed.u+1]++
		deg[ed.v+1]++
	}
	// CSR adjacency: start[v]..start[v+1] in adj are edge ids.
	start := make([]int32, len(a.pts)+1)
	for v := 1; v <= len(a.pts); v++ {
		start[v] = start[v-1] + deg[v]
	}
	adj := make([]int32, start[len(a.pts)])
	fill := make([]int32, len(a.pts))
	copy(fill, start)
	for e, ed := range a.edges {
		adj[fill[ed.u]] = int32(e)
		fill[ed.u]++
		adj[fill[ed.v]] = int32(e)
		fill[ed.v]++
	}
	idx := newGridIndex(len(a.edges), func(i int) (ipt, ipt) {
		ed := a.edges[i]
		return segBox(seg{a.pts[ed.u], a.pts[ed.v], 0})
	})
	snapGrid := int64(math.Ceil(snap / gridMetres))
	radius := 3 * snap

	// Reusable state for the bounded network search.
	netDist := make([]float64, len(a.pts))
	stamp := make([]int32, len(a.pts))
	seen := make([]int32, len(a.edges))
	var pq distHeap

	var out []seg
	for v := range int32(len(a.pts)) {
		if start[v+1]-start[v] != 1 {
			continue
		}
		round := v + 1
		own := adj[start[v]]
		p := a.pts[v]

		// Network distances from v up to radius, settling at most
		// maxGapSearch vertices: real linework has a few dozen within
		// 3 x snap of a line end, but a pathological file (thousands of
		// lines criss-crossing in a few metres) has millions, and an
		// unbounded search from every end would take hours. Vertices left
		// unreached count as far, so at worst a connector is added and the
		// sliver it makes is merged later.
		netDist[v], stamp[v] = 0, round
		pq = append(pq[:0], distItem{v, 0})
		for settled := 0; pq.Len() > 0 && settled < maxGapSearch; {
			it := heap.Pop(&pq).(distItem)
			if it.d > netDist[it.v] {
				continue
			}
			settled++
			for _, e := range adj[start[it.v]:start[it.v+1]] {
				ed := a.edges[e]
				w := ed.u
				if w == it.v {
					w = ed.v
				}
				d := it.d + dist(a.pts[it.v], a.pts[w])
				if d > radius {
					continue
				}
				if stamp[w] != round || d < netDist[w] {
					stamp[w], netDist[w] = round, d
					heap.Push(&pq, distItem{w, d})
				}
			}
		}
		reach := func(w int32) float64 {
			if stamp[w] == round {
				return netDist[w]
			}
			return math.Inf(1)
		}

		bestD, bestE := math.Inf(1), int32(-1)
		var bestQ [2]float64
		var bestT float64
		idx.query(ipt{p.X - snapGrid, p.Y - snapGrid}, ipt{p.X + snapGrid, p.Y + snapGrid}, func(e int32) {
			if seen[e] == round || e == own {
				return
			}
			seen[e] = round
			ed := a.edges[e]
			qa, qb := a.pts[ed.u], a.pts[ed.v]
			dx, dy := float64(qb.X-qa.X), float64(qb.Y-qa.Y)
			t := ((float64(p.X-qa.X))*dx + float64(p.Y-qa.Y)*dy) / (dx*dx + dy*dy)
			t = min(max(t, 0), 1)
			qx, qy := float64(qa.X)+t*dx, float64(qa.Y)+t*dy
			d := math.Hypot(qx-float64(p.X), qy-float64(p.Y)) * gridMetres
			if d == 0 || d > snap || d > bestD || (d == bestD && e > bestE) {
				return
			}
			la := math.Hypot(qx-float64(qa.X), qy-float64(qa.Y)) * gridMetres
			lb := math.Hypot(qx-float64(qb.X), qy-float64(qb.Y)) * gridMetres
			if nd := math.Min(reach(ed.u)+la, reach(ed.v)+lb); nd <= d+snap {
				return
			}
			bestD, bestE, bestQ, bestT = d, e, [2]float64{qx, qy}, t
		})
		if bestE < 0 {
			continue
		}
		ed := a.edges[bestE]
		var q ipt
		switch {
		case bestT <= 0:
			q = a.pts[ed.u]
		case bestT >= 1:
			q = a.pts[ed.v]
		default:
			k := (bestD + 1e-3) / bestD
			q = ipt{p.X + int64(math.Round((bestQ[0]-float64(p.X))*k)), p.Y + int64(math.Round((bestQ[1]-float64(p.Y))*k))}
		}
		out = append(out, seg{p, q, a.edges[own].way})
	}
	return out
}

// maxGapSearch bounds the network search around one line end in closeGaps.
const maxGapSearch = 4096

type distItem struct {
	v int32
	d float64
}

type distHeap []distItem

func (h distHeap) Len() int { return len(h) }
func (h distHeap) Less(i, j int) bool {
	return h[i].d < h[j].d || (h[i].d == h[j].d && h[i].v < h[j].v)
}
func (h distHeap) Swap(i, j int) { h[i], h[j] = h[j], h[i] }
func (h *distHeap) Push(x any)   { *h = append(*h, x.(distItem)) }
func (h *distHeap) Pop() any {
	old := *h
	it := old[len(old)-1]
	*h = old[:len(old)-1]
	return it
}

// mergeSlivers merges faces smaller than minArea (m²), or less compact
// than minPP (Polsby-Popper 4πA/P²) while narrower than maxWidth metres
// (mean width 2A/P; maxWidth <= 0: any width), into the neighbour across
// their longest shared border, smallest first, until every group passes or
// has no neighbour. Water faces (water[f]; water may be nil) never merge,
// and take a land face only when it has no land neighbour (a sliver
// between two water lines): a sliver is never merged across a river. It returns
// each face's group (the id of a face in it) and the number of merges.
func mergeSlivers(a *arrangement, fs *faceSet, minArea, minPP, maxWidth float64, water []bool) ([]int32, int) {
	isWater := func(f int32) bool { return water != nil && water[f] }
	n := len(fs.faces)
	area := make([]float64, n)
	perim := make([]float64, n)
	adj := make([]map[int32]float64, n)
	for f := range fs.faces {
		area[f], perim[f] = fs.faces[f].area, fs.faces[f].perimeter
		adj[f] = map[int32]float64{}
	}
	for e, ed := range a.edges {
		l, r := fs.left[2*e], fs.left[2*e+1]
		if l < 0 || r < 0 || l == r {
			continue
		}
		d := dist(a.pts[ed.u], a.pts[ed.v])
		adj[l][r] += d
		adj[r][l] += d
	}
	fails := func(f int32) bool {
		if isWater(f) {
			return false
		}
		if area[f] < minArea {
			return true
		}
		thin := 4*math.Pi*area[f]/(perim[f]*perim[f]) < minPP
		narrow := maxWidth <= 0 || 2*area[f]/perim[f] < maxWidth
		return thin && narrow
	}
	parent := make([]int32, n)
	h := make(areaHeap, 0, n)
	for f := range parent {
		parent[f] = int32(f)
		h = append(h, areaItem{int32(f), area[f]})
	}
	heap.Init(&h)
	merges := 0
	for h.Len() > 0 {
		it := heap.Pop(&h).(areaItem)
		g := it.f
		if parent[g] != g || it.area != area[g] || !fails(g) {
			continue
		}
		t, best, tLand := int32(-1), -1.0, false
		for nb, l := range adj[g] {
			land := !isWater(nb)
			if (land && !tLand) || (land == tLand && (l > best || (l == best && nb < t))) {
				t, best, tLand = nb, l, land
			}
		}
		if t < 0 {
			continue
		}
		area[t] += area[g]
		perim[t] = math.Max(perim[t]+perim[g]-2*best, 0)
		delete(adj[t], g)
		for nb, l := range adj[g] {
			if nb == t {
				continue
			}
			adj[t][nb] += l
			adj[nb][t] += l
			delete(adj[nb], g)
		}
		adj[g] = nil
		parent[g] = t
		merges++
		heap.Push(&h, areaItem{t, area[t]})
	}
	group := make([]int32, n)
	for f := range group {
		r := int32(f)
		for parent[r] != r {
			r = parent[r]
		}
		group[f] = r
	}
	return group, merges
}

type areaItem struct {
	f    int32
	area float64
}

type areaHeap []areaItem

func (h areaHeap) Len() int { return len(h) }
func (h areaHeap) Less(i, j int) bool {
	return h[i].area < h[j].area || (h[i].area == h[j].area && h[i].f < h[j].f)
}
func (h areaHeap) Swap(i, j int) { h[i], h[j] = h[j], h[i] }
func (h *areaHeap) Push(x any)   { *h = append(*h, x.(areaItem)) }
func (h *areaHeap) Pop() any {
	old := *h
	it := old[len(old)-1]
	*h = old[:len(old)-1]
	return it
}
