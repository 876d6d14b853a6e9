package regiongraph

import (
	"cmp"
	"encoding/json"
	"fmt"
	"math"
	"slices"
)

// DayTotal is what every edge of a store adds up to on one local day in
// one time window: the network's totals. A store records them when it is
// written (SCHEMA.md), so that they stay known to a read that drops the
// edges under a minimum of trips (ReadOptions.MinTrips): a comparison's
// network line counts every pair with trips, however few, while its
// analysis need not hold the millions of one-trip pairs of a city.
//
// Each sum adds the edges' values in store order (by from, then to), so
// that totals found from a store in memory and totals read from its file
// are equal to the bit.
type DayTotal struct {
	Day    Day
	Window WindowIndex
	Edges  int64 // region pairs with trips
	Trips  int64
	// The sums of the edges' sum columns.
	DistanceSum float64 // metres of travel
	StraightSum float64 // metres of great-circle distance
	DurationSum float64 // seconds
}

// DayTotals returns the store's totals by day and window, in store order
// (by day, then window name); ok is false when they are not known: the
// store was read with a minimum of trips from a file that records none
// (written by an earlier build, or by a writer that does not add them up).
// A store in memory whose edges are all its edges finds them from its
// edges. A read's days and window select the totals as they select the
// edges; its minimum of trips does not.
func (s *Store) DayTotals() (totals []DayTotal, ok bool) {
	if s.totalsRecorded {
		return s.totals, true
	}
	if s.partial {
		return nil, false
	}
	return totalsOf(s.Meta.Windows, s.Edges), true
}

// totalsAdder adds up edges given in store order into day totals.
type totalsAdder struct {
	order  edgeOrder
	totals []DayTotal
	// lastFrom and lastTo are the regions of the last edge added, whose
	// day and window are the last total's; outOfOrder is set when an
	// edge did not follow it in store order, and the totals are then
	// void. (The key alone is kept: copying and comparing whole 144-byte
	// edges made the adder three times slower.)
	lastFrom, lastTo int
	outOfOrder       bool
}

func newTotalsAdder(windows []Window) *totalsAdder {
	return &totalsAdder{order: edgeOrderOf(windows)}
}

// add adds edges that follow those added before in store order.
func (a *totalsAdder) add(edges []Edge) {
	for i := range edges {
		e := &edges[i]
		n := len(a.totals)
		if n == 0 || a.totals[n-1].Day != e.Day || a.totals[n-1].Window != e.Window {
			if n > 0 && a.order.compareTotals(a.totals[n-1], DayTotal{Day: e.Day, Window: e.Window}) > 0 {
				a.outOfOrder = true
			}
			a.totals = append(a.totals, DayTotal{Day: e.Day, Window: e.Window})
			n++
		} else if e.From < a.lastFrom || e.From == a.lastFrom && e.To <= a.lastTo {
			a.outOfOrder = true
		}
		a.lastFrom, a.lastTo = e.From, e.To
		t := &a.totals[n-1]
		t.Edges++
		t.Trips += int64(e.Trips)
		t.DistanceSum += e.DistanceSum
		t.StraightSum += e.StraightSum
		t.DurationSum += e.DurationSum
	}
}

// totalsOf returns the day totals of edges, in any order, of a store with
// the given windows.
func totalsOf(windows []Window, edges []Edge) []DayTotal {
	a := newTotalsAdder(windows)
	a.add(edges)
	if !a.outOfOrder {
		return a.totals
	}
	a = newTotalsAdder(windows)
	a.add(a.order.sorted(edges))
	return a.totals
}

// totalJSON is a day total as the store's metadata writes it (SCHEMA.md):
// with its day in a single file's day_totals, without in a dataset
// manifest's day.
type totalJSON struct {
	Day         string  `json:"day,omitempty"`
	Window      string  `json:"window"`
	Edges       int64   `json:"edges"`
	Trips       int64   `json:"trips"`
	DistanceSum float64 `json:"distance_sum_m"`
	StraightSum float64 `json:"straight_sum_m"`
	DurationSum float64 `json:"duration_sum_s"`
}

// totalsJSON returns totals of a store with the given windows as the
// metadata writes them, each with its day when withDay.
func totalsJSON(windows []Window, totals []DayTotal, withDay bool) []totalJSON {
	out := make([]totalJSON, len(totals))
	for i, t := range totals {
		out[i] = totalJSON{Window: (&Meta{Windows: windows}).WindowName(t.Window), Edges: t.Edges, Trips: t.Trips,
			DistanceSum: t.DistanceSum, StraightSum: t.StraightSum, DurationSum: t.DurationSum}
		if withDay {
			out[i].Day = t.Day.String()
		}
	}
	return out
}

