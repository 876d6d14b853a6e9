package regiongraph

import (
	"bytes"
	"cmp"
	"errors"
	"fmt"
	"math"
	"slices"

	"narrows/partition"
)

// Edge is one directed region pair on one local day and time window.
// Units are metres, seconds and metres per second. An edge holds no
// pointer: a store's millions of edges are then memory the garbage
// collector need not scan, and filling them costs no write barriers.
type Edge struct {
	Day    Day         // local calendar day
	Window WindowIndex // time window: an index into the store's Meta.Windows
	From   int         // origin region id
	To     int         // destination region id
	Trips  int

	SpeedP25, SpeedMedian, SpeedP75    float64 // m/s
	DetourP25, DetourMedian, DetourP75 float64 // travel distance / great-circle distance

	DistanceMedian float64 // metres
	DurationMedian float64 // seconds

	// Sums over the edge's trips, so costs add up exactly across trips.
	DistanceSum float64 // metres of travel
	StraightSum float64 // metres of great-circle origin-destination distance
	DurationSum float64 // seconds
}

// WindowIndex is the index of an edge's window in its store's
// Meta.Windows; Meta.WindowName names it.
type WindowIndex uint8

// MaxWindows is the most windows a store can have, the number a
// WindowIndex can tell apart.
const MaxWindows = math.MaxUint8

// Window is a named time-of-day window [Start, End) in minutes after local
// midnight. A trip belongs to the window of its start time.
type Window struct {
	Name        string
	StartMinute int
	EndMinute   int
}

// Source describes one input file of an ingest.
type Source struct {
	Path   string // as given
	SHA256 string // hex
	Rows   int64
}

// Quality accounts for every input row: Read = Used + sum of Rejected.
type Quality struct {
	Read     int64
	Used     int64
	Rejected map[string]int64 // reason text (a Reason as a string) -> rows, every reason of RejectReasons
	// OffsetTimes counts the times read with a numeric UTC offset
	// (+02:00); OffsetMismatch those whose offset differs from the time
	// zone's at that instant. Such times are placed at the right instant,
	// but days and windows are cut in the time zone, which then is most
	// likely not the data's.
	OffsetTimes, OffsetMismatch int64
}

// Meta is the store's provenance.
type Meta struct {
	RegionsSHA256 string
	TimeZone      string
	Windows       []Window
	Quality       Quality
	Sources       []Source
}

// Store is the day-graph store. Edges are sorted by Day, Window, From, To.
type Store struct {
	Meta  Meta
	Edges []Edge

	// regionsGeoJSON is the partition the store was built on, as written by
	// partition.WriteGeoJSON; see Regions.
	regionsGeoJSON []byte
	// spilled is the bytes an ingest wrote to its temporary file before
	// the first edge.
	spilled int64
	// totals are the day totals the store's file records (see
	// DayTotals), when totalsRecorded; partial is whether the read
	// dropped edges under a minimum of trips, so that the edges do not
	// add up to the store's totals.
	totals         []DayTotal
	totalsRecorded bool
	partial        bool
}

// WindowName returns the name of the window of index w, "" when there is
// no such window.
func (m *Meta) WindowName(w WindowIndex) string {
	if int(w) >= len(m.Windows) {
		return ""
	}
	return m.Windows[w].Name
}

// WindowIndex returns the index of the named window in m.Windows; ok is
// false when there is no window of that name.
func (m *Meta) WindowIndex(name string) (w WindowIndex, ok bool) {
	for i, x := range m.Windows {
		if x.Name == name && i < MaxWindows {
			return WindowIndex(i), true
		}
	}
	return 0, false
}

// checkWindowCount reports more windows than a WindowIndex tells apart.
func checkWindowCount(windows []Window) error {
	if len(windows) > MaxWindows {
		return fmt.Errorf("%d windows, more than the %d a store can hold", len(windows), MaxWindows)
	}
	return nil
}

// edgeOrder is the store's order of edges: by day, window name, from, to.
// It holds the rank by name of each window index of the store's windows.
type edgeOrder []uint8

// edgeOrderOf returns the edge order of a store's windows.
func edgeOrderOf(windows []Window) edgeOrder { return windowRanks(windows) }

// rank returns the rank by name of window w; windows outside the store's
// come last, in index order.
func (o edgeOrder) rank(w WindowIndex) int {
	if int(w) < len(o) {
		return int(o[w])
	}
	return int(w) + len(o)
}

// compare orders edges by day, window name, from, to.
func (o edgeOrder) compare(a, b Edge) int {
	if c := cmp.Compare(a.Day, b.Day); c != 0 {
		return c
	}
	if a.Window != b.Window {
		return cmp.Compare(o.rank(a.Window), o.rank(b.Window))
	}
	if c := cmp.Compare(a.From, b.From); c != 0 {
		return c
	}
	return cmp.Compare(a.To, b.To)
}

// dayLen returns the number of edges at the start of edges on the day of
// the first (0 when there are none): in store order, that day's edges.
func dayLen(edges []Edge) int {
	n := 0
	for n < len(edges) && edges[n].Day == edges[0].Day {
		n++
	}
	return n
}

