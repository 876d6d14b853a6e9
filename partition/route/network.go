package route

import (
	"cmp"
	"context"
	"errors"
	"fmt"
	"slices"
	"sync"

	"github.com/paulmach/orb"

	"narrows/partition"
	"narrows/partition/geodesy"
)

// Network is a directed road graph in compressed adjacency form.
type Network struct {
	// Points are the nodes' positions (WGS84); OSMIDs their OSM ids (0 for
	// nodes a candidate link added).
	Points []orb.Point
	OSMIDs []int64
	// Rank is the highest class (ClassRank, lower is higher) of the roads
	// at each node; Degree the number of distinct neighbours.
	Rank   []int8
	Degree []int32
	// Dropped are the road segments left out because they cross a barrier
	// without a crossing in the data.
	Dropped []DroppedSegment

	first  []int32 // edges of node u are first[u]..first[u+1]
	head   []int32
	secs   []float64
	metres []float64
	link   []int32 // candidate link index per edge, -1 for the base network; nil when none

	// baseNodes is the number of nodes before WithLinks added any: the
	// nodes from which LinkEntries are taken.
	baseNodes   int
	entriesOnce sync.Once
	linkEntries []int

	index    map[int64]int32 // OSM id -> node
	barriers *barrierIndex
	proj     geodesy.Projection
	opts     Options
}

// DroppedSegment is a road segment crossing a barrier with no bridge,
// tunnel, ford or shared node in the data.
type DroppedSegment struct {
	WayID, BarrierWayID int64
	Kind                string // barrier kind
	At                  orb.Point
}

// Nodes is the number of nodes; Edges the number of directed edges.
func (n *Network) Nodes() int { return len(n.Points) }
func (n *Network) Edges() int { return len(n.head) }

// edge is a directed edge before compression.
type edge struct {
	from, to int32
	secs     float64
	metres   float64
	link     int32
}

// Build makes the network of r's roads.
func Build(ctx context.Context, r *partition.Routing, opts Options) (*Network, error) {
	if r == nil || len(r.Roads) == 0 {
		return nil, errors.New("route: the extract holds no roads of the routable classes")
	}
	if opts.SpeedsKMH == nil {
		opts.SpeedsKMH = DefaultSpeedsKMH()
	}
	if err := opts.check(); err != nil {
		return nil, err
	}
	first := r.Roads[0].Line[0]
	n := &Network{index: make(map[int64]int32, len(r.Roads)*4), proj: geodesy.NewProjection(first), opts: opts}
	n.barriers = newBarrierIndex(r.Barriers, n.proj)
	var edges []edge
	for i, w := range r.Roads {
		if i%4096 == 0 && ctx.Err() != nil {
			return nil, ctx.Err()
		}
		speed := n.speedOf(w.Class, w.MaxSpeedKMH)
		rank := int8(ClassRank(w.Class))
		prev := int32(-1)
		for j, id := range w.Nodes {
			v := n.node(id, w.Line[j])
			n.Rank[v] = min(n.Rank[v], rank)
			if prev >= 0 {
				a, b := n.Points[prev], n.Points[v]
				if !w.Crossing {
					if bw, kind, at, ok := n.barriers.crossed(a, b, w.Nodes[j-1], id); ok {
						n.Dropped = append(n.Dropped, DroppedSegment{WayID: w.WayID, BarrierWayID: bw, Kind: kind, At: at})
						prev = v
						continue
					}
				}
				m := geodesy.GreatCircleMetres(a, b)
				s := m / geodesy.MPS(speed)
				if w.Oneway >= 0 {
					edges = append(edges, edge{prev, v, s, m, -1})
				}
				if w.Oneway <= 0 {
					edges = append(edges, edge{v, prev, s, m, -1})
				}
			}
			prev = v
		}
	}
	n.compress(edges)
	return n, nil
}

// speedOf is the free-flow speed in km/h of a way.
func (n *Network) speedOf(class string, maxspeed float64) float64 {
	if n.opts.UseMaxSpeed && maxspeed > 0 {
		return maxspeed * n.opts.MaxSpeedShare
	}
	if v, ok := n.opts.SpeedsKMH[class]; ok {
		return v
	}
	return 30
}

// node returns the index of OSM node id, adding it at p.
func (n *Network) node(id int64, p orb.Point) int32 {
	if v, ok := n.index[id]; ok {
		return v
	}
	v := n.addNode(id, p)
	n.index[id] = v
	return v
}

func (n *Network) addNode(id int64, p orb.Point) int32 {
	v := int32(len(n.Points))
	n.Points = append(n.Points, p)
	n.OSMIDs = append(n.OSMIDs, id)
	n.Rank = append(n.Rank, int8(len(classOrder)))
	return v
}

// compress sorts the edges by tail (then head, time: deterministic) into
// the adjacency arrays and counts each node's distinct neighbours.
func (n *Network) compress(edges []edge) {
	slices.SortFunc(edges, func(a, b edge) int {
		return cmp.Or(cmp.Compare(a.from, b.from), cmp.Compare(a.to, b.to), cmp.Compare(a.secs, b.secs))
	})
	nn := len(n.Points)
	n.first = make([]int32, nn+1)
	n.head = make([]int32, len(edges))
	n.secs = make([]float64, len(edges))
	n.metres = make([]float64, len(edges))
	hasLink := false
	for _, e := range edges {
		hasLink = hasLink || e.link >= 0
	}
	n.link = nil
	if hasLink {
		n.link = make([]int32, len(edges))
	}
	for i, e := range edges {
		n.first[e.from+1]++
		n.head[i], n.secs[i], n.metres[i] = e.to, e.secs, e.metres
		if hasLink {
			n.link[i] = e.link
		}
	}
	for u := 0; u < nn; u++ {
		n.first[u+1] += n.first[u]
	}
	n.Degree = make([]int32, nn)
	seen := make(map[[2]int32]bool, len(edges))
	for _, e := range edges {
		a, b := min(e.from, e.to), max(e.from, e.to)
		if !seen[[2]int32{a, b}] {
			seen[[2]int32{a, b}] = true
			n.Degree[a]++
			n.Degree[b]++
		}
	}
}

// edgesOut lists the edges as from, to, seconds, metres (for tests and
// for copying into a network with links).
func (n *Network) edgesOut() []edge {
	out := make([]edge, 0, len(n.head))
	for u := 0; u+1 < len(n.first); u++ {
		for e := n.first[u]; e < n.first[u+1]; e++ {
			l := int32(-1)
			if n.link != nil {
				l = n.link[e]
			}
			out = append(out, edge{int32(u), n.head[e], n.secs[e], n.metres[e], l})
		}
	}
	return out
}

// Arc is one directed edge, as Arcs lists them.
type Arc struct {
	From, To       int
	Seconds, Metre float64
}

// Arcs lists every directed edge (for checks against other graph code).
func (n *Network) Arcs() []Arc {
	var out []Arc
	for _, e := range n.edgesOut() {
		out = append(out, Arc{int(e.from), int(e.to), e.secs, e.metres})
	}
	return out
}

// Node returns the node of an OSM node id.
func (n *Network) Node(osmID int64) (int, bool) {
	v, ok := n.index[osmID]
	return int(v), ok
}

func (n *Network) String() string {
	return fmt.Sprintf("%d nodes, %d edges, %d segments dropped at barriers", n.Nodes(), n.Edges(), len(n.Dropped))
}
