package regiongraph

import (
	"bytes"
	"cmp"
	"encoding/binary"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"time"

	"github.com/parquet-go/parquet-go"
	"github.com/parquet-go/parquet-go/encoding"
	"github.com/parquet-go/parquet-go/format"

	"narrows/partition"
)

// SchemaVersion is the version of the store's Parquet layout (SCHEMA.md).
const SchemaVersion = 1

// File metadata keys of the store.
const (
	metaSchemaVersion = "schema_version"
	metaRegions       = "regions_sha256"
	metaTimeZone      = "time_zone"
	metaWindows       = "windows"
	metaQuality       = "quality"
	metaSources       = "sources"
	metaRegionsJSON   = "regions_geojson"
)

// edgeRow is the Parquet row of an Edge; see SCHEMA.md.
type edgeRow struct {
	Day            string  `parquet:"day,dict"`
	Window         string  `parquet:"window,dict"`
	FromRegion     int32   `parquet:"from_region"`
	ToRegion       int32   `parquet:"to_region"`
	Trips          int64   `parquet:"trips"`
	SpeedP25       float64 `parquet:"speed_p25_mps"`
	SpeedMedian    float64 `parquet:"speed_median_mps"`
	SpeedP75       float64 `parquet:"speed_p75_mps"`
	DetourP25      float64 `parquet:"detour_p25"`
	DetourMedian   float64 `parquet:"detour_median"`
	DetourP75      float64 `parquet:"detour_p75"`
	DistanceMedian float64 `parquet:"distance_median_m"`
	DurationMedian float64 `parquet:"duration_median_s"`
	DistanceSum    float64 `parquet:"distance_sum_m"`
	StraightSum    float64 `parquet:"straight_sum_m"`
	DurationSum    float64 `parquet:"duration_sum_s"`
}

type windowJSON struct {
	Name  string `json:"name"`
	Start string `json:"start"` // HH:MM
	End   string `json:"end"`   // HH:MM, 24:00 allowed
}

type qualityJSON struct {
	Read     int64            `json:"read"`
	Used     int64            `json:"used"`
	Rejected map[string]int64 `json:"rejected"`
}

type sourceJSON struct {
	Path   string `json:"path"`
	SHA256 string `json:"sha256"`
	Rows   int64  `json:"rows"`
}

// writeEdges writes the edges as Parquet rows to w, converting them in
// small batches so that only the writer's buffers are added to the store in
// memory.
func writeEdges(w io.Writer, edges []Edge, groupRows int, opts []parquet.WriterOption) error {
	pw := parquet.NewGenericWriter[edgeRow](w, opts...)
	const batch = 1 << 12
	rows := make([]edgeRow, 0, batch)
	flush := func() error {
		_, err := pw.Write(rows)
		rows = rows[:0]
		return err
	}
	inGroup := 0
	for i, e := range edges {
		if e.From < math.MinInt32 || e.From > math.MaxInt32 || e.To < math.MinInt32 || e.To > math.MaxInt32 {
			return fmt.Errorf("region id out of int32 range in edge %d", i)
		}
		if inGroup >= 2*groupRows || inGroup >= groupRows && e.Day != edges[i-1].Day {
			if err := flush(); err != nil {
				return err
			}
			if err := pw.Flush(); err != nil {
				return err
			}
			inGroup = 0
		}
		rows = append(rows, toRow(e))
		inGroup++
		if len(rows) == batch {
			if err := flush(); err != nil {
				return err
			}
		}
	}
	if err := flush(); err != nil {
		return err
	}
	return pw.Close()
}