// parseTotals checks day totals read from the metadata of a store with
// metadata meta and returns them in store order. Each must name a window of
// the store and a day, at most once each, with at least a trip an edge
// and finite, non-negative sums; a window's trips cannot add up to more
// than the rows used.
func parseTotals(meta *Meta, in []totalJSON) ([]DayTotal, error) {
	out := make([]DayTotal, 0, len(in))
	for i, j := range in {
		text := j.Day
		d, err := ParseDay(text)
		if err != nil {
			return nil, fmt.Errorf("day total %d: day %q is not YYYY-MM-DD", i+1, text)
		}
		w, ok := meta.WindowIndex(j.Window)
		if !ok {
			return nil, fmt.Errorf("day total %d (%s): no window %q in the store", i+1, text, j.Window)
		}
		if j.Edges < 1 || j.Edges > math.MaxInt32 || j.Trips < j.Edges || j.Trips > math.MaxInt32*j.Edges {
			return nil, fmt.Errorf("day total %d (%s %s): %d trips on %d edges", i+1, text, j.Window, j.Trips, j.Edges)
		}
		for _, v := range [...]float64{j.DistanceSum, j.StraightSum, j.DurationSum} {
			if !(v >= 0) || math.IsInf(v, 0) {
				return nil, fmt.Errorf("day total %d (%s %s): a sum is %v (want finite and not negative)", i+1, text, j.Window, v)
			}
		}
		out = append(out, DayTotal{Day: d, Window: w, Edges: j.Edges, Trips: j.Trips,
			DistanceSum: j.DistanceSum, StraightSum: j.StraightSum, DurationSum: j.DurationSum})
	}
	if twice, ok := edgeOrderOf(meta.Windows).sortTotals(out); !ok {
		return nil, fmt.Errorf("day totals: day %s window %s twice", twice.Day, meta.WindowName(twice.Window))
	}
	trips := make([]int64, len(meta.Windows))
	for _, t := range out {
		if trips[t.Window] += t.Trips; meta.Quality.Read > 0 && trips[t.Window] > meta.Quality.Used {
			return nil, fmt.Errorf("day totals: window %s holds more trips than the %d rows used", meta.WindowName(t.Window), meta.Quality.Used)
		}
	}
	return out, nil
}

// selectTotals keeps the totals of the days and window opts reads.
func selectTotals(meta *Meta, totals []DayTotal, opts ReadOptions) []DayTotal {
	out := totals[:0:0]
	for _, t := range totals {
		if opts.keepsDay(t.Day.String()) && (opts.Window == "" || meta.WindowName(t.Window) == opts.Window) {
			out = append(out, t)
		}
	}
	return out
}

// sortTotals puts totals in store order; ok is false when a day and
// window is in two of them, twice.
func (o edgeOrder) sortTotals(totals []DayTotal) (twice DayTotal, ok bool) {
	slices.SortFunc(totals, o.compareTotals)
	for i := 1; i < len(totals); i++ {
		if o.compareTotals(totals[i-1], totals[i]) == 0 {
			return totals[i], false
		}
	}
	return DayTotal{}, true
}

// compareTotals orders day totals as their edges: by day, then window
// name.
func (o edgeOrder) compareTotals(a, b DayTotal) int {
	if c := cmp.Compare(a.Day, b.Day); c != 0 {
		return c
	}
	return cmp.Compare(o.rank(a.Window), o.rank(b.Window))
}

// wholeWithoutTotals returns opts for reading s, whose metadata is read:
// without a minimum of trips when opts asks for the whole store unless s
// records its day totals.
func (s *Store) wholeWithoutTotals(opts ReadOptions) ReadOptions {
	if opts.WholeWithoutTotals && !s.totalsRecorded {
		opts.MinTrips = 0
	}
	return opts
}

// finishTotals ends a read from path with opts of a store whose edges
// are read and whose file's totals, if it records any, are s.totals: it
// notes whether the read dropped edges, selects the totals as the read
// selects edges, and checks them against the edges read: every day and
// window read has a total of at least its edges and trips, exactly these
// when the read dropped none.
func (s *Store) finishTotals(path string, opts ReadOptions) error {
	s.partial = opts.MinTrips > 1
	if !s.totalsRecorded {
		return nil
	}
	s.totals = selectTotals(&s.Meta, s.totals, opts)
	bad := func(format string, args ...any) error {
		return fmt.Errorf("regiongraph: %s: damaged store: %s", path, fmt.Sprintf(format, args...))
	}
	order := edgeOrderOf(s.Meta.Windows)
	k := 0
	for _, g := range totalsOf(s.Meta.Windows, s.Edges) {
		for ; k < len(s.totals) && order.compareTotals(s.totals[k], g) < 0; k++ {
			if !s.partial {
				return bad("day %s window %s has a day total but no edges", s.totals[k].Day, s.Meta.WindowName(s.totals[k].Window))
			}
		}
		if k == len(s.totals) || order.compareTotals(s.totals[k], g) != 0 {
			return bad("day %s window %s has edges but no day total", g.Day, s.Meta.WindowName(g.Window))
		}
		t := s.totals[k]
		if g.Edges > t.Edges || g.Trips > t.Trips || !s.partial && (g.Edges != t.Edges || g.Trips != t.Trips) {
			return bad("day %s window %s: its edges hold %d trips on %d pairs, its day total %d on %d",
				g.Day, s.Meta.WindowName(g.Window), g.Trips, g.Edges, t.Trips, t.Edges)
		}
		k++
	}
	if !s.partial && k < len(s.totals) {
		return bad("day %s window %s has a day total but no edges", s.totals[k].Day, s.Meta.WindowName(s.totals[k].Window))
	}
	return nil
}

// dayTotalsJSON encodes a single file's day totals.
func dayTotalsJSON(windows []Window, totals []DayTotal) (string, error) {
	b, err := json.Marshal(totalsJSON(windows, totals, true))
	return string(b), err
}

// mergeTotals sets the totals of out, the merge of stores (see Merge):
// found from its edges when each store holds all its edges, else merged
// from the stores' totals when each store's are known and no day and
// window is in two of them, else not known.
func (out *Store) mergeTotals(stores []*Store) {
	for _, s := range stores {
		out.partial = out.partial || s.partial
	}
	if !out.partial {
		return
	}
	var all []DayTotal
	for _, s := range stores {
		totals, ok := s.DayTotals()
		if !ok {
			return
		}
		all = append(all, totals...)
	}
	if _, ok := edgeOrderOf(out.Meta.Windows).sortTotals(all); ok {
		out.totals, out.totalsRecorded = all, true
	}
}
