package regiongraph

import (
	"cmp"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"runtime"
	"slices"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"time"

	"github.com/parquet-go/parquet-go"
	"github.com/parquet-go/parquet-go/format"
)

// ReadOptions selects what ReadFileOptions keeps of a store. The zero value
// keeps every edge.
type ReadOptions struct {
	// MinTrips drops edges with fewer trips while reading (0 keeps all).
	// A city's store holds mostly pairs with a trip or two a day; an
	// analysis that ignores pairs under its own minimum need not hold them
	// in memory.
	MinTrips int
	// WholeWithoutTotals ignores MinTrips for a store that records no day
	// totals (one written before them), so that Store.DayTotals is known
	// whatever the store: a comparison's network counts every pair.
	WholeWithoutTotals bool
	// Window keeps only the edges of the named window ("" keeps all); a
	// name not among the store's windows is an error.
	Window string
	// From and To keep only the edges of the local days from From to To,
	// both included, as YYYY-MM-DD ("" leaves that end open).
	From, To string

	// Columns, when not nil, names the measure columns (SCHEMA.md) to
	// decode; day, window, from_region, to_region and trips are always
	// decoded, and the fields of the other columns stay zero. An analysis
	// that uses a few measures need not decode the rest.
	Columns []string

	// counter, when set (by tests), counts the files opened and bytes read.
	counter *readCounter
}

// keepsDay reports whether a read with o keeps the local day YYYY-MM-DD.
func (o ReadOptions) keepsDay(day string) bool {
	return (o.From == "" || day >= o.From) && (o.To == "" || day <= o.To)
}

// ReadFile reads a store, a single file written by WriteParquet or a
// dataset directory written by a DatasetWriter, every edge.
func ReadFile(path string) (*Store, error) { return ReadFileOptions(path, ReadOptions{}) }

// ReadFileOptions reads a store, keeping the edges that opts selects. path
// is either layout of SCHEMA.md: a directory is a dataset, of which only
// the day files in [opts.From, opts.To] are opened; a file is a store
// written by WriteParquet. The quality accounting and metadata are the file's
// whatever is dropped.
//
// The file is read column by column rather than row by row: the columns
// that opts filters on (trips, day, window) are decoded first, and the
// other columns only on the pages that hold a kept edge, in parallel over
// stretches of rows.
func ReadFileOptions(path string, opts ReadOptions) (*Store, error) {
	return readFile(path, opts, stretchRows)
}

// stretchRows is the number of rows of a row group read as one piece of
// parallel work; see readFile.
const stretchRows = 1 << 18

// readFile is ReadFileOptions with stretches of the given number of rows.
func readFile(path string, opts ReadOptions, stretchRows int64) (*Store, error) {
	if err := checkReadOptions(path, opts); err != nil {
		return nil, err
	}
	if IsDataset(path) {
		return readDataset(path, opts, stretchRows)
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("regiongraph: %w", err)
	}
	defer f.Close()
	fi, err := f.Stat()
	if err != nil {
		return nil, fmt.Errorf("regiongraph: %w", err)
	}
	pf, err := openParquetChecked(readerOf(f, opts), fi.Size())
	if err != nil {
		return nil, fmt.Errorf("regiongraph: %s: not a Parquet day-graph store: %v", path, err)
	}
	leaf, err := storeLeaves(path, pf)
	if err != nil {
		return nil, err
	}
	s := &Store{}
	if err := readStoreMeta(path, pf, s); err != nil {
		return nil, err
	}
	opts = s.wholeWithoutTotals(opts)
	if opts.Window != "" && !slices.Contains(s.WindowNames(), opts.Window) {
		return nil, fmt.Errorf("regiongraph: %s: no window %q in the store (it has %s)", path, opts.Window, strings.Join(s.WindowNames(), ", "))
	}
	stretches, err := cutStretches(path, pf, leaf, stretchRows, s.Meta.Windows)
	if err != nil {
		return nil, err
	}
	if s.Edges, err = readStretches(stretches, opts); err != nil {
		return nil, err
	}
	if err := checkAndOrder(path, s); err != nil {
		return nil, err
	}
	if err := s.finishTotals(path, opts); err != nil {
		return nil, err
	}
	return s, nil
}