// toRow returns the Parquet row of e; the region ids must fit int32.
func toRow(e Edge) edgeRow {
	return edgeRow{Day: e.Day, Window: e.Window, FromRegion: int32(e.From), ToRegion: int32(e.To),
		Trips: int64(e.Trips), SpeedP25: e.SpeedP25, SpeedMedian: e.SpeedMedian, SpeedP75: e.SpeedP75,
		DetourP25: e.DetourP25, DetourMedian: e.DetourMedian, DetourP75: e.DetourP75,
		DistanceMedian: e.DistanceMedian, DurationMedian: e.DurationMedian,
		DistanceSum: e.DistanceSum, StraightSum: e.StraightSum, DurationSum: e.DurationSum}
}

func clock(m int) string { return fmt.Sprintf("%02d:%02d", m/60, m%60) }

// WriteFile writes the store to a Parquet file at path: to a temporary file
// in the same folder first, renamed into place when complete.
func WriteFile(path string, s *Store) error { return writeFile(path, s, rowGroupRows) }

// rowGroupRows is the number of rows from which WriteFile ends a row group
// at the next change of day. Row groups of about a million rows are common
// practice: other tools read them in parallel, and the writer holds one
// row group's compressed pages in memory.
const rowGroupRows = 1 << 20

// writeFile is WriteFile with row groups of groupRows rows, each ended at
// a change of day unless the day alone has 2 groupRows rows.
// Further writer options (tests use small pages) come after the store's.
func writeFile(path string, s *Store, groupRows int, extra ...parquet.WriterOption) error {
	if s == nil {
		return errors.New("regiongraph: write: nil store")
	}
	windows := make([]windowJSON, len(s.Meta.Windows))
	for i, w := range s.Meta.Windows {
		windows[i] = windowJSON{Name: w.Name, Start: clock(w.StartMinute), End: clock(w.EndMinute)}
	}
	rejected := make(map[string]int64)
	for _, r := range RejectReasons() {
		rejected[r] = 0
	}
	for r, n := range s.Meta.Quality.Rejected {
		rejected[r] = n
	}
	sources := make([]sourceJSON, len(s.Meta.Sources))
	for i, src := range s.Meta.Sources {
		sources[i] = sourceJSON{Path: src.Path, SHA256: src.SHA256, Rows: src.Rows}
	}
	meta := []struct {
		key string
		v   any
	}{
		{metaWindows, windows},
		{metaQuality, qualityJSON{Read: s.Meta.Quality.Read, Used: s.Meta.Quality.Used, Rejected: rejected}},
		{metaSources, sources},
	}
	opts := []parquet.WriterOption{
		parquet.Compression(&parquet.Zstd),
		parquet.KeyValueMetadata(metaSchemaVersion, strconv.Itoa(SchemaVersion)),
		parquet.KeyValueMetadata(metaRegions, s.Meta.RegionsSHA256),
		parquet.KeyValueMetadata(metaTimeZone, s.Meta.TimeZone),
	}
	if len(s.regionsGeoJSON) > 0 {
		opts = append(opts, parquet.KeyValueMetadata(metaRegionsJSON, string(s.regionsGeoJSON)))
	}
	for _, m := range meta {
		b, err := json.Marshal(m.v)
		if err != nil {
			return fmt.Errorf("regiongraph: write %s: %v", path, err)
		}
		opts = append(opts, parquet.KeyValueMetadata(m.key, string(b)))
	}

	tmp, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".*.tmp")
	if err != nil {
		return fmt.Errorf("regiongraph: write %s: %w", path, err)
	}
	ok := false
	defer func() {
		if !ok {
			tmp.Close()
			os.Remove(tmp.Name())
		}
	}()
	if err := writeEdges(tmp, s.Edges, groupRows, append(opts, extra...)); err != nil {
		return fmt.Errorf("regiongraph: write %s: %w", path, err)
	}
	if err := tmp.Sync(); err != nil {
		return fmt.Errorf("regiongraph: write %s: %w", path, err)
	}
	if err := tmp.Close(); err != nil {
		return fmt.Errorf("regiongraph: write %s: %w", path, err)
	}
	if err := os.Chmod(tmp.Name(), 0o644); err != nil {
		return fmt.Errorf("regiongraph: write %s: %w", path, err)
	}
	if err := os.Rename(tmp.Name(), path); err != nil {
		return fmt.Errorf("regiongraph: write %s: %w", path, err)
	}
	ok = true
	return nil
}

