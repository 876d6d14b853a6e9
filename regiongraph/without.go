package regiongraph

// Without returns a store holding the edges of s for which drop is false,
// with the same provenance and regions. The edges are shared with s where
// nothing is dropped (s is not changed either way). It serves a planner's
// exclusions: a region pair whose data is known to be wrong (a ferry, a
// counting fault) leaves the analysis as if it had never been ingested,
// so it neither shows as a weakness nor dominates another pair.
//
// The store's quality accounting (Meta.Quality) still counts the dropped
// edges' trips: they were read and used by the ingest.
func (s *Store) Without(drop func(e *Edge) bool) *Store {
	out := &Store{Meta: s.Meta, regionsGeoJSON: s.regionsGeoJSON}
	first := -1
	for i := range s.Edges {
		if drop(&s.Edges[i]) {
			first = i
			break
		}
	}
	if first < 0 {
		out.Edges = s.Edges
		out.totals, out.totalsRecorded, out.partial = s.totals, s.totalsRecorded, s.partial
		return out
	}
	// The edges left are all the store's when s held all its own;
	// otherwise the totals of the edges left are not known.
	out.partial = s.partial
	out.Edges = make([]Edge, first, len(s.Edges))
	copy(out.Edges, s.Edges[:first])
	for i := first + 1; i < len(s.Edges); i++ {
		if !drop(&s.Edges[i]) {
			out.Edges = append(out.Edges, s.Edges[i])
		}
	}
	return out
}