// checkReadOptions checks the days and columns of opts.
func checkReadOptions(path string, opts ReadOptions) error {
	if err := checkDays(path, opts); err != nil {
		return err
	}
	for _, c := range opts.Columns {
		if storeColumnIndex(c) < 0 {
			return fmt.Errorf("regiongraph: read %s: no store column %q", path, c)
		}
	}
	return nil
}

// checkDays checks the days of opts.
func checkDays(path string, opts ReadOptions) error {
	for _, d := range []struct{ name, day string }{{"From", opts.From}, {"To", opts.To}} {
		if d.day == "" {
			continue
		}
		if _, err := time.Parse(time.DateOnly, d.day); err != nil {
			return fmt.Errorf("regiongraph: read %s: %s day %q is not YYYY-MM-DD", path, d.name, d.day)
		}
	}
	return nil
}

// storeLeaves checks that pf is a store this build reads and returns the
// column chunk index of each store column.
func storeLeaves(path string, pf *parquet.File) (leaf [numStoreColumns]int, err error) {
	version, ok := pf.Lookup(metaSchemaVersion)
	if !ok {
		return leaf, fmt.Errorf("regiongraph: %s: no %s metadata: not a day-graph store", path, metaSchemaVersion)
	}
	if v, err := strconv.Atoi(version); err != nil || v != schemaVersion {
		return leaf, fmt.Errorf("regiongraph: %s: store schema version %q, this build reads %d", path, version, schemaVersion)
	}
	for i := range storeColumns {
		c := &storeColumns[i]
		l, ok := pf.Schema().Lookup(c.name)
		if !ok {
			return leaf, fmt.Errorf("regiongraph: %s: store has no column %q", path, c.name)
		}
		if kind := l.Node.Type().Kind(); kind != c.kind() || l.MaxDefinitionLevel != 0 || l.MaxRepetitionLevel != 0 {
			return leaf, fmt.Errorf("regiongraph: %s: column %q is %v (optional or repeated: %t), want required %v",
				path, c.name, kind, l.MaxDefinitionLevel != 0 || l.MaxRepetitionLevel != 0, c.kind())
		}
		leaf[i] = l.ColumnIndex
	}
	return leaf, nil
}

// cutStretches cuts the rows of pf into stretches of up to stretchRows rows
// of a row group, the unit of parallel work; windows are the store's.
func cutStretches(path string, pf *parquet.File, leaf [numStoreColumns]int, stretchRows int64, windows []Window) ([]*stretch, error) {
	var stretches []*stretch
	var total int64
	for g, rg := range pf.RowGroups() {
		n := rg.NumRows()
		total += n
		if n > math.MaxInt32 {
			return nil, fmt.Errorf("regiongraph: %s: row group %d has %d rows, more than this build reads", path, g, n)
		}
		chunks := rg.ColumnChunks()
		var cols [numStoreColumns]parquet.ColumnChunk
		for i, l := range leaf {
			if l < 0 || l >= len(chunks) {
				return nil, fmt.Errorf("regiongraph: %s: row group %d has no column %q", path, g, storeColumns[i].name)
			}
			cols[i] = chunks[l]
			if g < len(pf.Metadata().RowGroups) && l < len(pf.Metadata().RowGroups[g].Columns) {
				// The library's LZ4 decoder does not end on damaged
				// data; WriteParquet uses zstd and other tools the
				// codecs below.
				switch codec := pf.Metadata().RowGroups[g].Columns[l].MetaData.Codec; codec {
				case format.Uncompressed, format.Snappy, format.Gzip, format.Zstd:
				default:
					return nil, fmt.Errorf("regiongraph: %s: row group %d, column %q: compression %v, want zstd, Snappy, gzip or none",
						path, g, storeColumns[i].name, codec)
				}
			}
		}
		for a := int64(0); a < n; a += stretchRows {
			stretches = append(stretches, &stretch{path: path, group: g, cols: cols, first: a, end: min(a+stretchRows, n), groupRows: n,
				text: newStoreText(windows)})
		}
	}
	if total != pf.NumRows() {
		return nil, fmt.Errorf("regiongraph: %s: row groups hold %d rows, the file says %d", path, total, pf.NumRows())
	}
	return stretches, nil
}