// storeColumn is a column of the store's Parquet schema, in SCHEMA.md order.
type storeColumn struct {
	name string
	kind parquet.Kind
}

// Column numbers in storeColumns.
const (
	colDay = iota
	colWindow
	colFrom
	colTo
	colTrips
	colSpeedP25
	colSpeedMedian
	colSpeedP75
	colDetourP25
	colDetourMedian
	colDetourP75
	colDistanceMedian
	colDurationMedian
	colDistanceSum
	colStraightSum
	colDurationSum
	numStoreColumns
)

// storeColumns are the columns ReadFile requires, indexed by the col
// constants.
var storeColumns = [numStoreColumns]storeColumn{
	{"day", parquet.ByteArray}, {"window", parquet.ByteArray},
	{"from_region", parquet.Int32}, {"to_region", parquet.Int32}, {"trips", parquet.Int64},
	{"speed_p25_mps", parquet.Double}, {"speed_median_mps", parquet.Double}, {"speed_p75_mps", parquet.Double},
	{"detour_p25", parquet.Double}, {"detour_median", parquet.Double}, {"detour_p75", parquet.Double},
	{"distance_median_m", parquet.Double}, {"duration_median_s", parquet.Double},
	{"distance_sum_m", parquet.Double}, {"straight_sum_m", parquet.Double}, {"duration_sum_s", parquet.Double},
}

// ReadOptions selects what ReadFileOptions keeps of a store. The zero value
// keeps every edge.
type ReadOptions struct {
	// MinTrips drops edges with fewer trips while reading (0 keeps all).
	// A city's store holds mostly pairs with a trip or two a day; an
	// analysis that ignores pairs under its own minimum need not hold them
	// in memory.
	MinTrips int
	// Window keeps only the edges of the named window ("" keeps all); a
	// name not among the store's windows is an error.
	Window string
	// From and To keep only the edges of the local days from From to To,
	// both included, as YYYY-MM-DD ("" leaves that end open).
	From, To string
}

// ReadFile reads a store written by WriteFile, every edge.
func ReadFile(path string) (*Store, error) { return ReadFileOptions(path, ReadOptions{}) }

