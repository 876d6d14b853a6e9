package patterns

import (
	"sort"
	"sync"

	"narrows/regiongraph"
)

// periodParts returns, for the before and after periods, the run of the
// store's edges from the period's first day to its last. A store is sorted
// by day, so each run is found by binary search, and each period then
// reads its own year of a two-year store rather than the whole store, the
// two at once. An open From or To runs to the store's first or last edge.
//
// ok is false when the store cannot be cut so, and each period must read
// the whole store: the edges are not sorted by day, the store records no
// windows (the default window is then chosen among the edges' windows, so
// it must see them all), a period's day is not a YYYY-MM-DD day (the
// scan reports it), the two runs overlap (an edge-day the two periods
// share counts in the before period only) or one holds no edge (the scan
// of the whole store says which days it has).
func periodParts(store *regiongraph.Store, periods [2]ScanOptions) (parts [2][]regiongraph.Edge, ok bool) {
	edges := store.Edges
	if len(store.Meta.Windows) == 0 {
		return parts, false
	}
	// The order is checked in two halves at once: the store is large.
	var sorted [2]bool
	half := len(edges) / 2
	both(func(p int) {
		a, b := max(p*half-1, 0), len(edges)
		if p == 0 {
			b = half
		}
		sorted[p] = daysAscend(edges[a:b])
	})
	if !sorted[0] || !sorted[1] {
		return parts, false
	}
	var lo, hi [2]int
	for p, o := range periods {
		lo[p], hi[p] = 0, len(edges)
		if o.From != "" {
			from, err := regiongraph.ParseDay(o.From)
			if err != nil {
				return parts, false
			}
			lo[p] = sort.Search(len(edges), func(i int) bool { return edges[i].Day >= from })
		}
		if o.To != "" {
			to, err := regiongraph.ParseDay(o.To)
			if err != nil {
				return parts, false
			}
			hi[p] = sort.Search(len(edges), func(i int) bool { return edges[i].Day > to })
		}
		if lo[p] >= hi[p] {
			return parts, false
		}
		parts[p] = edges[lo[p]:hi[p]:hi[p]]
	}
	if lo[0] < hi[1] && lo[1] < hi[0] {
		return [2][]regiongraph.Edge{}, false
	}
	return parts, true
}

// daysAscend reports whether the edges' days never fall.
func daysAscend(edges []regiongraph.Edge) bool {
	for i := 1; i < len(edges); i++ {
		if edges[i].Day < edges[i-1].Day {
			return false
		}
	}
	return true
}

// partStore returns a store like store whose edges are part.
func partStore(store *regiongraph.Store, part []regiongraph.Edge) *regiongraph.Store {
	s := *store
	s.Edges = part
	return &s
}

// both runs f(0) and f(1) at once and waits for both.
func both(f func(p int)) {
	var wg sync.WaitGroup
	wg.Add(1)
	go func() {
		defer wg.Done()
		f(1)
	}()
	f(0)
	wg.Wait()
}

// sharedProgress returns one progress callback for two scans that run at
// once, called from either scan's goroutine: it reports each stage's items
// done and total summed over the scans that have reached it, to before's
// callback (or after's when before has none), one call at a time. It
// returns nil callbacks when neither period has one.
func sharedProgress(before, after func(stage string, done, total int)) [2]func(stage string, done, total int) {
	report := before
	if report == nil {
		report = after
	}
	if report == nil {
		return [2]func(string, int, int){}
	}
	var mu sync.Mutex
	type count struct{ done, total int }
	seen := map[string]*[2]count{}
	var out [2]func(string, int, int)
	for p := range out {
		out[p] = func(stage string, done, total int) {
			mu.Lock()
			defer mu.Unlock()
			c := seen[stage]
			if c == nil {
				c = &[2]count{}
				seen[stage] = c
			}
			c[p] = count{done, total}
			report(stage, c[0].done+c[1].done, c[0].total+c[1].total)
		}
	}
	return out
}