// readStretches returns the edges of the stretches that opts keeps, in
// file order. Each stretch first finds the rows it keeps, then, once the
// stretches' offsets in the edges are known, fills them.
func readStretches(stretches []*stretch, opts ReadOptions) ([]Edge, error) {
	bufs := make([]readBuffers, readWorkers())
	if err := forEachWorker(len(stretches), func(w, i int) error { return stretches[i].selectRows(opts, &bufs[w]) }); err != nil {
		return nil, err
	}
	kept := 0
	for _, st := range stretches {
		st.offset = kept
		kept += st.kept()
	}
	if kept == 0 {
		return nil, nil
	}
	edges := make([]Edge, kept)
	cols := readColumns(opts)
	if err := forEachWorker(len(stretches), func(w, i int) error {
		st := stretches[i]
		return st.fill(edges[st.offset:st.offset+st.kept()], cols, &bufs[w])
	}); err != nil {
		return nil, err
	}
	return edges, nil
}

// readColumns returns which store columns opts has decoded.
func readColumns(opts ReadOptions) []bool {
	cols := make([]bool, numStoreColumns)
	for i := range cols {
		cols[i] = opts.Columns == nil || i <= storeTrips || slices.Contains(opts.Columns, storeColumns[i].name)
	}
	return cols
}

// readStoreMeta sets s.Meta and the regions from the file's key-value
// metadata.
func readStoreMeta(path string, pf *parquet.File, s *Store) error {
	s.Meta.RegionsSHA256, _ = pf.Lookup(metaRegions)
	s.Meta.TimeZone, _ = pf.Lookup(metaTimeZone)
	if text, ok := pf.Lookup(metaRegionsJSON); ok {
		s.regionsGeoJSON = []byte(text)
	}
	var windows []windowJSON
	var quality qualityJSON
	var sources []sourceJSON
	for _, m := range []struct {
		key string
		v   any
	}{{metaWindows, &windows}, {metaQuality, &quality}, {metaSources, &sources}} {
		text, ok := pf.Lookup(m.key)
		if !ok {
			return fmt.Errorf("regiongraph: %s: no %s metadata", path, m.key)
		}
		if err := json.Unmarshal([]byte(text), m.v); err != nil {
			return fmt.Errorf("regiongraph: %s: %s metadata: %v", path, m.key, err)
		}
	}
	for _, w := range windows {
		pw, err := ParseWindow(w.Name + "=" + w.Start + "-" + w.End)
		if err != nil {
			return fmt.Errorf("regiongraph: %s: windows metadata: %v", path, err)
		}
		s.Meta.Windows = append(s.Meta.Windows, pw)
	}
	if err := checkWindowCount(s.Meta.Windows); err != nil {
		return fmt.Errorf("regiongraph: %s: windows metadata: %v", path, err)
	}
	s.Meta.Quality = Quality{Read: quality.Read, Used: quality.Used, Rejected: quality.Rejected,
		OffsetTimes: quality.OffsetTimes, OffsetMismatch: quality.OffsetMismatch}
	if s.Meta.Quality.Rejected == nil {
		s.Meta.Quality.Rejected = make(map[string]int64)
	}
	for _, src := range sources {
		s.Meta.Sources = append(s.Meta.Sources, Source{Path: src.Path, SHA256: src.SHA256, Rows: src.Rows})
	}
	// Day totals are optional: stores written before them record none.
	if text, ok := pf.Lookup(metaDayTotals); ok {
		var totals []totalJSON
		if err := json.Unmarshal([]byte(text), &totals); err != nil {
			return fmt.Errorf("regiongraph: %s: %s metadata: %v", path, metaDayTotals, err)
		}
		var err error
		if s.totals, err = parseTotals(&s.Meta, totals); err != nil {
			return fmt.Errorf("regiongraph: %s: %s metadata: %v", path, metaDayTotals, err)
		}
		s.totalsRecorded = true
	}
	return nil
}

