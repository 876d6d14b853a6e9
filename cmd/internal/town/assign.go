package town

import (
	"context"
	"math"
)

// bpr returns the travel time on a link with free-flow time t0 carrying
// volume vehicles an hour against capacity vehicles an hour, by the Bureau of
// Public Roads volume-delay function t = t0 (1 + 0.15 (v/c)^4) (Bureau of
// Public Roads, 1964). A non-positive capacity gives +Inf.
func bpr(t0, volume, capacity float64) float64 {
	if capacity <= 0 {
		return math.Inf(1)
	}
	x := volume / capacity
	x2 := x * x
	return t0 * (1 + 0.15*x2*x2)
}

// odMatrix is the peak-hour demand between trip-end nodes: rows are origins
// (index into ends), columns destinations, vehicles an hour.
type odMatrix struct {
	ends []int32 // network node per trip end
	m    int
	v    []float64 // m*m
}

// assignment is the outcome of a congested assignment.
type assignment struct {
	// Volume and Time are per link: peak-hour vehicles and seconds.
	Volume, Time []float64
	// RelativeGaps holds the relative gap after each MSA round from the
	// second on: (total time on the loaded network - total time on shortest
	// paths) / total time on the loaded network. It falls towards 0 as the
	// assignment nears user equilibrium.
	RelativeGaps []float64
}

// msa loads od onto nw by the method of successive averages: all-or-nothing
// loads on the current shortest paths, averaged with step 1/k, times from
// BPR, for rounds rounds. Trees are computed per origin trip end, in fixed
// chunks summed in chunk order (deterministic).
func msa(ctx context.Context, nw *network, od *odMatrix, rounds int) (*assignment, error) {
	L := len(nw.links)
	a := &assignment{Volume: make([]float64, L), Time: make([]float64, L)}
	for i, l := range nw.links {
		a.Time[i] = l.t0
	}
	if rounds < 1 {
		rounds = 1
	}
	for k := 1; k <= rounds; k++ {
		aux, sptt, err := allOrNothing(ctx, nw, od, a.Time)
		if err != nil {
			return nil, err
		}
		if k > 1 {
			a.RelativeGaps = append(a.RelativeGaps, relativeGap(a.Volume, a.Time, sptt))
		}
		step := 1 / float64(k)
		for i := range a.Volume {
			a.Volume[i] += step * (aux[i] - a.Volume[i])
		}
		for i, l := range nw.links {
			a.Time[i] = bpr(l.t0, a.Volume[i], l.capacity)
		}
	}
	return a, nil
}

func relativeGap(volume, times []float64, sptt float64) float64 {
	var tstt float64
	for i := range volume {
		tstt += volume[i] * times[i]
	}
	if tstt <= 0 {
		return 0
	}
	return (tstt - sptt) / tstt
}

// chunksFor splits m origins into a fixed number of chunks.
func chunksFor(m int) int {
	const c = 16
	if m < c {
		return max(m, 1)
	}
	return c
}

func chunkRange(m, chunks, c int) (int, int) { return c * m / chunks, (c + 1) * m / chunks }

// allOrNothing loads od on the shortest paths under times and returns the
// link loads and the total time on shortest paths.
func allOrNothing(ctx context.Context, nw *network, od *odMatrix, times []float64) ([]float64, float64, error) {
	chunks := chunksFor(od.m)
	loads := make([][]float64, chunks)
	sptts := make([]float64, chunks)
	n := len(nw.pos)
	err := parallel(ctx, chunks, func(c int) {
		load := make([]float64, len(nw.links))
		flow := make([]float64, n)
		tr := newTree(n)
		lo, hi := chunkRange(od.m, chunks, c)
		for s := lo; s < hi; s++ {
			row := od.v[s*od.m : (s+1)*od.m]
			if !anyPositive(row) {
				continue
			}
			nw.shortestTree(int(od.ends[s]), times, tr)
			clear(flow)
			for e, q := range row {
				if q > 0 {
					v := od.ends[e]
					flow[v] += q
					if d := tr.dist[v]; !math.IsInf(d, 1) {
						sptts[c] += q * d
					}
				}
			}
			for k := len(tr.order) - 1; k >= 0; k-- {
				v := tr.order[k]
				f := flow[v]
				li := tr.parent[v]
				if f == 0 || li < 0 {
					continue
				}
				load[li] += f
				flow[nw.links[li].from] += f
			}
		}
		loads[c] = load
	})
	if err != nil {
		return nil, 0, err
	}
	total := make([]float64, len(nw.links))
	var sptt float64
	for c := 0; c < chunks; c++ {
		for i, x := range loads[c] {
			total[i] += x
		}
		sptt += sptts[c]
	}
	return total, sptt, nil
}

