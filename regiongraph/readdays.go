package regiongraph

import (
	"context"
	"fmt"
	"path/filepath"
	"slices"

	"narrows/partition"
)

// A DayReader hands out a store's edges a day at a time, so that an
// analysis that works day by day never holds the whole store: a city's
// year is millions of edges, a day some thousands. It reads either a
// dataset directory, opening one day file at a time, or edges already in
// memory (Store.ByDay).
type DayReader struct {
	store *Store // metadata and regions; the edges when held in memory
	dir   string // dataset directory; "" when the edges are in store
	days  []dayJSON
	opts  ReadOptions
	// regions, when set by CheckRegions, are the region ids an edge may
	// name.
	regions *regionIDs
	// stretchRows cuts a day file into pieces (see readFile); tests
	// make it small.
	stretchRows int64
}

// OpenDays opens the store at path for reading a day at a time the edges
// that opts keeps. A dataset's manifest and regions are read and checked
// now, its day files as Each reaches them; a single file is read whole
// (ReadFileOptions), since its days are not separate files.
func OpenDays(path string, opts ReadOptions) (*DayReader, error) {
	if err := checkReadOptions(path, opts); err != nil {
		return nil, err
	}
	if !IsDataset(path) {
		s, err := ReadFileOptions(path, opts)
		if err != nil {
			return nil, err
		}
		return s.ByDay(), nil
	}
	s, days, fileOpts, err := openDataset(path, opts)
	if err != nil {
		return nil, err
	}
	if err := checkStoreMeta(path, s); err != nil {
		return nil, err
	}
	return &DayReader{store: s, dir: path, days: days, opts: s.wholeWithoutTotals(fileOpts), stretchRows: stretchRows}, nil
}

// ByDay returns a DayReader of the store's edges, which it shares: they
// must not change while it is used.
func (s *Store) ByDay() *DayReader {
	return &DayReader{store: s}
}

// Store returns the store being read: its metadata and regions, and, for
// edges held in memory, its edges. Of a dataset it holds no edges.
func (r *DayReader) Store() *Store { return r.store }

// DayCount returns the number of days Each visits at most.
func (r *DayReader) DayCount() int {
	if r.dir != "" {
		return len(r.days)
	}
	n := 0
	for i := range r.store.Edges {
		if i == 0 || r.store.Edges[i].Day != r.store.Edges[i-1].Day {
			n++
		}
	}
	return n
}

// CheckRegions makes Each check every edge's region ids against p, as
// Store.CheckRegions does for a store in memory: the regions given for a
// store must be those it was built on.
func (r *DayReader) CheckRegions(p *partition.Partition) error {
	if r.dir == "" {
		return r.store.CheckRegions(p)
	}
	r.regions = newRegionIDs(p)
	return nil
}

// Each calls visit with the kept edges of each day that has any, in store
// order (window, from, to), each day once. The days are read on up to
// GOMAXPROCS goroutines, and visit is called from them at once, in no
// particular order of days. The edges belong to Each: visit must neither
// change them nor keep them after it returns, as their memory holds a
// later day. The edges pass the checks of ReadFileOptions; the first
// error, of a damaged day file or from visit, in day order, ends the
// reading and is returned.
func (r *DayReader) Each(ctx context.Context, visit func(day Day, edges []Edge) error) error {
	if r.dir == "" {
		return r.eachInMemory(ctx, visit)
	}
	workers := readWorkers()
	bufs := make([]readBuffers, workers)
	edgeBufs := make([][]Edge, workers)
	// The trips of each window, per day: their sum over the store may
	// not exceed the rows used (see checkStore).
	trips := make([][]int64, len(r.days))
	err := forEachWorker(len(r.days), func(w, i int) error {
		if err := ctx.Err(); err != nil {
			return err
		}
		trips[i] = make([]int64, len(r.store.Meta.Windows))
		edges, err := r.readDay(r.days[i], &bufs[w], &edgeBufs[w], trips[i])
		if err != nil || len(edges) == 0 {
			return err
		}
		return visit(edges[0].Day, edges) // checked to be the manifest's day
	})
	if err != nil {
		return err
	}
	if used := r.store.Meta.Quality.Used; r.store.Meta.Quality.Read > 0 {
		sum := make([]int64, len(r.store.Meta.Windows))
		for i, d := range r.days {
			for wi, n := range trips[i] {
				if sum[wi] += n; sum[wi] > used {
					return fmt.Errorf("regiongraph: %s: damaged store: up to day %s, window %s's edges hold more trips than the %d rows used", r.dir, d.Day, r.store.Meta.Windows[wi].Name, used)
				}
			}
		}
	}
	return nil
}