// forEach calls work(0), ..., work(n-1) on up to GOMAXPROCS goroutines and
// returns the error of the lowest i that failed. A panic inside the Parquet
// decoder on a damaged file becomes an error rather than ending the
// program.
func forEach(n int, work func(i int) error) error {
	return forEachWorker(n, func(_, i int) error { return work(i) })
}

// readWorkers is the number of goroutines of forEach.
func readWorkers() int { return runtime.GOMAXPROCS(0) }

// forEachWorker is forEach that also passes work the number w, below
// readWorkers(), of the goroutine calling it, so that each goroutine can
// reuse its own buffers.
func forEachWorker(n int, work func(w, i int) error) error {
	errs := make([]error, n)
	var next atomic.Int64
	var wg sync.WaitGroup
	for w := range min(n, readWorkers()) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for {
				i := int(next.Add(1) - 1)
				if i >= n {
					return
				}
				func() {
					defer func() {
						if r := recover(); r != nil {
							errs[i] = fmt.Errorf("regiongraph: damaged store: %v", r)
						}
					}()
					errs[i] = work(w, i)
				}()
				if errs[i] != nil {
					next.Store(int64(n)) // stop handing out work
				}
			}
		}()
	}
	wg.Wait()
	for _, err := range errs {
		if err != nil {
			return err
		}
	}
	return nil
}

// A stretch is rows [first, end) of one row group of a store file.
type stretch struct {
	path       string
	group      int
	cols       [numStoreColumns]parquet.ColumnChunk
	first, end int64
	groupRows  int64   // rows of the row group
	all        bool    // every row is kept
	rows       []int32 // else the kept rows, ascending, as indexes in the row group
	offset     int     // of the stretch's first kept edge in the store
	// dayOrder: the rows are in a day file's order (window, then trips
	// descending) and fill puts the kept edges in store order (window,
	// from, to) as it sets them.
	dayOrder bool
	// text turns the day and window columns into the edges' values.
	text *storeText
}

func (st *stretch) kept() int {
	if st.all {
		return int(st.end - st.first)
	}
	return len(st.rows)
}

func (st *stretch) errorf(col int, format string, args ...any) error {
	return fmt.Errorf("regiongraph: %s: row group %d, column %q: %s", st.path, st.group, storeColumns[col].name, fmt.Sprintf(format, args...))
}

// readBlock is the number of rows decoded at a time: the edges of a block
// stay in the processor's cache while every column fills its field.
const readBlock = 4096

// readBuffers are the buffers a reading goroutine reuses from stretch to
// stretch: a year of day files would otherwise leave hundreds of
// megabytes of garbage.
type readBuffers struct {
	keep    []bool
	windows []string
	winIdx  []WindowIndex
	ids     [2][]int32
	src     []int32
	strs    []string
	ints    []int64
	f64     []float64
	sorter  pairSorter
}

// sized returns *s with length n, reusing its memory; the values are
// left over from before.
func sized[T any](s *[]T, n int) []T {
	*s = slices.Grow((*s)[:0], n)[:n]
	return *s
}