// sorted returns edges in store order: edges themselves when they are in
// it, else a sorted copy (edges are not changed).
func (o edgeOrder) sorted(edges []Edge) []Edge {
	if slices.IsSortedFunc(edges, o.compare) {
		return edges
	}
	out := slices.Clone(edges)
	slices.SortStableFunc(out, o.compare)
	return out
}

// Regions returns the regions the store was built on, kept in the store by
// Ingest (and in the file by WriteParquet) so that later steps need not be
// given the regions file again.
func (s *Store) Regions() (*partition.Partition, error) {
	if len(s.regionsGeoJSON) == 0 {
		return nil, errors.New("regiongraph: the store carries no regions; give the regions file it was built on")
	}
	p, err := partition.ReadGeoJSON(bytes.NewReader(s.regionsGeoJSON), "regions in the day-graph store")
	if err != nil {
		return nil, fmt.Errorf("regiongraph: %w", err)
	}
	return p, nil
}

// Days returns the local days that have at least one edge in the given
// window, in ascending order.
func (s *Store) Days(window WindowIndex) []Day {
	var days []Day
	for _, e := range s.Edges {
		if e.Window == window && (len(days) == 0 || days[len(days)-1] != e.Day) {
			days = append(days, e.Day)
		}
	}
	slices.Sort(days)
	return slices.Compact(days)
}

// WindowNames returns the names of the store's windows in the order given
// at ingest.
func (s *Store) WindowNames() []string {
	names := make([]string, len(s.Meta.Windows))
	for i, w := range s.Meta.Windows {
		names[i] = w.Name
	}
	return names
}

// Merge combines stores of separate ingests over the same regions (for
// example January, then February) into a new store. The stores must share
// the regions hash, time zone and windows. A local day may be in only one
// store per window: the quantiles of a day split across two ingests cannot be
// combined exactly, so a (day, window) found in two stores is an error
// naming it. Quality counts add up and sources are concatenated in order.
// The inputs are not modified.
func Merge(stores ...*Store) (*Store, error) {
	if len(stores) == 0 {
		return nil, errors.New("regiongraph: merge: no stores")
	}
	first := stores[0]
	out := &Store{Meta: Meta{
		RegionsSHA256: first.Meta.RegionsSHA256,
		TimeZone:      first.Meta.TimeZone,
		Windows:       slices.Clone(first.Meta.Windows),
		Quality:       Quality{Rejected: make(map[string]int64)},
	}}
	type dayWindow struct {
		day    Day
		window WindowIndex
	}
	owner := make(map[dayWindow]int)
	for i, s := range stores {
		if s == nil {
			return nil, fmt.Errorf("regiongraph: merge: store %d is nil", i+1)
		}
		if s.Meta.RegionsSHA256 != first.Meta.RegionsSHA256 {
			return nil, fmt.Errorf("regiongraph: merge: store %d was built on other regions (sha256 %s, store 1 has %s)",
				i+1, s.Meta.RegionsSHA256, first.Meta.RegionsSHA256)
		}
		if s.Meta.TimeZone != first.Meta.TimeZone {
			return nil, fmt.Errorf("regiongraph: merge: store %d has time zone %q, store 1 has %q", i+1, s.Meta.TimeZone, first.Meta.TimeZone)
		}
		if !slices.Equal(s.Meta.Windows, first.Meta.Windows) {
			return nil, fmt.Errorf("regiongraph: merge: store %d has windows %v, store 1 has %v", i+1, s.Meta.Windows, first.Meta.Windows)
		}
		seen := make(map[dayWindow]bool)
		for _, e := range s.Edges {
			k := dayWindow{e.Day, e.Window}
			if seen[k] {
				continue
			}
			seen[k] = true
			if j, dup := owner[k]; dup {
				return nil, fmt.Errorf("regiongraph: merge: day %s (window %s) is in both store %d and store %d; ingest a day's trips together", e.Day, first.Meta.WindowName(e.Window), j+1, i+1)
			}
			owner[k] = i
		}
		out.Edges = append(out.Edges, s.Edges...)
		out.Meta.Quality.Read += s.Meta.Quality.Read
		out.Meta.Quality.Used += s.Meta.Quality.Used
		out.Meta.Quality.OffsetTimes += s.Meta.Quality.OffsetTimes
		out.Meta.Quality.OffsetMismatch += s.Meta.Quality.OffsetMismatch
		for r, n := range s.Meta.Quality.Rejected {
			out.Meta.Quality.Rejected[r] += n
		}
		out.Meta.Sources = append(out.Meta.Sources, s.Meta.Sources...)
		if len(out.regionsGeoJSON) == 0 {
			out.regionsGeoJSON = s.regionsGeoJSON
		}
	}
	slices.SortStableFunc(out.Edges, edgeOrderOf(out.Meta.Windows).compare)
	out.mergeTotals(stores)
	return out, nil
}
