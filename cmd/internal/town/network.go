package town

import (
	"context"
	"fmt"
	"math"
	"runtime"
	"sort"
	"strconv"
	"sync"

	"gonum.org/v1/gonum/graph"
	"gonum.org/v1/gonum/graph/path"
	"gonum.org/v1/gonum/graph/simple"

	"narrows/partition/geodesy"
)

// network is a directed street network for routing: nodes with positions in
// local metres and links with length, free-flow time and capacity.
type network struct {
	pos      []xy
	osm      []int64 // OSM node id per node (nil for gridNetwork)
	links    []link
	inStart  []int32 // CSR of incoming links by head node
	inLinks  []int32
	outStart []int32 // CSR of outgoing links by tail node
	outLinks []int32
	nodes    []graph.Node // node i as a gonum node, boxed once
}

type link struct {
	from, to int32
	length   float64 // metres
	t0       float64 // free-flow seconds, including the delay at the head junction
	capacity float64 // vehicles per hour
	major    bool    // secondary or above: an incident candidate
}

// Capacities per lane and per hour, and free-flow speed as a share of the
// posted limit. Common practice values for urban roads, from memory: an
// interrupted (signalised) arterial lane passes 800-1000 vehicles an hour, a
// grade-separated or lightly junctioned lane about 1800, local streets less.
var laneCapacity = map[string]float64{
	"trunk": 1800, "primary": 900, "secondary": 800, "tertiary": 600, "residential": 400,
}

const (
	freeFlowShare = 0.9  // free-flow speed / posted limit
	signalDelay   = 20.0 // mean delay at a signalised junction, s (common practice magnitude, 15-30 s)
	junctionDelay = 4.0  // mean delay at an unsignalised junction, s
	crossingDelay = 5.0  // mean delay at a level crossing, s
)

// networkOf builds the routing network of the town, with or without the link.
// Link indices of the network without the link are a prefix of those with it.
func (t *Town) networkOf(withLink bool) (*network, error) {
	ways := t.ways
	if withLink && t.Link != nil {
		ways = append(append([]Way(nil), t.ways...), *t.Link)
	}
	nb := newNetworkBuilder(t.local)
	for wi := range ways {
		if err := nb.addWay(&ways[wi]); err != nil {
			return nil, err
		}
	}
	return nb.finish(t.nodeTags()), nil
}

// nodeTags returns the tags of the town's tagged nodes by node id.
func (t *Town) nodeTags() map[int64][]tag {
	nodeTags := make(map[int64][]tag)
	for _, n := range t.nodes {
		if len(n.Tags) > 0 {
			nodeTags[n.ID] = n.Tags
		}
	}
	return nodeTags
}

// networkBuilder turns ways into network nodes and links, in way order.
type networkBuilder struct {
	local []xy    // local metres of every OSM node, index = id-1
	index []int32 // network node of each OSM node id, -1: none yet
	nw    *network
	seen  map[nodePair]bool        // directed node pairs that have a link
	deg   map[int32]map[int32]bool // neighbours of each node, either direction
	links []link                   // without the delay at the head junction
}

type nodePair struct{ a, b int32 }

func newNetworkBuilder(local []xy) *networkBuilder {
	index := make([]int32, len(local)+1)
	for i := range index {
		index[i] = -1
	}
	return &networkBuilder{local: local, index: index, nw: &network{},
		seen: make(map[nodePair]bool), deg: make(map[int32]map[int32]bool)}
}

