package route

import "math"

// Search is the state of shortest-time searches on one network, reused
// from one origin to the next: its arrays are allocated once and reset by
// generation stamps, not cleared, so a search costs only the nodes it
// touches.
type Search struct {
	net   *Network
	state []nodeState
	gen   uint32
	heap  []heapItem // a 4-ary min-heap by (secs, node)
	// The network's edges packed for the search's inner loop (one cache
	// line holds two edges' head, link, seconds and metres).
	arcs []arc
}

// nodeState is one node's search state; the fields are valid when stamp
// equals the search's generation.
type nodeState struct {
	secs, metres float64
	link         int32  // candidate link used on the path, -1 for none
	stamp        uint32 // generation in which the node was reached
	pos          int32  // index in the heap; -1 once settled
	target       uint32 // generation in which the node is a target
}

type heapItem struct {
	secs float64
	node int32
}

type arc struct {
	head, link   int32
	secs, metres float64
}

// NewSearch returns a search over n.
func NewSearch(n *Network) *Search {
	return &Search{net: n, state: make([]nodeState, n.Nodes())}
}

// pack builds the packed edges on the first search.
func (s *Search) pack() {
	n := s.net
	s.arcs = make([]arc, len(n.head))
	for e := range s.arcs {
		s.arcs[e] = arc{head: n.head[e], link: -1, secs: n.secs[e], metres: n.metres[e]}
		if n.link != nil {
			s.arcs[e].link = n.link[e]
		}
	}
}

// From runs Dijkstra from src until every node of targets is settled (all
// reachable nodes when targets is empty). Ties between equal times go to
// the path found first, in edge order, and nodes of equal time settle in
// node order, so results are deterministic.
func (s *Search) From(src int, targets []int) {
	if s.arcs == nil {
		s.pack()
	}
	s.gen++
	if s.gen == 0 { // wrapped: clear once every 4 billion searches
		clear(s.state)
		s.gen = 1
	}
	gen := s.gen
	st := s.state
	left := 0
	for _, t := range targets {
		if st[t].target != gen {
			st[t].target = gen
			left++
		}
	}
	first, arcs := s.net.first, s.arcs
	s.heap = s.heap[:0]
	st[src] = nodeState{secs: 0, metres: 0, link: -1, stamp: gen, target: st[src].target}
	s.push(heapItem{0, int32(src)})
	for len(s.heap) > 0 {
		u := s.pop()
		su := &st[u]
		su.pos = -1
		if su.target == gen {
			left--
			if left == 0 {
				return
			}
		}
		for e := first[u]; e < first[u+1]; e++ {
			a := &arcs[e]
			v := a.head
			sv := &st[v]
			t := su.secs + a.secs
			l := su.link
			if a.link >= 0 {
				l = a.link
			}
			switch {
			case sv.stamp != gen:
				sv.secs, sv.metres, sv.link, sv.stamp = t, su.metres+a.metres, l, gen
				s.push(heapItem{t, v})
			case sv.pos >= 0 && t < sv.secs:
				sv.secs, sv.metres, sv.link = t, su.metres+a.metres, l
				s.heap[sv.pos].secs = t
				s.up(int(sv.pos))
			}
		}
	}
}

// settled reports whether v was settled by the last search.
func (s *Search) settled(v int) bool {
	return v < len(s.state) && s.state[v].stamp == s.gen && s.state[v].pos < 0
}

// Seconds is the shortest time from the last search's origin to v (+Inf
// when not settled); Metres the length of that path; Link the candidate
// link on it (-1 for none; the last one when it uses several).
func (s *Search) Seconds(v int) float64 {
	if !s.settled(v) {
		return math.Inf(1)
	}
	return s.state[v].secs
}

func (s *Search) Metres(v int) float64 {
	if !s.settled(v) {
		return math.Inf(1)
	}
	return s.state[v].metres
}

func (s *Search) Link(v int) int {
	if !s.settled(v) {
		return -1
	}
	return int(s.state[v].link)
}

// before orders heap entries by time, then node.
func before(a, b heapItem) bool {
	return a.secs < b.secs || (a.secs == b.secs && a.node < b.node)
}