// readDay reads the kept edges of one day file into *edges, reusing its
// memory, and checks them, adding each window's trips to trips.
func (r *DayReader) readDay(d dayJSON, buf *readBuffers, edges *[]Edge, trips []int64) ([]Edge, error) {
	stretches, dayOf, closeAll, err := openDays(r.dir, r.store.Meta, []dayJSON{d}, r.opts, r.stretchRows)
	defer closeAll()
	if err != nil {
		return nil, err
	}
	total := 0
	for _, st := range stretches {
		if err := st.selectRows(r.opts, buf); err != nil {
			return nil, err
		}
		st.offset = total
		total += st.kept()
	}
	out := sized(edges, total)
	clear(out) // the fields of undecoded columns stay zero
	cols := readColumns(r.opts)
	for _, st := range stretches {
		if err := st.fill(out[st.offset:st.offset+st.kept()], cols, buf); err != nil {
			return nil, err
		}
	}
	if err := checkDayEdges(stretches, dayOf, out); err != nil {
		return nil, err
	}
	// Each stretch is in store order; a day file of several stretches
	// (more than stretchRows rows) is not as a whole.
	if compare := edgeOrderOf(r.store.Meta.Windows).compare; len(stretches) > 1 && !slices.IsSortedFunc(out, compare) {
		slices.SortStableFunc(out, compare)
	}
	path := filepath.Join(r.dir, filepath.FromSlash(d.File))
	if err := checkEdges(path, r.store.Meta, out, trips); err != nil {
		return nil, err
	}
	if r.regions != nil {
		if err := checkEdgeRegions(out, &r.store.Meta, r.regions); err != nil {
			return nil, fmt.Errorf("%s: %w", path, err)
		}
	}
	return out, nil
}

// eachInMemory is Each of edges held in memory: the store's edges in
// store order (sorted first if they are not) cut into days.
func (r *DayReader) eachInMemory(ctx context.Context, visit func(day Day, edges []Edge) error) error {
	edges := edgeOrderOf(r.store.Meta.Windows).sorted(r.store.Edges)
	var starts []int
	for i := 0; i < len(edges); i += dayLen(edges[i:]) {
		starts = append(starts, i)
	}
	starts = append(starts, len(edges))
	return forEach(len(starts)-1, func(i int) error {
		if err := ctx.Err(); err != nil {
			return err
		}
		day := edges[starts[i]:starts[i+1]:starts[i+1]]
		return visit(day[0].Day, day)
	})
}

// regionIDs is a set of region ids: a bitmap for the small ids of a
// partition (a city's few thousand), a map for others.
type regionIDs struct {
	small []bool
	other map[int]bool
	count int // regions in the partition
}

// maxSmallRegionID bounds the ids kept in the bitmap of a regionIDs.
const maxSmallRegionID = 1 << 20

func newRegionIDs(p *partition.Partition) *regionIDs {
	ids := &regionIDs{count: len(p.Regions)}
	for _, r := range p.Regions {
		if r.ID >= 0 && r.ID < maxSmallRegionID {
			if r.ID >= len(ids.small) {
				ids.small = slices.Grow(ids.small, r.ID+1-len(ids.small))[:r.ID+1]
			}
			ids.small[r.ID] = true
		} else {
			if ids.other == nil {
				ids.other = map[int]bool{}
			}
			ids.other[r.ID] = true
		}
	}
	return ids
}

func (ids *regionIDs) has(id int) bool {
	if id >= 0 && id < len(ids.small) {
		return ids.small[id]
	}
	return ids.other[id]
}

// checkEdgeRegions reports an edge, of a store with metadata meta, whose
// region id is not in ids.
func checkEdgeRegions(edges []Edge, meta *Meta, ids *regionIDs) error {
	for i := range edges {
		e := &edges[i]
		for _, id := range [2]int{e.From, e.To} {
			if !ids.has(id) {
				return fmt.Errorf("regiongraph: edge %s %s %d->%d: region %d is not among the %d regions", e.Day, meta.WindowName(e.Window), e.From, e.To, id, ids.count)
			}
		}
	}
	return nil
}