// addWay adds a link for each direction of travel along each segment of a
// street, with its length, free-flow time and capacity; other ways add
// nothing.
func (nb *networkBuilder) addWay(w *Way) error {
	nw, index := nb.nw, nb.index
	hw := w.Tag("highway")
	lc, ok := laneCapacity[hw]
	if !ok {
		return nil
	}
	lanes, err := strconv.Atoi(w.Tag("lanes"))
	if err != nil || lanes < 1 {
		lanes = 2
	}
	speed, err := strconv.ParseFloat(w.Tag("maxspeed"), 64)
	if err != nil || speed <= 0 {
		return fmt.Errorf("town: way %d: maxspeed %q is not a positive number", w.id, w.Tag("maxspeed"))
	}
	oneway := w.Tag("oneway") == "yes"
	// Lanes per direction; a single lane shared by both directions
	// (alternate working) gives each half of it.
	perDir := float64(lanes) / 2
	if oneway {
		perDir = float64(lanes)
	}
	v := geodesy.MPS(speed) * freeFlowShare
	for k := 1; k < len(w.nodes); k++ {
		a, b := w.nodes[k-1], w.nodes[k]
		if a <= 0 || b <= 0 || int(a) >= len(index) || int(b) >= len(index) {
			return fmt.Errorf("town: way %d: node %d or %d unknown", w.id, a, b)
		}
		for _, id := range []int64{a, b} {
			if index[id] < 0 {
				index[id] = int32(len(nw.pos))
				nw.pos = append(nw.pos, nb.local[id-1])
			}
		}
		ia, ib := index[a], index[b]
		length := dist(nw.pos[ia], nw.pos[ib])
		for _, d := range [][2]int32{{ia, ib}, {ib, ia}} {
			if d == [2]int32{ib, ia} && oneway {
				continue
			}
			if nb.seen[nodePair{d[0], d[1]}] {
				continue
			}
			nb.seen[nodePair{d[0], d[1]}] = true
			nb.links = append(nb.links, link{from: d[0], to: d[1], length: length, t0: length / v,
				capacity: lc * perDir, major: hw == "trunk" || hw == "primary" || hw == "secondary"})
		}
		for _, d := range [][2]int32{{ia, ib}, {ib, ia}} {
			if nb.deg[d[0]] == nil {
				nb.deg[d[0]] = make(map[int32]bool)
			}
			nb.deg[d[0]][d[1]] = true
		}
	}
	return nil
}

// finish adds the delay at each link's head junction (signals, a level
// crossing, or a junction of three or more streets) and indexes the
// network.
func (nb *networkBuilder) finish(nodeTags map[int64][]tag) *network {
	nw := nb.nw
	osmOf := make([]int64, len(nw.pos))
	for id, ix := range nb.index {
		if ix >= 0 {
			osmOf[ix] = int64(id)
		}
	}
	nw.osm = osmOf
	for _, l := range nb.links {
		head := osmOf[l.to]
		switch tagValue(nodeTags[head], "highway", "railway") {
		case "traffic_signals":
			l.t0 += signalDelay
		case "level_crossing":
			l.t0 += levelCrossingDelay(nodeTags[head])
		default:
			if len(nb.deg[l.to]) >= 3 {
				l.t0 += junctionDelay
			}
		}
		nw.links = append(nw.links, l)
	}
	nw.finish()
	return nw
}

func tagValue(tags []tag, keys ...string) string {
	for _, k := range keys {
		for _, t := range tags {
			if t.Key == k {
				return t.Value
			}
		}
	}
	return ""
}

func dist(a, b xy) float64 { return math.Hypot(a.X-b.X, a.Y-b.Y) }

// gridNetwork returns an uncongested square grid of n x n nodes, spacing
// metres apart, with two-way links of equal speed: the geometry check of
// the routing (shortest paths on it are Manhattan paths).
func gridNetwork(n int, spacing float64) (*network, error) {
	if n < 2 || n > 2000 || spacing <= 0 || math.IsNaN(spacing) || math.IsInf(spacing, 0) {
		return nil, fmt.Errorf("town: grid of %d x %d nodes at %v m: need 2 <= n <= 2000 and a positive finite spacing", n, n, spacing)
	}
	nw := &network{}
	for j := 0; j < n; j++ {
		for i := 0; i < n; i++ {
			nw.pos = append(nw.pos, xy{float64(i) * spacing, float64(j) * spacing})
		}
	}
	add := func(a, b int) {
		for _, d := range [][2]int{{a, b}, {b, a}} {
			nw.links = append(nw.links, link{from: int32(d[0]), to: int32(d[1]), length: spacing, t0: spacing / 10, capacity: 1000})
		}
	}
	for j := 0; j < n; j++ {
		for i := 0; i < n; i++ {
			if i+1 < n {
				add(j*n+i, j*n+i+1)
			}
			if j+1 < n {
				add(j*n+i, (j+1)*n+i)
			}
		}
	}
	nw.finish()
	return nw, nil
}

