package route

import (
	"cmp"
	"fmt"
	"slices"

	"github.com/paulmach/orb"
)

// MajorPart is a set of major-road nodes that reach each other both ways
// (one strongly connected component of the network, cut to the nodes
// asked about).
type MajorPart struct {
	// Nodes are the parts' nodes (network indices), ascending.
	Nodes []int
	// At is the position and OSMID the OSM id of the part's first node,
	// to find it on a map.
	At    orb.Point
	OSMID int64
}

// MajorReach says whether every major road can be reached from every
// other: Main is the part holding most major nodes, Apart the others
// (largest first), each unreachable from Main or unable to reach it.
type MajorReach struct {
	Major int // nodes on a road of the class or higher, in the area
	Main  MajorPart
	Apart []MajorPart
}

// MajorReach groups the nodes on roads of minClass or higher (ClassRank)
// for which inArea holds (nil: all) by the strongly connected component
// of the whole network they lie in: routes may use any road of the
// extract, minor ones and those outside the area included.
func (n *Network) MajorReach(minClass string, inArea func(orb.Point) bool) (MajorReach, error) {
	rank := ClassRank(minClass)
	if rank >= len(classOrder) {
		return MajorReach{}, fmt.Errorf("route: %q is not a road class", minClass)
	}
	comp, _ := n.Components()
	byComp := map[int32][]int{}
	var r MajorReach
	for v := range n.Points {
		if int(n.Rank[v]) > rank || (inArea != nil && !inArea(n.Points[v])) {
			continue
		}
		r.Major++
		byComp[comp[v]] = append(byComp[comp[v]], v)
	}
	var parts []MajorPart
	for _, nodes := range byComp {
		parts = append(parts, MajorPart{Nodes: nodes, At: n.Points[nodes[0]], OSMID: n.OSMIDs[nodes[0]]})
	}
	slices.SortFunc(parts, func(a, b MajorPart) int {
		return cmp.Or(cmp.Compare(len(b.Nodes), len(a.Nodes)), cmp.Compare(a.Nodes[0], b.Nodes[0]))
	})
	if len(parts) > 0 {
		r.Main, r.Apart = parts[0], parts[1:]
	}
	return r, nil
}