func anyPositive(xs []float64) bool {
	for _, x := range xs {
		if x > 0 {
			return true
		}
	}
	return false
}

// routeTable holds, per origin and destination trip end, the route's length
// (m), free-flow time (s) and peak-hour congestion delay (s), and for each
// planned incident whether the route uses the incident link.
type routeTable struct {
	m                int
	length, t0, peak []float32
	affected         [][]uint64 // per incident: bitset over origin*m+destination
	parents          []int32    // if kept: per origin, the tree's parent link of every node
}

// routes builds the route table on the loaded network: one tree per origin
// trip end under the congested times.
func routes(ctx context.Context, nw *network, od *odMatrix, a *assignment, incidents []int32, keepParents bool) (*routeTable, error) {
	m := od.m
	rt := &routeTable{m: m, length: make([]float32, m*m), t0: make([]float32, m*m), peak: make([]float32, m*m)}
	n := len(nw.pos)
	if keepParents {
		rt.parents = make([]int32, m*n)
	}
	words := (m*m + 63) / 64
	for range incidents {
		rt.affected = append(rt.affected, make([]uint64, words))
	}
	// Bitset words can span two origins' rows; each chunk writes bits into
	// its own copy and the copies are OR-ed in chunk order afterwards.
	chunks := chunksFor(m)
	partial := make([][][]uint64, chunks)
	err := parallel(ctx, chunks, func(c int) {
		tr := newTree(n)
		length := make([]float64, n)
		t0 := make([]float64, n)
		peak := make([]float64, n)
		hit := make([]bool, n)
		var mine [][]uint64
		for range incidents {
			mine = append(mine, make([]uint64, words))
		}
		lo, hi := chunkRange(m, chunks, c)
		for s := lo; s < hi; s++ {
			root := int(od.ends[s])
			nw.shortestTree(root, a.Time, tr)
			if keepParents {
				copy(rt.parents[s*n:(s+1)*n], tr.parent)
			}
			length[root], t0[root], peak[root] = 0, 0, 0
			for _, v := range tr.order {
				li := tr.parent[v]
				if li < 0 {
					continue
				}
				l := &nw.links[li]
				length[v] = length[l.from] + l.length
				t0[v] = t0[l.from] + l.t0
				peak[v] = peak[l.from] + (a.Time[li] - l.t0)
			}
			for e, v := range od.ends {
				k := s*m + e
				if math.IsInf(tr.dist[v], 1) {
					rt.length[k], rt.t0[k], rt.peak[k] = float32(math.Inf(1)), float32(math.Inf(1)), 0
					continue
				}
				rt.length[k], rt.t0[k], rt.peak[k] = float32(length[v]), float32(t0[v]), float32(peak[v])
			}
			for ii, inc := range incidents {
				clear(hit)
				for _, v := range tr.order {
					if li := tr.parent[v]; li >= 0 {
						hit[v] = hit[nw.links[li].from] || li == inc
					}
				}
				for e, v := range od.ends {
					if hit[v] {
						k := s*m + e
						mine[ii][k/64] |= 1 << (k % 64)
					}
				}
			}
		}
		partial[c] = mine
	})
	if err != nil {
		return nil, err
	}
	for c := 0; c < chunks; c++ {
		for ii := range incidents {
			for w, x := range partial[c][ii] {
				rt.affected[ii][w] |= x
			}
		}
	}
	return rt, nil
}

func (rt *routeTable) uses(incident, s, e int) bool {
	k := s*rt.m + e
	return rt.affected[incident][k/64]&(1<<(k%64)) != 0
}