// selectRows finds the rows of the stretch that opts keeps.
func (st *stretch) selectRows(opts ReadOptions, buf *readBuffers) error {
	var filters []int
	if opts.MinTrips > 0 {
		filters = append(filters, storeTrips)
	}
	if opts.Window != "" {
		filters = append(filters, storeWindow)
	}
	if opts.From != "" || opts.To != "" {
		filters = append(filters, storeDay)
	}
	if len(filters) == 0 {
		st.all = true
		return nil
	}
	// Only the rows of pages of trips that may hold a kept edge are
	// looked at; the others are dropped unread.
	ranges := [][2]int64{{st.first, st.end}}
	if opts.MinTrips > 0 {
		ranges = st.tripsRanges(opts.MinTrips)
	}
	keep := sized(&buf.keep, int(st.end-st.first))
	clear(keep)
	for _, r := range ranges {
		for i := r[0]; i < r[1]; i++ {
			keep[i-st.first] = true
		}
	}
	var ints [readBlock]int64
	var strs [readBlock]string
	for _, col := range filters {
		c := newColumnCursor(st, col)
		for _, r := range ranges {
			for a := r[0]; a < r[1]; a += readBlock {
				b := min(a+readBlock, r[1])
				k := keep[a-st.first : b-st.first]
				var err error
				switch col {
				case storeTrips:
					if err = c.int64s(a, b, nil, ints[:b-a]); err == nil {
						for i, v := range ints[:b-a] {
							k[i] = k[i] && v >= int64(opts.MinTrips)
						}
					}
				case storeWindow:
					if err = c.strings(a, b, nil, strs[:b-a]); err == nil {
						for i, v := range strs[:b-a] {
							k[i] = k[i] && v == opts.Window
						}
					}
				case storeDay:
					if err = c.strings(a, b, nil, strs[:b-a]); err == nil {
						for i, v := range strs[:b-a] {
							k[i] = k[i] && opts.keepsDay(v)
						}
					}
				}
				if err != nil {
					c.close()
					return err
				}
			}
		}
		c.close()
	}
	n := 0
	for _, k := range keep {
		if k {
			n++
		}
	}
	st.all = n == len(keep)
	st.rows = nil
	if !st.all {
		st.rows = make([]int32, 0, n)
		for i, k := range keep {
			if k {
				st.rows = append(st.rows, int32(st.first+int64(i)))
			}
		}
	}
	return nil
}

// fill sets the columns cols of the stretch's kept edges, len(edges) ==
// st.kept().
func (st *stretch) fill(edges []Edge, cols []bool, buf *readBuffers) error {
	if len(edges) == 0 {
		return nil
	}
	if st.dayOrder {
		return st.fillInOrder(edges, cols, buf)
	}
	var cursors []*columnCursor
	var which []int
	for col := range numStoreColumns {
		if !cols[col] {
			continue
		}
		c := newColumnCursor(st, col)
		defer c.close()
		cursors, which = append(cursors, c), append(which, col)
	}
	scratch := new(readScratch)
	for k := 0; k < len(edges); k += readBlock {
		n := min(readBlock, len(edges)-k)
		a, b, rows := st.block(k, n)
		for i, c := range cursors {
			if err := st.setColumn(edges[k:k+n], which[i], c, a, b, rows, scratch); err != nil {
				return err
			}
		}
	}
	return nil
}

// fillInOrder is fill of a stretch in a day file's order: each column of
// the kept rows is decoded whole, then gathered into the edges in store
// order, so that every edge is written in sequence and once, rather than
// filled in file order and moved (the 144-byte moves cost more than the
// decoding) or written at scattered places.
func (st *stretch) fillInOrder(edges []Edge, cols []bool, buf *readBuffers) error {
	src, err := st.storeOrder(edges, buf)
	if err != nil {
		return err
	}
	n := len(edges)
	for col := range numStoreColumns {
		if !cols[col] || col != storeDay && col < storeTrips {
			continue // storeOrder set the window and region ids
		}
		sc := &storeColumns[col]
		c := newColumnCursor(st, col)
		for k := 0; k < n && err == nil; k += readBlock {
			m := min(readBlock, n-k)
			a, b, rows := st.block(k, m)
			switch sc.kind() {
			case parquet.ByteArray:
				err = c.strings(a, b, rows, sized(&buf.strs, n)[k:k+m])
			case parquet.Int64:
				err = c.int64s(a, b, rows, sized(&buf.ints, n)[k:k+m])
			case parquet.Double:
				err = c.float64s(a, b, rows, sized(&buf.f64, n)[k:k+m])
			default:
				err = st.errorf(col, "no reader of %v values in store order", sc.kind())
			}
		}
		c.close()
		if err != nil {
			return err
		}
		strs, ints, f64 := buf.strs, buf.ints, buf.f64
		for j := range edges {
			i := j
			if src != nil {
				i = int(src[j])
			}
			switch sc.kind() {
			case parquet.ByteArray: // the day: storeOrder set the window
				if edges[j].Day, err = st.text.parseDay(strs[i]); err != nil {
					return st.errorf(col, "%v", err)
				}
			case parquet.Int64:
				*sc.int(&edges[j]) = int(ints[i])
			default:
				*sc.double(&edges[j]) = f64[i]
			}
		}
	}
	return nil
}