// finish builds the incoming-link index and the gonum graph.
func (nw *network) finish() {
	n := len(nw.pos)
	nw.inStart = make([]int32, n+1)
	for _, l := range nw.links {
		nw.inStart[l.to+1]++
	}
	for i := 0; i < n; i++ {
		nw.inStart[i+1] += nw.inStart[i]
	}
	nw.inLinks = make([]int32, len(nw.links))
	fill := append([]int32(nil), nw.inStart[:n]...)
	for li, l := range nw.links {
		nw.inLinks[fill[l.to]] = int32(li)
		fill[l.to]++
	}
	nw.outStart = make([]int32, n+1)
	for _, l := range nw.links {
		nw.outStart[l.from+1]++
	}
	for i := 0; i < n; i++ {
		nw.outStart[i+1] += nw.outStart[i]
	}
	nw.outLinks = make([]int32, len(nw.links))
	fill = append(fill[:0], nw.outStart[:n]...)
	for li, l := range nw.links {
		nw.outLinks[fill[l.from]] = int32(li)
		fill[l.from]++
	}
	nw.nodes = make([]graph.Node, n)
	for i := range nw.nodes {
		nw.nodes[i] = simple.Node(i)
	}
}

// weighted is the network as a gonum graph (traverse.Graph and
// path.Weighted) under one set of link weights. It is read-only, so
// several Dijkstra runs may share it.
type weighted struct {
	nw *network
	w  []float64
}

func (g weighted) From(id int64) graph.Nodes {
	if id < 0 || id >= int64(len(g.nw.pos)) {
		return graph.Empty
	}
	out := g.nw.outLinks[g.nw.outStart[id]:g.nw.outStart[id+1]]
	if len(out) == 0 {
		return graph.Empty
	}
	return &outNodes{nw: g.nw, out: out, pos: -1}
}

func (g weighted) Edge(uid, vid int64) graph.Edge {
	if _, ok := g.Weight(uid, vid); !ok || uid == vid {
		return nil
	}
	return simple.Edge{F: g.nw.nodes[uid], T: g.nw.nodes[vid]}
}

// Weight returns the weight of the link from x to y (0 for x == y).
func (g weighted) Weight(xid, yid int64) (float64, bool) {
	if xid < 0 || xid >= int64(len(g.nw.pos)) {
		return 0, false
	}
	if xid == yid {
		return 0, true
	}
	for _, li := range g.nw.outLinks[g.nw.outStart[xid]:g.nw.outStart[xid+1]] {
		if int64(g.nw.links[li].to) == yid {
			return g.w[li], true
		}
	}
	return 0, false
}

// outNodes iterates over the heads of a node's outgoing links.
type outNodes struct {
	nw  *network
	out []int32
	pos int
}

func (it *outNodes) Next() bool {
	if it.pos+1 >= len(it.out) {
		it.pos = len(it.out)
		return false
	}
	it.pos++
	return true
}
func (it *outNodes) Len() int { return max(len(it.out)-it.pos-1, 0) }
func (it *outNodes) Reset()   { it.pos = -1 }
func (it *outNodes) Node() graph.Node {
	if it.pos < 0 || it.pos >= len(it.out) {
		return nil
	}
	return it.nw.nodes[it.nw.links[it.out[it.pos]].to]
}

// tree is one shortest-path tree: per node its distance (the weight), its
// parent link (-1 for the root and unreachable nodes), and the reachable
// nodes in ascending (distance, index) order.
type tree struct {
	dist   []float64
	parent []int32
	order  []int32
	heap   []heapItem // scratch for heapTree
}

func newTree(n int) *tree {
	return &tree{dist: make([]float64, n), parent: make([]int32, n), order: make([]int32, 0, n)}
}

// gonumNodeLimit is the largest network routed with gonum's DijkstraFrom.
// Its shortest-path tree keeps a map from node id to index and boxes every
// node in the priority queue, about 1.7 MB of allocation per tree on the
// city's 6,500 nodes, which makes a city assignment (8,000 trees) take
// minutes. Larger networks use heapTree, the same algorithm on slices;
// TestHeapTreeMatchesGonum checks that both give the same trees.
const gonumNodeLimit = 2000

