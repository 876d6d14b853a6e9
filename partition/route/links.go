package route

import (
	"fmt"
	"maps"
	"slices"

	"github.com/paulmach/orb"

	"narrows/partition/geodesy"
)

// Link is a candidate road to add: a way of an extract with the scheme
// built (Nodes holds its OSM node ids) or a line drawn by hand (Nodes nil).
type Link struct {
	Name  string
	Class string
	Line  orb.LineString
	Nodes []int64
	// Oneway as in partition.RoadWay; MaxSpeedKMH 0 takes the class speed.
	Oneway      int8
	MaxSpeedKMH float64
	// Crossing: the link is a bridge, tunnel or ford, so it may cross a
	// barrier.
	Crossing bool
}

// LengthMetres is the link's length along its line.
func (l Link) LengthMetres() float64 {
	m := 0.0
	for i := 1; i < len(l.Line); i++ {
		m += geodesy.GreatCircleMetres(l.Line[i-1], l.Line[i])
	}
	return m
}

// WithLinks returns a copy of n with the links added. A link's point that
// is a node of n (by OSM id) joins there; its two ends, when not, join the
// nearest node attach gives within attachMetres; other points become new
// nodes. A link that crosses a barrier without Crossing, or whose end is
// not near the network, is an error naming it.
func (n *Network) WithLinks(links []Link, attach *Snapper, attachMetres float64) (*Network, error) {
	out := &Network{
		Points: slices.Clone(n.Points), OSMIDs: slices.Clone(n.OSMIDs), Rank: slices.Clone(n.Rank),
		Dropped: n.Dropped, index: n.index, barriers: n.barriers, proj: n.proj, opts: n.opts,
	}
	out.baseNodes = len(n.Points)
	edges := n.edgesOut()
	for li, l := range links {
		if len(l.Line) < 2 {
			return nil, fmt.Errorf("route: candidate %q has fewer than two points", l.Name)
		}
		if len(l.Nodes) != 0 && len(l.Nodes) != len(l.Line) {
			return nil, fmt.Errorf("route: candidate %q: %d node ids for %d points", l.Name, len(l.Nodes), len(l.Line))
		}
		speed := out.speedOf(l.Class, l.MaxSpeedKMH)
		rank := int8(ClassRank(l.Class))
		prev := int32(-1)
		for j, p := range l.Line {
			var id int64
			if l.Nodes != nil {
				id = l.Nodes[j]
			}
			v, known := n.index[id]
			if id == 0 || !known {
				if j == 0 || j == len(l.Line)-1 {
					s, d, ok := attach.Nearest(p, attachMetres)
					if !ok {
						return nil, fmt.Errorf("route: candidate %q: its end at %.6f,%.6f is not within %.0f m of a road of the network (outside the study area, or not joined to it)", l.Name, p[0], p[1], attachMetres)
					}
					_ = d
					v = int32(s)
				} else {
					v = out.addNode(0, p)
				}
			}
			out.Rank[v] = min(out.Rank[v], rank)
			if prev >= 0 && prev != v {
				a, b := out.Points[prev], out.Points[v]
				if !l.Crossing {
					var ida, idb int64
					if l.Nodes != nil {
						ida, idb = l.Nodes[j-1], l.Nodes[j]
					}
					if bw, kind, at, hit := n.barriers.crossed(a, b, ida, idb); hit {
						return nil, fmt.Errorf("route: candidate %q crosses the %s (OSM way %d) at %.6f,%.6f but is not tagged as a bridge, tunnel or ford", l.Name, kind, bw, at[0], at[1])
					}
				}
				m := geodesy.GreatCircleMetres(a, b)
				s := m / geodesy.MPS(speed)
				if l.Oneway >= 0 {
					edges = append(edges, edge{prev, v, s, m, int32(li)})
				}
				if l.Oneway <= 0 {
					edges = append(edges, edge{v, prev, s, m, int32(li)})
				}
			}
			prev = v
		}
	}
	out.compress(edges)
	return out, nil
}

// LinkEntries lists the nodes of the network WithLinks started from (in
// order) from which an edge of an added link leaves. A path that uses a
// link reaches one of them first over that network's roads, so a link
// cannot shorten a trip whose destination is no farther from its origin
// than every entry is (Appraise skips those searches).
func (n *Network) LinkEntries() []int { return slices.Clone(n.entries()) }

// entries computes LinkEntries once.
func (n *Network) entries() []int {
	n.entriesOnce.Do(func() { n.linkEntries = n.findEntries() })
	return n.linkEntries
}

func (n *Network) findEntries() []int {
	var out []int
	if n.link == nil {
		return nil
	}
	for u := 0; u < n.baseNodes; u++ {
		for e := n.first[u]; e < n.first[u+1]; e++ {
			if n.link[e] >= 0 {
				out = append(out, u)
				break
			}
		}
	}
	return out
}

// Crosses reports the first barrier (kind and OSM way) that the line a-b
// crosses, for generated candidates.
func (n *Network) Crosses(a, b orb.Point) (kind string, way int64, ok bool) {
	way, kind, _, ok = n.barriers.crossed(a, b, 0, 0)
	return kind, way, ok
}

// Index returns a copy of the OSM id to node map (for tests).
func (n *Network) Index() map[int64]int32 { return maps.Clone(n.index) }