// ReadFileOptions reads a store written by WriteFile, keeping the edges
// that opts selects. The quality accounting and metadata are the file's
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
	for _, d := range []struct{ name, day string }{{"From", opts.From}, {"To", opts.To}} {
		if d.day == "" {
			continue
		}
		if _, err := time.Parse(time.DateOnly, d.day); err != nil {
			return nil, fmt.Errorf("regiongraph: read %s: %s day %q is not YYYY-MM-DD", path, d.name, d.day)
		}
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
	pf, err := openParquet(f, fi.Size())
	if err != nil {
		return nil, fmt.Errorf("regiongraph: %s: not a Parquet day-graph store: %v", path, err)
	}
	version, ok := pf.Lookup(metaSchemaVersion)
	if !ok {
		return nil, fmt.Errorf("regiongraph: %s: no %s metadata: not a day-graph store", path, metaSchemaVersion)
	}
	if v, err := strconv.Atoi(version); err != nil || v != SchemaVersion {
		return nil, fmt.Errorf("regiongraph: %s: store schema version %q, this build reads %d", path, version, SchemaVersion)
	}
	var leaf [numStoreColumns]int // column chunk index of each store column
	for i, c := range storeColumns {
		l, ok := pf.Schema().Lookup(c.name)
		if !ok {
			return nil, fmt.Errorf("regiongraph: %s: store has no column %q", path, c.name)
		}
		if kind := l.Node.Type().Kind(); kind != c.kind || l.MaxDefinitionLevel != 0 || l.MaxRepetitionLevel != 0 {
			return nil, fmt.Errorf("regiongraph: %s: column %q is %v (optional or repeated: %t), want required %v",
				path, c.name, kind, l.MaxDefinitionLevel != 0 || l.MaxRepetitionLevel != 0, c.kind)
		}
		leaf[i] = l.ColumnIndex
	}
	s := &Store{}
	if err := readStoreMeta(path, pf, s); err != nil {
		return nil, err
	}
	if opts.Window != "" && !slices.Contains(s.WindowNames(), opts.Window) {
		return nil, fmt.Errorf("regiongraph: %s: no window %q in the store (it has %s)", path, opts.Window, strings.Join(s.WindowNames(), ", "))
	}

	// The rows are cut into stretches of up to stretchRows rows of a row
	// group, the unit of parallel work. Each stretch first finds the rows
	// it keeps, then, once the stretches' offsets in s.Edges are known,
	// fills them.
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
				// data; WriteFile uses zstd and other tools the codecs
				// below.
				switch codec := pf.Metadata().RowGroups[g].Columns[l].MetaData.Codec; codec {
				case format.Uncompressed, format.Snappy, format.Gzip, format.Zstd:
				default:
					return nil, fmt.Errorf("regiongraph: %s: row group %d, column %q: compression %v, want zstd, Snappy, gzip or none",
						path, g, storeColumns[i].name, codec)
				}
			}
		}
		for a := int64(0); a < n; a += stretchRows {
			stretches = append(stretches, &stretch{path: path, group: g, cols: cols, first: a, end: min(a+stretchRows, n)})
		}
	}
	if total != pf.NumRows() {
		return nil, fmt.Errorf("regiongraph: %s: row groups hold %d rows, the file says %d", path, total, pf.NumRows())
	}
	if err := forEach(len(stretches), func(i int) error { return stretches[i].selectRows(opts) }); err != nil {
		return nil, err
	}
	kept := 0
	for _, st := range stretches {
		st.offset = kept
		kept += st.kept()
	}
	if kept > 0 {
		s.Edges = make([]Edge, kept)
	}
	if err := forEach(len(stretches), func(i int) error {
		st := stretches[i]
		return st.fill(s.Edges[st.offset : st.offset+st.kept()])
	}); err != nil {
		return nil, err
	}
	if !slices.IsSortedFunc(s.Edges, compareEdges) {
		slices.SortStableFunc(s.Edges, compareEdges)
	}
	return s, nil
}

// openParquet opens a Parquet file, turning a panic of the Parquet
// library on a damaged footer into an error.
func openParquet(f *os.File, size int64) (pf *parquet.File, err error) {
	// The library allocates the footer length the file gives before
	// reading it: check it against the file's size first.
	var tail [8]byte
	if size < 12 {
		return nil, fmt.Errorf("%d bytes is too short", size)
	}
	if _, err := f.ReadAt(tail[:], size-8); err != nil {
		return nil, err
	}
	if footer := int64(binary.LittleEndian.Uint32(tail[:4])); footer+12 > size {
		return nil, fmt.Errorf("footer of %d bytes in a file of %d", footer, size)
	}
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("damaged footer: %v", r)
		}
	}()
	return parquet.OpenFile(f, size, parquet.SkipBloomFilters(true))
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
	s.Meta.Quality = Quality{Read: quality.Read, Used: quality.Used, Rejected: quality.Rejected}
	if s.Meta.Quality.Rejected == nil {
		s.Meta.Quality.Rejected = make(map[string]int64)
	}
	for _, src := range sources {
		s.Meta.Sources = append(s.Meta.Sources, Source{Path: src.Path, SHA256: src.SHA256, Rows: src.Rows})
	}
	return nil
}

