package regiongraph

import (
	"fmt"
	"math"
	"slices"
	"time"

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
	if len(names) == 0 && len(s.Edges) > 0 {
		return bad("no windows in the metadata")
	}
	for i, n := range names {
		if slices.Contains(names[:i], n) {
			return bad("window %q twice in the metadata", n)
		}
	}
	trips := make([]int64, len(names))
	lastDay, lastWindow, wi := "", "", 0
	for i := range s.Edges {
		e := &s.Edges[i]
		at := func(format string, args ...any) error {
			return bad("edge %s %s %d->%d: %s", e.Day, e.Window, e.From, e.To, fmt.Sprintf(format, args...))
		}
		if e.Day != lastDay {
			if len(e.Day) != 10 {
				return at("day is not YYYY-MM-DD")
			}
			if _, err := time.Parse(time.DateOnly, e.Day); err != nil {
				return at("day is not a date YYYY-MM-DD")
			}
			lastDay = e.Day
		}
		if e.Window != lastWindow {
			if wi = slices.Index(names, e.Window); wi < 0 {
				return at("window not in the metadata (%v)", names)
			}
			lastWindow = e.Window
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
	known := regionSet(p)
	for i := range s.Edges {
		e := &s.Edges[i]
		for _, id := range [2]int{e.From, e.To} {
			if !known(id) {
				return fmt.Errorf("regiongraph: edge %s %s %d->%d: region %d is not among the %d regions", e.Day, e.Window, e.From, e.To, id, len(p.Regions))
			}
		}
	}
	return nil
}

// regionSet returns a test of whether an id is a region of p. A city's
// store has millions of edges to check: ids from 0 to a few times the
// number of regions are looked up in a slice, several times quicker than
// in a map, and any others in a map.
func regionSet(p *partition.Partition) func(id int) bool {
	dense := make([]bool, 0, 4*len(p.Regions)+1024)
	ids := map[int]bool{}
	for _, r := range p.Regions {
		if r.ID >= 0 && r.ID < cap(dense) {
			if r.ID >= len(dense) {
				dense = dense[:r.ID+1]
			}
			dense[r.ID] = true
		} else {
			ids[r.ID] = true
		}
	}
	return func(id int) bool {
		if id >= 0 && id < len(dense) {
			return dense[id]
		}
		return ids[id]
	}
}
