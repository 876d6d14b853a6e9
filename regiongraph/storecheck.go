package regiongraph

import (
	"fmt"
	"math"
	"slices"

	"narrows/partition"
)

// checkStore checks the values of a store read from path: the quality
// accounting adds up with no negative count, windows have distinct names,
// and every edge read has a valid local day, a window of the metadata,
// region ids of at least 1 and unequal, at least one trip, and finite,
// non-negative measures. The trips of a window's edges cannot add up to
// more than the rows used (each used row is one trip, in each window at
// most once), which catches absurd counts; a store that records no rows
// read (made by hand) is held to 2^31 trips an edge instead. A damaged or hand-made store
// is refused here rather than turned into findings.
func checkStore(path string, s *Store) error {
	if err := checkStoreMeta(path, s); err != nil {
		return err
	}
	if len(s.Meta.Windows) == 0 && len(s.Edges) > 0 {
		return fmt.Errorf("regiongraph: %s: damaged store: no windows in the metadata", path)
	}
	return checkEdges(path, s.Meta, s.Edges, make([]int64, len(s.Meta.Windows)))
}

// checkAndOrder checks a store read from path (checkStore) and puts its
// edges in store order.
func checkAndOrder(path string, s *Store) error {
	if err := checkStore(path, s); err != nil {
		return err
	}
	if compare := edgeOrderOf(s.Meta.Windows).compare; !slices.IsSortedFunc(s.Edges, compare) {
		slices.SortStableFunc(s.Edges, compare)
	}
	return nil
}

// checkStoreMeta checks the metadata of a store read from path: the
// quality accounting adds up with no negative count, and windows have
// distinct names.
func checkStoreMeta(path string, s *Store) error {
	bad := func(format string, args ...any) error {
		return fmt.Errorf("regiongraph: %s: damaged store: %s", path, fmt.Sprintf(format, args...))
	}
	q := s.Meta.Quality
	if q.Read < 0 || q.Used < 0 || q.Used > q.Read {
		return bad("quality metadata reads %d rows and uses %d", q.Read, q.Used)
	}
	sum := q.Used
	for r, n := range q.Rejected {
		if n < 0 || n > q.Read {
			return bad("quality metadata: %d rows rejected for %q of %d read", n, r, q.Read)
		}
		sum += n
		if sum > q.Read {
			break
		}
	}
	if sum != q.Read {
		return bad("quality metadata: %d rows read, but used and rejected add up to %d", q.Read, sum)
	}
	for _, src := range s.Meta.Sources {
		if src.Rows < 0 {
			return bad("sources metadata: %d rows of %s", src.Rows, src.Path)
		}
	}
	names := s.WindowNames()
	if err := checkWindowCount(s.Meta.Windows); err != nil {
		return bad("%v", err)
	}
	for i, n := range names {
		if slices.Contains(names[:i], n) {
			return bad("window %q twice in the metadata", n)
		}
	}
	return nil
}

// checkEdges checks the edges of a store read from path against its
// metadata meta (see checkStore), adding each window's trips to trips
// (one count per window of meta) and checking the sums against the rows
// used.
func checkEdges(path string, meta Meta, edges []Edge, trips []int64) error {
	q := meta.Quality
	for i := range edges {
		e := &edges[i]
		at := func(format string, args ...any) error {
			return fmt.Errorf("regiongraph: %s: damaged store: edge %s %s %d->%d: %s", path, e.Day, meta.WindowName(e.Window), e.From, e.To, fmt.Sprintf(format, args...))
		}
		// The day and window were read from their text (storeText),
		// which checked them; a store made in memory is checked here,
		// once for each run of edges of a day.
		if i == 0 || e.Day != edges[i-1].Day {
			if y, _, _ := e.Day.Date(); y < 0 || y > 9999 {
				return at("day %d is not a date YYYY-MM-DD", e.Day)
			}
		}
		wi := int(e.Window)
		if wi >= len(meta.Windows) {
			names := make([]string, len(meta.Windows))
			for k, w := range meta.Windows {
				names[k] = w.Name
			}
			return at("window %d not in the metadata (%v)", e.Window, names)
		}
		if e.From < 1 || e.To < 1 || e.From == e.To {
			return at("region ids must be at least 1 and differ")
		}
		if e.Trips < 1 || e.Trips > math.MaxInt32 {
			return at("%d trips", e.Trips)
		}
		if trips[wi] += int64(e.Trips); q.Read > 0 && trips[wi] > q.Used {
			return at("the window's edges hold more trips than the %d rows used", q.Used)
		}
		for _, v := range [...]float64{e.SpeedP25, e.SpeedMedian, e.SpeedP75, e.DetourP25, e.DetourMedian, e.DetourP75,
			e.DistanceMedian, e.DurationMedian, e.DistanceSum, e.StraightSum, e.DurationSum} {
			if !(v >= 0) || math.IsInf(v, 0) {
				return at("a measure is %v (want finite and not negative)", v)
			}
		}
	}
	return nil
}

// CheckRegions reports an edge whose region id is not one of p's: the
// regions given for a store must be those it was built on.
func (s *Store) CheckRegions(p *partition.Partition) error {
	return checkEdgeRegions(s.Edges, &s.Meta, newRegionIDs(p))
}