// block returns the rows of the n kept rows from the k-th: rows [a, b) of
// the row group, or the listed rows.
func (st *stretch) block(k, n int) (a, b int64, rows []int32) {
	if st.all {
		return st.first + int64(k), st.first + int64(k+n), nil
	}
	rows = st.rows[k : k+n]
	return int64(rows[0]), int64(rows[n-1]) + 1, rows
}

// storeOrder reads the window and region ids of the stretch's kept rows,
// which are in a day file's order, and returns, for each edge in store
// order, the index of its kept row (nil when that is their order), setting
// those fields of edges. Each window's run is sorted by its (from, to)
// pairs, ties (a damaged file) kept in file order.
func (st *stretch) storeOrder(edges []Edge, buf *readBuffers) ([]int32, error) {
	n := len(edges)
	windows := sized(&buf.windows, n)
	ids := [2][]int32{sized(&buf.ids[0], n), sized(&buf.ids[1], n)}
	for i, col := range [...]int{storeWindow, storeWindow + 1, storeWindow + 2} {
		c := newColumnCursor(st, col)
		for k := 0; k < n; k += readBlock {
			m := min(readBlock, n-k)
			a, b, rows := st.block(k, m)
			var err error
			if i == 0 {
				err = c.strings(a, b, rows, windows[k:k+m])
			} else {
				err = c.int32s(a, b, rows, ids[i-1][k:k+m])
			}
			if err != nil {
				c.close()
				return nil, err
			}
		}
		c.close()
	}
	wins := sized(&buf.winIdx, n)
	for i, w := range windows {
		var err error
		if wins[i], err = st.text.parseWindow(w); err != nil {
			return nil, st.errorf(storeWindow, "%v", err)
		}
	}
	var src []int32
	for a := 0; a < n; {
		b := a + 1
		for b < n && wins[b] == wins[a] {
			b++
		}
		if src == nil && !pairsAscending(ids[0][a:b], ids[1][a:b]) {
			src = sized(&buf.src, n)
			for i := range a {
				src[i] = int32(i)
			}
		}
		if src != nil {
			buf.sorter.sort(ids[0][a:b], ids[1][a:b], src[a:b])
			for j := a; j < b; j++ {
				src[j] += int32(a)
			}
		}
		a = b
	}
	for j := range edges {
		i := j
		if src != nil {
			i = int(src[j])
		}
		e := &edges[j]
		e.Window, e.From, e.To = wins[i], int(ids[0][i]), int(ids[1][i])
	}
	return src, nil
}

// pairsAscending reports whether the pairs (from[i], to[i]) ascend
// strictly.
func pairsAscending(from, to []int32) bool {
	for i := 1; i < len(from); i++ {
		if from[i-1] > from[i] || from[i-1] == from[i] && to[i-1] >= to[i] {
			return false
		}
	}
	return true
}

// A pairSorter orders region pairs, reusing its memory from call to call.
type pairSorter struct {
	count []int32
	tmp   []int32
}

// sort sets order to the indexes of the pairs (from[i], to[i]) in
// ascending order of the pairs, ties by index. Ids of up to radixBits bits
// (a city's few thousand regions) are sorted by two counting passes, to
// then from, each stable; others by a comparison sort.
func (p *pairSorter) sort(from, to []int32, order []int32) {
	const radixBits = 14
	n := len(from)
	small := true
	for i := range n {
		small = small && uint32(from[i]) < 1<<radixBits && uint32(to[i]) < 1<<radixBits
	}
	if !small {
		for i := range order {
			order[i] = int32(i)
		}
		slices.SortStableFunc(order, func(x, y int32) int {
			return cmp.Or(cmp.Compare(from[x], from[y]), cmp.Compare(to[x], to[y]))
		})
		return
	}
	p.tmp = slices.Grow(p.tmp[:0], n)[:n]
	for i := range p.tmp {
		p.tmp[i] = int32(i)
	}
	// by to into order, then by from back from order into order via tmp
	p.countingPass(to, p.tmp, order)
	p.countingPass(from, order, p.tmp)
	copy(order, p.tmp)
}