func (s *Search) push(it heapItem) {
	s.heap = append(s.heap, it)
	s.up(len(s.heap) - 1)
}

// up moves the entry at i towards the root while it orders before its
// parent, keeping the nodes' heap positions.
func (s *Search) up(i int) {
	h := s.heap
	it := h[i]
	for i > 0 {
		p := (i - 1) / 4
		if !before(it, h[p]) {
			break
		}
		h[i] = h[p]
		s.state[h[i].node].pos = int32(i)
		i = p
	}
	h[i] = it
	s.state[it.node].pos = int32(i)
}

func (s *Search) pop() int32 {
	h := s.heap
	top := h[0].node
	last := h[len(h)-1]
	h = h[:len(h)-1]
	s.heap = h
	if len(h) == 0 {
		return top
	}
	i := 0
	for {
		c := 4*i + 1
		if c >= len(h) {
			break
		}
		m := c
		for k := c + 1; k < c+4 && k < len(h); k++ {
			if before(h[k], h[m]) {
				m = k
			}
		}
		if !before(h[m], last) {
			break
		}
		h[i] = h[m]
		s.state[h[i].node].pos = int32(i)
		i = m
	}
	h[i] = last
	s.state[last.node].pos = int32(i)
	return top
}

// Repair finds, on a network with links (net, made by WithLinks from the
// network base searched on), the nodes that the links make strictly
// quicker to reach from base's last origin than base settled them, with
// their new times, lengths and links, up to (not including) bound: base's
// times are exact on the network without links, so only paths leaving
// through a link edge can improve, and a Dijkstra seeded at the link
// entries that expands a node only when it improves on base settles just
// the improved part. A node base did not settle counts as unreached
// (base settles every node quicker than its stop), which is exact below a
// bound no greater than the time of the last node base settled. After it,
// Improved reports the improved nodes, and Seconds, Metres and Link give
// their values. s keeps its arrays from one repair (or network) to the
// next.
func (s *Search) Repair(net *Network, base *Search, bound float64) {
	if s.net != net {
		s.net, s.arcs = net, nil
		if len(s.state) < net.Nodes() {
			s.state = append(s.state, make([]nodeState, net.Nodes()-len(s.state))...)
		}
	}
	s.gen++
	if s.gen == 0 {
		clear(s.state)
		s.gen = 1
	}
	gen, st := s.gen, s.state
	baseNodes := base.net.Nodes()
	baseSecs := func(v int32) float64 {
		if int(v) < baseNodes && base.settled(int(v)) {
			return base.state[v].secs
		}
		return math.Inf(1)
	}
	relax := func(v int32, t, m float64, l int32) {
		if !(t < bound) || !(t < baseSecs(v)) {
			return
		}
		sv := &st[v]
		switch {
		case sv.stamp != gen:
			sv.secs, sv.metres, sv.link, sv.stamp = t, m, l, gen
			s.push(heapItem{t, v})
		case sv.pos >= 0 && t < sv.secs:
			sv.secs, sv.metres, sv.link = t, m, l
			s.heap[sv.pos].secs = t
			s.up(int(sv.pos))
		}
	}
	s.heap = s.heap[:0]
	for _, u := range net.entries() {
		if u >= baseNodes || !base.settled(u) {
			continue
		}
		bu := base.state[u]
		for e := net.first[u]; e < net.first[u+1]; e++ {
			if l := net.link[e]; l >= 0 {
				relax(net.head[e], bu.secs+net.secs[e], bu.metres+net.metres[e], l)
			}
		}
	}
	for len(s.heap) > 0 {
		u := s.pop()
		su := &st[u]
		su.pos = -1
		for e := net.first[u]; e < net.first[u+1]; e++ {
			l := su.link
			if net.link != nil && net.link[e] >= 0 {
				l = net.link[e]
			}
			relax(net.head[e], su.secs+net.secs[e], su.metres+net.metres[e], l)
		}
	}
}

// Improved reports whether the last Repair made v quicker to reach.
func (s *Search) Improved(v int) bool { return s.settled(v) }