// forEach calls work(0), ..., work(n-1) on up to GOMAXPROCS goroutines and
// returns the error of the lowest i that failed. A panic inside the Parquet
// decoder on a damaged file becomes an error rather than ending the
// program.
func forEach(n int, work func(i int) error) error {
	errs := make([]error, n)
	var next atomic.Int64
	var wg sync.WaitGroup
	for range min(n, runtime.GOMAXPROCS(0)) {
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
					errs[i] = work(i)
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
	all        bool    // every row is kept
	rows       []int32 // else the kept rows, ascending, as indexes in the row group
	offset     int     // of the stretch's first kept edge in the store
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

// selectRows finds the rows of the stretch that opts keeps.
func (st *stretch) selectRows(opts ReadOptions) error {
	var filters []int
	if opts.MinTrips > 0 {
		filters = append(filters, colTrips)
	}
	if opts.Window != "" {
		filters = append(filters, colWindow)
	}
	if opts.From != "" || opts.To != "" {
		filters = append(filters, colDay)
	}
	if len(filters) == 0 {
		st.all = true
		return nil
	}
	keep := make([]bool, st.end-st.first)
	for i := range keep {
		keep[i] = true
	}
	var ints [readBlock]int64
	var strs [readBlock]string
	for _, col := range filters {
		c := newColumnCursor(st, col)
		for a := st.first; a < st.end; a += readBlock {
			b := min(a+readBlock, st.end)
			k := keep[a-st.first : b-st.first]
			var err error
			switch col {
			case colTrips:
				if err = c.int64s(a, b, nil, ints[:b-a]); err == nil {
					for i, v := range ints[:b-a] {
						k[i] = k[i] && v >= int64(opts.MinTrips)
					}
				}
			case colWindow:
				if err = c.strings(a, b, nil, strs[:b-a]); err == nil {
					for i, v := range strs[:b-a] {
						k[i] = k[i] && v == opts.Window
					}
				}
			case colDay:
				if err = c.strings(a, b, nil, strs[:b-a]); err == nil {
					for i, v := range strs[:b-a] {
						k[i] = k[i] && (opts.From == "" || v >= opts.From) && (opts.To == "" || v <= opts.To)
					}
				}
			}
			if err != nil {
				c.close()
				return err
			}
		}
		c.close()
	}
	for i, k := range keep {
		if k {
			st.rows = append(st.rows, int32(st.first+int64(i)))
		}
	}
	st.all = len(st.rows) == len(keep)
	if st.all {
		st.rows = nil
	}
	return nil
}

// fill sets the stretch's kept edges, len(edges) == st.kept().
func (st *stretch) fill(edges []Edge) error {
	if len(edges) == 0 {
		return nil
	}
	var cursors [numStoreColumns]*columnCursor
	for col := range cursors {
		cursors[col] = newColumnCursor(st, col)
		defer cursors[col].close()
	}
	var f64 [readBlock]float64
	var i64 [readBlock]int64
	var i32 [readBlock]int32
	var strs [readBlock]string
	for k := 0; k < len(edges); k += readBlock {
		dst := edges[k:min(k+readBlock, len(edges))]
		n := len(dst)
		// The block is rows [a, b) of the row group, or the listed rows.
		a, b := st.first+int64(k), st.first+int64(k+n)
		var rows []int32
		if !st.all {
			rows = st.rows[k : k+n]
			a, b = int64(rows[0]), int64(rows[n-1])+1
		}
		for col, c := range cursors {
			var err error
			switch storeColumns[col].kind {
			case parquet.ByteArray:
				err = c.strings(a, b, rows, strs[:n])
			case parquet.Int32:
				err = c.int32s(a, b, rows, i32[:n])
			case parquet.Int64:
				err = c.int64s(a, b, rows, i64[:n])
			default:
				err = c.float64s(a, b, rows, f64[:n])
			}
			if err != nil {
				return err
			}
			setField(dst, col, strs[:n], i32[:n], i64[:n], f64[:n])
		}
	}
	return nil
}

// setField sets field col of the edges from the decoded values of its
// kind.
func setField(dst []Edge, col int, strs []string, i32 []int32, i64 []int64, f64 []float64) {
	switch col {
	case colDay:
		for i := range dst {
			dst[i].Day = strs[i]
		}
	case colWindow:
		for i := range dst {
			dst[i].Window = strs[i]
		}
	case colFrom:
		for i := range dst {
			dst[i].From = int(i32[i])
		}
	case colTo:
		for i := range dst {
			dst[i].To = int(i32[i])
		}
	case colTrips:
		for i := range dst {
			dst[i].Trips = int(i64[i])
		}
	case colSpeedP25:
		for i := range dst {
			dst[i].SpeedP25 = f64[i]
		}
	case colSpeedMedian:
		for i := range dst {
			dst[i].SpeedMedian = f64[i]
		}
	case colSpeedP75:
		for i := range dst {
			dst[i].SpeedP75 = f64[i]
		}
	case colDetourP25:
		for i := range dst {
			dst[i].DetourP25 = f64[i]
		}
	case colDetourMedian:
		for i := range dst {
			dst[i].DetourMedian = f64[i]
		}
	case colDetourP75:
		for i := range dst {
			dst[i].DetourP75 = f64[i]
		}
	case colDistanceMedian:
		for i := range dst {
			dst[i].DistanceMedian = f64[i]
		}
	case colDurationMedian:
		for i := range dst {
			dst[i].DurationMedian = f64[i]
		}
	case colDistanceSum:
		for i := range dst {
			dst[i].DistanceSum = f64[i]
		}
	case colStraightSum:
		for i := range dst {
			dst[i].StraightSum = f64[i]
		}
	case colDurationSum:
		for i := range dst {
			dst[i].DurationSum = f64[i]
		}
	}
}

// A columnCursor reads the values of one column chunk at increasing rows,
// holding the decoded page that covers the current row. It skips pages
// without a wanted row unread when the file has an offset index.
type columnCursor struct {
	st      *stretch
	col     int
	pages   parquet.Pages
	canSeek bool

	page        parquet.Page // nil before the first page and after close
	start, stop int64        // rows of page in the row group: [start, stop)

	// Decoded values of page, by kind; a dictionary-encoded byte-array page
	// has indexes into dictStrings.
	i32     []int32
	i64     []int64
	f64     []float64
	data    []byte
	offsets []uint32
	indexes []int32

	dict        parquet.Dictionary
	dictStrings []string
	shared      map[string]string // one string per distinct value
	last        string
}

func newColumnCursor(st *stretch, col int) *columnCursor {
	cc := st.cols[col]
	oi, err := cc.OffsetIndex()
	return &columnCursor{st: st, col: col, pages: cc.Pages(), canSeek: err == nil && oi != nil && oi.NumPages() > 0}
}

func (c *columnCursor) close() {
	if c.page != nil {
		parquet.Release(c.page)
		c.page = nil
	}
	if c.pages != nil {
		c.pages.Close()
		c.pages = nil
	}
}

// seek makes the current page the one covering row r, r >= the rows
// asked for before.
func (c *columnCursor) seek(r int64) error {
	for r >= c.stop {
		if c.page != nil {
			parquet.Release(c.page)
			c.page = nil
		}
		// The page reader is at row c.stop of the row group. Without an
		// offset index a seek decodes the pages before the row, so it is
		// done once, to the stretch's first row.
		c.start = c.stop
		if r > c.start && (c.canSeek || c.start == 0) {
			if err := c.pages.SeekToRow(r); err != nil {
				return c.st.errorf(c.col, "seeking row %d: %v", r, err)
			}
			c.start = r
		}
		p, err := c.pages.ReadPage()
		if err != nil {
			if errors.Is(err, io.EOF) {
				return c.st.errorf(c.col, "no values from row %d", c.start)
			}
			return c.st.errorf(c.col, "row %d: %v", c.start, err)
		}
		c.page = p
		c.stop = c.start + p.NumRows()
		if err := c.decode(p); err != nil {
			return err
		}
	}
	return nil
}

// decode sets the typed views of page p.
func (c *columnCursor) decode(p parquet.Page) error {
	n := int(p.NumRows())
	if p.NumNulls() != 0 || int(p.NumValues()) != n || n == 0 {
		return c.st.errorf(c.col, "page at row %d has %d rows, %d values, %d nulls", c.start, n, p.NumValues(), p.NumNulls())
	}
	v := p.Data()
	want := storeColumns[c.col].kind
	if d := p.Dictionary(); d != nil {
		if want != parquet.ByteArray || v.Kind() != encoding.Int32 {
			return c.st.errorf(c.col, "unexpected dictionary encoding")
		}
		if err := c.setDictionary(d); err != nil {
			return err
		}
		c.indexes = v.Int32()
		if len(c.indexes) != n {
			return c.st.errorf(c.col, "page at row %d: %d indexes for %d rows", c.start, len(c.indexes), n)
		}
		for _, i := range c.indexes {
			if i < 0 || int(i) >= len(c.dictStrings) {
				return c.st.errorf(c.col, "page at row %d: dictionary index %d of %d", c.start, i, len(c.dictStrings))
			}
		}
		return nil
	}
	c.indexes = nil
	var got int
	switch {
	case want == parquet.ByteArray && v.Kind() == encoding.ByteArray:
		c.data, c.offsets = v.ByteArray()
		got = len(c.offsets) - 1
		for i := 0; i < got; i++ {
			if c.offsets[i] > c.offsets[i+1] || int(c.offsets[i+1]) > len(c.data) {
				return c.st.errorf(c.col, "page at row %d: bad value offsets", c.start)
			}
		}
	case want == parquet.Int32 && v.Kind() == encoding.Int32:
		c.i32 = v.Int32()
		got = len(c.i32)
	case want == parquet.Int64 && v.Kind() == encoding.Int64:
		c.i64 = v.Int64()
		got = len(c.i64)
	case want == parquet.Double && v.Kind() == encoding.Double:
		c.f64 = v.Double()
		got = len(c.f64)
	default:
		return c.st.errorf(c.col, "page at row %d holds %v values", c.start, v.Kind())
	}
	if got != n {
		return c.st.errorf(c.col, "page at row %d: %d values for %d rows", c.start, got, n)
	}
	return nil
}

// setDictionary makes the strings of dictionary d current.
func (c *columnCursor) setDictionary(d parquet.Dictionary) error {
	if d == c.dict {
		return nil
	}
	v := d.Page().Data()
	if v.Kind() != encoding.ByteArray {
		return c.st.errorf(c.col, "dictionary of %v values", v.Kind())
	}
	data, offsets := v.ByteArray()
	if len(offsets) == 0 {
		return c.st.errorf(c.col, "empty dictionary")
	}
	c.dict = d
	c.dictStrings = c.dictStrings[:0]
	for i := 0; i+1 < len(offsets); i++ {
		if offsets[i] > offsets[i+1] || int(offsets[i+1]) > len(data) {
			return c.st.errorf(c.col, "dictionary: bad value offsets")
		}
		c.dictStrings = append(c.dictStrings, c.intern(data[offsets[i]:offsets[i+1]]))
	}
	return nil
}

// intern returns b as a string shared by every equal value the cursor
// reads: a store repeats its few day and window names on every row.
func (c *columnCursor) intern(b []byte) string {
	if string(b) == c.last {
		return c.last
	}
	s, ok := c.shared[string(b)]
	if !ok {
		if c.shared == nil {
			c.shared = make(map[string]string)
		}
		s = string(b)
		c.shared[s] = s
	}
	c.last = s
	return s
}

// each calls set(i, j) for the i-th wanted row and its value's index j in
// the current page. The wanted rows are rows, or [a, b) if rows is nil.
func (c *columnCursor) each(a, b int64, rows []int32, set func(i, j int)) error {
	if rows == nil {
		for r := a; r < b; {
			if err := c.seek(r); err != nil {
				return err
			}
			end := min(b, c.stop)
			for j, i := int(r-c.start), int(r-a); r < end; r, i, j = r+1, i+1, j+1 {
				set(i, j)
			}
		}
		return nil
	}
	for i, r := range rows {
		if r64 := int64(r); r64 >= c.stop {
			if err := c.seek(r64); err != nil {
				return err
			}
		}
		set(i, int(int64(r)-c.start))
	}
	return nil
}

func (c *columnCursor) strings(a, b int64, rows []int32, out []string) error {
	return c.each(a, b, rows, func(i, j int) {
		if c.indexes != nil {
			out[i] = c.dictStrings[c.indexes[j]]
		} else {
			out[i] = c.intern(c.data[c.offsets[j]:c.offsets[j+1]])
		}
	})
}

func (c *columnCursor) int32s(a, b int64, rows []int32, out []int32) error {
	if rows == nil {
		return c.copyRange(a, b, func(i, j, n int) { copy(out[i:i+n], c.i32[j:j+n]) })
	}
	return c.each(a, b, rows, func(i, j int) { out[i] = c.i32[j] })
}

func (c *columnCursor) int64s(a, b int64, rows []int32, out []int64) error {
	if rows == nil {
		return c.copyRange(a, b, func(i, j, n int) { copy(out[i:i+n], c.i64[j:j+n]) })
	}
	return c.each(a, b, rows, func(i, j int) { out[i] = c.i64[j] })
}

func (c *columnCursor) float64s(a, b int64, rows []int32, out []float64) error {
	if rows == nil {
		return c.copyRange(a, b, func(i, j, n int) { copy(out[i:i+n], c.f64[j:j+n]) })
	}
	return c.each(a, b, rows, func(i, j int) { out[i] = c.f64[j] })
}

// copyRange calls span(i, j, n) for runs of n rows of [a, b) that start at
// the i-th row and value j of the current page.
func (c *columnCursor) copyRange(a, b int64, span func(i, j, n int)) error {
	for r := a; r < b; {
		if err := c.seek(r); err != nil {
			return err
		}
		n := min(b, c.stop) - r
		span(int(r-a), int(r-c.start), int(n))
		r += n
	}
	return nil
}

// compareEdges orders edges by day, window name, from, to.
func compareEdges(a, b Edge) int {
	if c := cmp.Compare(a.Day, b.Day); c != 0 {
		return c
	}
	if c := cmp.Compare(a.Window, b.Window); c != 0 {
		return c
	}
	if c := cmp.Compare(a.From, b.From); c != 0 {
		return c
	}
	return cmp.Compare(a.To, b.To)
}

// Regions returns the regions the store was built on, kept in the store by
// Ingest (and in the file by WriteFile) so that later steps need not be
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

// Days returns the local days that have at least one edge in the named
// window, in ascending order.
func (s *Store) Days(window string) []string {
	var days []string
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
	type dayWindow struct{ day, window string }
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
				return nil, fmt.Errorf("regiongraph: merge: day %s (window %s) is in both store %d and store %d; ingest a day's trips together", e.Day, e.Window, j+1, i+1)
			}
			owner[k] = i
		}
		out.Edges = append(out.Edges, s.Edges...)
		out.Meta.Quality.Read += s.Meta.Quality.Read
		out.Meta.Quality.Used += s.Meta.Quality.Used
		for r, n := range s.Meta.Quality.Rejected {
			out.Meta.Quality.Rejected[r] += n
		}
		out.Meta.Sources = append(out.Meta.Sources, s.Meta.Sources...)
		if len(out.regionsGeoJSON) == 0 {
			out.regionsGeoJSON = s.regionsGeoJSON
		}
	}
	slices.SortStableFunc(out.Edges, compareEdges)
	return out, nil
}