// countingPass writes the indexes in, stably ordered by key[index], to out.
func (p *pairSorter) countingPass(key, in, out []int32) {
	hi := int32(0)
	for _, i := range in {
		hi = max(hi, key[i])
	}
	p.count = slices.Grow(p.count[:0], int(hi)+2)[:hi+2]
	clear(p.count)
	for _, i := range in {
		p.count[key[i]+1]++
	}
	for k := 1; k < len(p.count); k++ {
		p.count[k] += p.count[k-1]
	}
	for _, i := range in {
		k := key[i]
		out[p.count[k]] = i
		p.count[k]++
	}
}

// readScratch holds a block of decoded values of each kind.
type readScratch struct {
	f64  [readBlock]float64
	i64  [readBlock]int64
	i32  [readBlock]int32
	strs [readBlock]string
}

// setColumn decodes column index ci of the wanted rows (rows, or [a, b) if
// rows is nil) and sets its field of the edges dst.
func (st *stretch) setColumn(dst []Edge, ci int, c *columnCursor, a, b int64, rows []int32, scratch *readScratch) error {
	n := len(dst)
	col := &storeColumns[ci]
	switch col.kind() {
	case parquet.ByteArray:
		if err := c.strings(a, b, rows, scratch.strs[:n]); err != nil {
			return err
		}
		for i := range dst {
			var err error
			if ci == storeDay {
				dst[i].Day, err = st.text.parseDay(scratch.strs[i])
			} else {
				dst[i].Window, err = st.text.parseWindow(scratch.strs[i])
			}
			if err != nil {
				return st.errorf(ci, "%v", err)
			}
		}
	case parquet.Int32:
		if err := c.int32s(a, b, rows, scratch.i32[:n]); err != nil {
			return err
		}
		for i := range dst {
			*col.int(&dst[i]) = int(scratch.i32[i])
		}
	case parquet.Int64:
		if err := c.int64s(a, b, rows, scratch.i64[:n]); err != nil {
			return err
		}
		for i := range dst {
			*col.int(&dst[i]) = int(scratch.i64[i])
		}
	default:
		if err := c.float64s(a, b, rows, scratch.f64[:n]); err != nil {
			return err
		}
		for i := range dst {
			*col.double(&dst[i]) = scratch.f64[i]
		}
	}
	return nil
}

// tripsRanges returns the row ranges of the stretch, ascending and
// disjoint, outside of which the trips column's page statistics (the
// column index) say that no row has minTrips trips; the whole stretch when
// the file has no usable index.
func (st *stretch) tripsRanges(minTrips int) [][2]int64 {
	all := [][2]int64{{st.first, st.end}}
	cc := st.cols[storeTrips]
	ci, err := cc.ColumnIndex()
	if err != nil || ci == nil {
		return all
	}
	oi, err := cc.OffsetIndex()
	if err != nil || oi == nil || oi.NumPages() != ci.NumPages() {
		return all
	}
	var out [][2]int64
	n := oi.NumPages()
	for p := range n {
		a, b := oi.FirstRowIndex(p), st.groupRows
		if p+1 < n {
			b = oi.FirstRowIndex(p + 1)
		}
		if a < 0 || b < a || b > st.groupRows || (p == 0 && a != 0) {
			return all // an index that does not cover the rows: not used
		}
		if mx := ci.MaxValue(p); !ci.NullPage(p) && mx.Kind() == parquet.Int64 && mx.Int64() < int64(minTrips) {
			continue
		}
		a, b = max(a, st.first), min(b, st.end)
		if a >= b {
			continue
		}
		if k := len(out); k > 0 && out[k-1][1] == a {
			out[k-1][1] = b
		} else {
			out = append(out, [2]int64{a, b})
		}
	}
	return out
}
