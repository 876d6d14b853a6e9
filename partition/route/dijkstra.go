package route

import "math"

// Search is the state of shortest-time searches on one network, reused
// from one origin to the next (its arrays are reset by generation, not
// cleared).
type Search struct {
	net     *Network
	secs    []float64
	metres  []float64
	viaLink []int32 // candidate link used on the path, -1 for none
	stamp   []uint32
	done    []uint32
	gen     uint32
	heap    nodeHeap
}

// NewSearch returns a search over n.
func NewSearch(n *Network) *Search {
	k := n.Nodes()
	return &Search{net: n, secs: make([]float64, k), metres: make([]float64, k), viaLink: make([]int32, k),
		stamp: make([]uint32, k), done: make([]uint32, k)}
}

// From runs Dijkstra from src until every node of targets is settled (all
// nodes when targets is empty). Ties between equal times go to the path
// found first, in edge order, so results are deterministic.
func (s *Search) From(src int, targets []int) {
	s.gen++
	if s.gen == 0 { // wrapped: clear once every 4 billion searches
		clear(s.stamp)
		clear(s.done)
		s.gen = 1
	}
	n := s.net
	left := len(targets)
	want := map[int32]bool{}
	for _, t := range targets {
		if !want[int32(t)] {
			want[int32(t)] = true
		}
	}
	left = len(want)
	s.heap = s.heap[:0]
	s.set(int32(src), 0, 0, -1)
	s.heap.push(heapItem{0, int32(src)})
	for len(s.heap) > 0 {
		it := s.heap.pop()
		u := it.node
		if s.done[u] == s.gen || it.secs > s.secs[u] {
			continue
		}
		s.done[u] = s.gen
		if len(want) > 0 && want[u] {
			left--
			if left == 0 {
				return
			}
		}
		for e := n.first[u]; e < n.first[u+1]; e++ {
			v := n.head[e]
			if s.done[v] == s.gen {
				continue
			}
			t := s.secs[u] + n.secs[e]
			if s.stamp[v] != s.gen || t < s.secs[v] {
				l := s.viaLink[u]
				if n.link != nil && n.link[e] >= 0 {
					l = n.link[e]
				}
				s.set(v, t, s.metres[u]+n.metres[e], l)
				s.heap.push(heapItem{t, v})
			}
		}
	}
}

func (s *Search) set(v int32, secs, metres float64, link int32) {
	s.stamp[v] = s.gen
	s.secs[v], s.metres[v], s.viaLink[v] = secs, metres, link
}

// Seconds is the shortest time from the last search's origin to v (+Inf
// when not reached); Metres the length of that path; Link the candidate
// link on it (-1 for none; the last one when it uses several).
func (s *Search) Seconds(v int) float64 {
	if s.done[v] != s.gen {
		return math.Inf(1)
	}
	return s.secs[v]
}

func (s *Search) Metres(v int) float64 {
	if s.done[v] != s.gen {
		return math.Inf(1)
	}
	return s.metres[v]
}

func (s *Search) Link(v int) int {
	if s.done[v] != s.gen {
		return -1
	}
	return int(s.viaLink[v])
}

type heapItem struct {
	secs float64
	node int32
}

// nodeHeap is a binary min-heap by time (then node, for determinism).
type nodeHeap []heapItem

func less(a, b heapItem) bool { return a.secs < b.secs || (a.secs == b.secs && a.node < b.node) }

func (h *nodeHeap) push(it heapItem) {
	*h = append(*h, it)
	a := *h
	i := len(a) - 1
	for i > 0 {
		p := (i - 1) / 2
		if !less(a[i], a[p]) {
			break
		}
		a[i], a[p] = a[p], a[i]
		i = p
	}
}

func (h *nodeHeap) pop() heapItem {
	a := *h
	top := a[0]
	last := len(a) - 1
	a[0] = a[last]
	a = a[:last]
	i := 0
	for {
		l, r, m := 2*i+1, 2*i+2, i
		if l < len(a) && less(a[l], a[m]) {
			m = l
		}
		if r < len(a) && less(a[r], a[m]) {
			m = r
		}
		if m == i {
			break
		}
		a[i], a[m] = a[m], a[i]
		i = m
	}
	*h = a
	return top
}
