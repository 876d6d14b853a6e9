package patterns

import (
	"slices"

	"narrows/patterns/groups"
	"narrows/regiongraph"
)

// keptEdges returns the edges with at least minTrips trips (every edge when
// minTrips is 0 or less), the rule of regiongraph.ReadOptions.MinTrips: a
// store as a command reads it.
func keptEdges(edges []regiongraph.Edge, minTrips int) []regiongraph.Edge {
	return slices.DeleteFunc(slices.Clone(edges), func(e regiongraph.Edge) bool { return e.Trips < minTrips })
}

// compareEdgePairs orders edges by their (From, To) pair.
func compareEdgePairs(a, b regiongraph.Edge) int {
	return groups.CompareEdges(EdgeKey{From: a.From, To: a.To}, EdgeKey{From: b.From, To: b.To})
}