// shortestTree fills tr with the tree from root under the link weights.
// The parent of each node is its incoming link with the least
// dist(from)+weight, ties to the lower link index, which makes the tree
// independent of the order in which the search met the nodes.
func (nw *network) shortestTree(root int, weights []float64, tr *tree) {
	n := len(nw.pos)
	if n > gonumNodeLimit {
		nw.heapTree(root, weights, tr)
	} else {
		sh := path.DijkstraFrom(nw.nodes[root], weighted{nw, weights})
		tr.order = tr.order[:0]
		for v := 0; v < n; v++ {
			tr.dist[v] = sh.WeightTo(int64(v))
			if !math.IsInf(tr.dist[v], 1) {
				tr.order = append(tr.order, int32(v))
			}
		}
		sort.Slice(tr.order, func(a, b int) bool {
			da, db := tr.dist[tr.order[a]], tr.dist[tr.order[b]]
			if da != db {
				return da < db
			}
			return tr.order[a] < tr.order[b]
		})
	}
	for v := 0; v < n; v++ {
		tr.parent[v] = -1
		if v == root || math.IsInf(tr.dist[v], 1) {
			continue
		}
		best := math.Inf(1)
		for _, li := range nw.inLinks[nw.inStart[v]:nw.inStart[v+1]] {
			l := &nw.links[li]
			if d := tr.dist[l.from] + weights[li]; d < best {
				best, tr.parent[v] = d, li
			}
		}
	}
}

type heapItem struct {
	dist float64
	node int32
}

func (a heapItem) less(b heapItem) bool {
	return a.dist < b.dist || (a.dist == b.dist && a.node < b.node)
}

// heapTree is Dijkstra's algorithm with a binary heap keyed by (distance,
// node) and lazy deletion. Nodes settle in ascending (distance, node)
// order: with positive weights every node of distance d is in the heap
// with its final key before the first of them is popped.
func (nw *network) heapTree(root int, weights []float64, tr *tree) {
	for v := range tr.dist {
		tr.dist[v] = math.Inf(1)
	}
	tr.order = tr.order[:0]
	h := tr.heap[:0]
	tr.dist[root] = 0
	h = append(h, heapItem{0, int32(root)})
	for len(h) > 0 {
		top := h[0]
		last := len(h) - 1
		h[0] = h[last]
		h = h[:last]
		for i := 0; ; { // sift down
			l, r, m := 2*i+1, 2*i+2, i
			if l < len(h) && h[l].less(h[m]) {
				m = l
			}
			if r < len(h) && h[r].less(h[m]) {
				m = r
			}
			if m == i {
				break
			}
			h[i], h[m] = h[m], h[i]
			i = m
		}
		u := top.node
		if top.dist > tr.dist[u] {
			continue // stale
		}
		tr.order = append(tr.order, u)
		for _, li := range nw.outLinks[nw.outStart[u]:nw.outStart[u+1]] {
			v := nw.links[li].to
			if d := top.dist + weights[li]; d < tr.dist[v] {
				tr.dist[v] = d
				h = append(h, heapItem{d, v})
				for i := len(h) - 1; i > 0; { // sift up
					p := (i - 1) / 2
					if !h[i].less(h[p]) {
						break
					}
					h[i], h[p] = h[p], h[i]
					i = p
				}
			}
		}
	}
	tr.heap = h
}

// shortestLengths returns, for each node in from, the length in metres of
// the shortest-length path to every node (+Inf where unreachable). Node
// indices of a gridNetwork are j*n+i.
func (nw *network) shortestLengths(from ...int) ([][]float64, error) {
	lengths := make([]float64, len(nw.links))
	for i, l := range nw.links {
		lengths[i] = l.length
	}
	g := weighted{nw, lengths}
	out := make([][]float64, len(from))
	for k, f := range from {
		if f < 0 || f >= len(nw.pos) {
			return nil, fmt.Errorf("town: node %d out of range [0,%d)", f, len(nw.pos))
		}
		sh := path.DijkstraFrom(nw.nodes[f], g)
		row := make([]float64, len(nw.pos))
		for v := range row {
			row[v] = sh.WeightTo(int64(v))
		}
		out[k] = row
	}
	return out, nil
}

// nodePoint returns node v's position in local metres.
func (nw *network) nodePoint(v int) (x, y float64) { return nw.pos[v].X, nw.pos[v].Y }

// parallel runs job(chunk) for chunk = 0..chunks-1 on up to GOMAXPROCS
// workers. Callers keep per-chunk results and combine them in chunk order,
// so the outcome does not depend on scheduling.
func parallel(ctx context.Context, chunks int, job func(chunk int)) error {
	workers := runtime.GOMAXPROCS(0)
	if workers > chunks {
		workers = chunks
	}
	next := make(chan int)
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for c := range next {
				job(c)
			}
		}()
	}
	var err error
	for c := 0; c < chunks; c++ {
		if err = ctx.Err(); err != nil {
			break
		}
		next <- c
	}
	close(next)
	wg.Wait()
	return err
}
