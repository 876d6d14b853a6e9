package patterns

import (
	"math"
	"math/bits"
	"slices"

	"narrows/patterns/groups"
)

// places splits the recurring edges of a scan into places, the unit of a
// finding.
//
// A recurring edge is a directed pair that was a candidate on at least
// minSupport days: it is then in at least one closed recurring group (its
// closure), so the recurring edges are exactly the edges of the closed
// groups. Its region pair (A>B and B>A alike) is the atom of a place: both
// directions of a pair are always one place. Two region pairs that share a
// region are joined when they were candidates together on at least
// minSupport days (an edge of each, so some recurring group holds both)
// and their daily
// recurrence is correlated, phi >= minCorrelation, where phi is the
// correlation of the two 0/1 series "the pair was a candidate that day"
// (a pair's day counts when either direction was a candidate). Places are
// the connected components of the joined pairs.
//
// The correlation keeps apart what merely coexists: a pair that is weak
// on nearly every day recurs together with any other recurring pair beside
// it, by chance, and a closed group holding both says nothing about a
// shared cause. Two weaknesses that share one region (a river crossing
// and a rail crossing on either side of a central district) are two places
// unless their days move together. A pair weak on every analysed day has
// no variance and joins nothing.
//
// Each place is returned as its edges sorted by From, To; places are
// sorted by their first edge.
func places(dayCandidates [][]EdgeKey, minSupport int, minCorrelation float64) [][]EdgeKey {
	nDays := len(dayCandidates)
	words := (nDays + 63) / 64
	edgeDays := map[EdgeKey][]uint64{}
	for d, cands := range dayCandidates {
		for _, e := range cands {
			set := edgeDays[e]
			if set == nil {
				set = make([]uint64, words)
				edgeDays[e] = set
			}
			set[d/64] |= 1 << (d % 64)
		}
	}
	var recurring []EdgeKey
	for e, set := range edgeDays {
		if countDays(set) >= minSupport {
			recurring = append(recurring, e)
		}
	}
	slices.SortFunc(recurring, groups.CompareEdges)

	// Region pairs, numbered in order of their first recurring edge.
	type pair struct{ a, b int }
	pairOf := func(e EdgeKey) pair { return pair{min(e.From, e.To), max(e.From, e.To)} }
	pairIndex := map[pair]int{}
	var pairs []pair
	var pairDays [][]uint64
	var pairEdges [][]EdgeKey
	for _, e := range recurring {
		p := pairOf(e)
		i, ok := pairIndex[p]
		if !ok {
			i = len(pairs)
			pairIndex[p] = i
			pairs = append(pairs, p)
			pairDays = append(pairDays, make([]uint64, words))
			pairEdges = append(pairEdges, nil)
		}
		pairEdges[i] = append(pairEdges[i], e)
		for w, x := range edgeDays[e] {
			pairDays[i][w] |= x
		}
	}
	// together reports whether an edge of pair i and an edge of pair j
	// were candidates together on at least minSupport days: the two edges
	// share a region, so they form a recurring group.
	together := func(i, j int) bool {
		for _, e := range pairEdges[i] {
			for _, f := range pairEdges[j] {
				both := 0
				for w, x := range edgeDays[e] {
					both += bits.OnesCount64(x & edgeDays[f][w])
				}
				if both >= minSupport {
					return true
				}
			}
		}
		return false
	}
	counts := make([]int, len(pairs))
	for i := range pairs {
		counts[i] = countDays(pairDays[i])
	}

	// Join the correlated pairs around each region.
	byRegion := map[int][]int{}
	for i, p := range pairs {
		byRegion[p.a] = append(byRegion[p.a], i)
		byRegion[p.b] = append(byRegion[p.b], i)
	}
	regions := make([]int, 0, len(byRegion))
	for r := range byRegion {
		regions = append(regions, r)
	}
	slices.Sort(regions)
	parent := make([]int, len(pairs))
	for i := range parent {
		parent[i] = i
	}
	var find func(int) int
	find = func(i int) int {
		for parent[i] != i {
			parent[i] = parent[parent[i]]
			i = parent[i]
		}
		return i
	}
	for _, r := range regions {
		around := byRegion[r]
		for x, i := range around {
			for _, j := range around[x+1:] {
				if find(i) == find(j) {
					continue
				}
				both := 0
				for w := range words {
					both += bits.OnesCount64(pairDays[i][w] & pairDays[j][w])
				}
				if !(phi(nDays, counts[i], counts[j], both) >= minCorrelation) || !together(i, j) {
					continue
				}
				parent[find(j)] = find(i)
			}
		}
	}

	byRoot := map[int][]EdgeKey{}
	for _, e := range recurring {
		root := find(pairIndex[pairOf(e)])
		byRoot[root] = append(byRoot[root], e)
	}
	out := make([][]EdgeKey, 0, len(byRoot))
	for _, edges := range byRoot {
		out = append(out, edges) // sorted: recurring is
	}
	slices.SortFunc(out, func(a, b []EdgeKey) int { return groups.CompareEdges(a[0], b[0]) })
	return out
}

// phi is the correlation of two 0/1 daily series over n days, one true on
// a days, the other on b, both on ab. A series with no variance gives
// NaN, which no threshold passes.
func phi(n, a, b, ab int) float64 {
	num := float64(n)*float64(ab) - float64(a)*float64(b)
	den := math.Sqrt(float64(a) * float64(n-a) * float64(b) * float64(n-b))
	if den == 0 {
		return math.NaN()
	}
	return num / den
}

func countDays(set []uint64) int {
	n := 0
	for _, w := range set {
		n += bits.OnesCount64(w)
	}
	return n
}
