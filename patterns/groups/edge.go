package groups

import "cmp"

// Edge is a directed region pair. Two edges are connected when they share a
// region, whatever their direction; A>B and B>A are distinct edges.
type Edge struct{ From, To int }

// CompareEdges orders edges by From, then To, the order of the edges of a
// Group.
func CompareEdges(a, b Edge) int {
	if c := cmp.Compare(a.From, b.From); c != 0 {
		return c
	}
	return cmp.Compare(a.To, b.To)
}
