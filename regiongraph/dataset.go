package regiongraph

import (
	"cmp"
	"encoding/json"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"sync"

	"github.com/parquet-go/parquet-go"
)

// A dataset is the day-partitioned layout of a store (SCHEMA.md): a
// directory holding manifest.json (the store's metadata and the list of
// its days), regions.geojson, and one Parquet file per local day,
// day=YYYY-MM-DD/part-0.parquet, with the columns of the single-file
// layout. A reader of a period opens only its days; tools that know hive
// partitioning read day=*/*.parquet as one table.

// Names inside a dataset directory.
const (
	ManifestName       = "manifest.json"
	datasetRegionsName = "regions.geojson"
	datasetFormat      = "narrows day-graph dataset"
)

// dayFileName is the path, inside a dataset, of a day's Parquet file.
func dayFileName(day string) string { return "day=" + day + "/part-0.parquet" }

// datasetPageBytes is the page size of a dataset's day files: pages of
// about 8,000 values, so that the page statistics of trips, which fall
// within a window, let a reader skip the tail of one- and two-trip pairs
// in a few pages' steps.
const datasetPageBytes = 64 << 10

// IsDataset tells whether path is a directory (a dataset, or meant as one)
// rather than a single-file store.
func IsDataset(path string) bool {
	fi, err := os.Stat(path)
	return err == nil && fi.IsDir()
}

// DatasetWriter writes a store as a dataset one day at a time, holding
// only the day being written. Nothing is visible at the dataset's path
// until Close: the days go to a temporary directory beside it, which Close
// completes with the manifest and renames into place, so that a crash or
// an error leaves either the dataset that was there before or none.
type DatasetWriter struct {
	dir, tmp string
	meta     Meta
	regions  []byte
	lastDay  Day  // of the last day claimed with edges
	anyDay   bool // whether a day was claimed with edges
	closed   bool
	mu       sync.Mutex // of days and written, set as day files are written
	days     []dayJSON  // ascending
	written  Written
	// pageBytes is the page size of the day files (tests use small pages).
	pageBytes int
}

// CreateDataset starts a dataset at dir with the store metadata meta and
// the regions the store refers to (GeoJSON as partition.WriteGeoJSON
// writes it; nil stores none). dir may not exist yet, be an empty
// directory or hold a dataset, which Close replaces; anything else there
// is refused.
func CreateDataset(dir string, meta Meta, regionsGeoJSON []byte) (*DatasetWriter, error) {
	if dir == "" {
		return nil, errors.New("regiongraph: dataset: no directory")
	}
	if err := replaceable(dir); err != nil {
		return nil, err
	}
	// Windows are checked here, not at Close, so that no day is written
	// for metadata the manifest cannot hold.
	if _, err := windowsJSON(meta.Windows); err != nil {
		return nil, fmt.Errorf("regiongraph: dataset %s: %v", dir, err)
	}
	clean := filepath.Clean(dir)
	tmp, err := os.MkdirTemp(filepath.Dir(clean), "."+filepath.Base(clean)+".tmp-")
	if err != nil {
		return nil, fmt.Errorf("regiongraph: dataset: %w", err)
	}
	return &DatasetWriter{dir: clean, tmp: tmp, meta: meta, regions: regionsGeoJSON, pageBytes: datasetPageBytes}, nil
}

// replaceable reports why a dataset may not be written at dir.
func replaceable(dir string) error {
	fi, err := os.Stat(dir)
	if errors.Is(err, os.ErrNotExist) {
		return nil
	}
	if err != nil {
		return fmt.Errorf("regiongraph: dataset: %w", err)
	}
	if !fi.IsDir() {
		return fmt.Errorf("regiongraph: dataset %s: a file is there, not a dataset directory", dir)
	}
	if _, err := os.Stat(filepath.Join(dir, ManifestName)); err == nil {
		return nil
	}
	entries, err := os.ReadDir(dir)
	if err != nil {
		return fmt.Errorf("regiongraph: dataset: %w", err)
	}
	if len(entries) > 0 {
		return fmt.Errorf("regiongraph: dataset %s: the directory holds other files and no %s; refusing to replace it", dir, ManifestName)
	}
	return nil
}

// WriteDay writes the edges of one local day, every window, in any order;
// days must come in ascending order. A day without edges writes nothing.
// The edges are not modified.
func (dw *DatasetWriter) WriteDay(day Day, edges []Edge) error {
	if err := dw.claimDay(day, edges); err != nil {
		return err
	}
	if len(edges) == 0 {
		return nil
	}
	return dw.writeDay(day, dayFileRows(edgeOrderOf(dw.meta.Windows), edges), totalsOf(dw.meta.Windows, edges))
}

// claimDay checks that the edges of day may come next: WriteDay's rules.
// The day's file may then be written (writeDay) on any goroutine, beside
// the files of other claimed days.
func (dw *DatasetWriter) claimDay(day Day, edges []Edge) error {
	if dw.closed {
		return errors.New("regiongraph: dataset: write after Close or Abort")
	}
	if y, _, _ := day.Date(); y < 0 || y > 9999 {
		return fmt.Errorf("regiongraph: dataset %s: day %s is not YYYY-MM-DD", dw.dir, day)
	}
	if dw.anyDay && day <= dw.lastDay {
		return fmt.Errorf("regiongraph: dataset %s: day %s after day %s; days must come in ascending order", dw.dir, day, dw.lastDay)
	}
	if len(edges) == 0 {
		return nil
	}
	for i := range edges {
		if edges[i].Day != day {
			return fmt.Errorf("regiongraph: dataset %s: an edge of day %s given as day %s", dw.dir, edges[i].Day, day)
		}
	}
	dw.lastDay, dw.anyDay = day, true
	return nil
}

// writeDay writes the file of a claimed day from its edges in the day
// file's order (dayFileRows) and lists it in the manifest with its totals
// (none when nil); it may run on several goroutines at once.
func (dw *DatasetWriter) writeDay(day Day, rows []Edge, totals []DayTotal) error {
	if len(rows) == 0 {
		return nil
	}
	text := day.String()
	name := dayFileName(text)
	path := filepath.Join(dw.tmp, filepath.FromSlash(name))
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		return fmt.Errorf("regiongraph: dataset: %w", err)
	}
	size, err := writeFileSynced(path, func(f *os.File) error {
		opts := []parquet.WriterOption{
			parquet.Compression(&storeZstd),
			parquet.PageBufferSize(dw.pageBytes),
			parquet.KeyValueMetadata(metaSchemaVersion, strconv.Itoa(schemaVersion)),
			parquet.KeyValueMetadata(metaRegions, dw.meta.RegionsSHA256),
			parquet.KeyValueMetadata(metaTimeZone, dw.meta.TimeZone),
		}
		ew := newEdgeWriter(f, rowGroupRows, opts, dw.meta.Windows)
		if err := ew.add(rows); err != nil {
			return err
		}
		return ew.close()
	})
	if err != nil {
		return fmt.Errorf("regiongraph: dataset %s: day %s: %w", dw.dir, day, err)
	}
	dw.mu.Lock()
	defer dw.mu.Unlock()
	// Days written beside each other may finish out of order.
	i, _ := slices.BinarySearchFunc(dw.days, text, func(d dayJSON, day string) int { return strings.Compare(d.Day, day) })
	dw.days = slices.Insert(dw.days, i, dayJSON{Day: text, File: name, Edges: int64(len(rows)), Bytes: size, Totals: totalsJSON(dw.meta.Windows, totals, false)})
	dw.written.Edges += len(rows)
	dw.written.Days++
	return nil
}

// dayFileRows returns a copy of a day's edges in the order of a day file
// (compareDayFileRows), each 144-byte edge moved once: by appendByTrips
// when the edges are in store order, else by sorting indexes.
func dayFileRows(order edgeOrder, edges []Edge) []Edge {
	if rows, ok := appendByTrips(order, make([]Edge, 0, len(edges)), edges); ok {
		return rows
	}
	idx := make([]int32, len(edges))
	for i := range idx {
		idx[i] = int32(i)
	}
	slices.SortFunc(idx, func(a, b int32) int { return compareDayFileRowsAt(order, &edges[a], &edges[b]) })
	rows := make([]Edge, len(edges))
	for i, j := range idx {
		rows[i] = edges[j]
	}
	return rows
}

// maxCountedTrips bounds the trips of an edge that appendByTrips counts.
const maxCountedTrips = 1 << 16

// appendByTrips appends edges of one day in store order (by window, from,
// to: what an ingest hands over) to dst in the day file's order, and
// reports whether it could: edges in store order are already in that
// order but for trips, so a stable counting sort by trips, descending,
// within each window's run gives it in linear time. Edges out of store
// order, or with more than maxCountedTrips trips, append nothing.
func appendByTrips(order edgeOrder, dst, edges []Edge) ([]Edge, bool) {
	for i := range edges {
		e := &edges[i]
		if e.Trips < 0 || e.Trips > maxCountedTrips {
			return dst, false
		}
		if i > 0 {
			p := &edges[i-1]
			if pw, ew := order.rank(p.Window), order.rank(e.Window); pw > ew || pw == ew && (p.From > e.From || p.From == e.From && p.To >= e.To) {
				return dst, false
			}
		}
	}
	base := len(dst)
	dst = slices.Grow(dst, len(edges))[:base+len(edges)]
	rows := dst[base:]
	var count []int
	for a := 0; a < len(edges); {
		b := a + 1
		top := edges[a].Trips
		for b < len(edges) && edges[b].Window == edges[a].Window {
			top = max(top, edges[b].Trips)
			b++
		}
		// count[k] is where the edges of top-k trips begin: most trips
		// first.
		count = slices.Grow(count[:0], top+2)[:top+2]
		clear(count)
		for i := a; i < b; i++ {
			count[top-edges[i].Trips+1]++
		}
		count[0] = a
		for t := 1; t < len(count); t++ {
			count[t] += count[t-1]
		}
		for i := a; i < b; i++ {
			k := top - edges[i].Trips
			rows[count[k]] = edges[i]
			count[k]++
		}
		a = b
	}
	return dst, true
}

// compareDayFileRowsAt is compareDayFileRows on pointers, which do not
// copy the edges.
func compareDayFileRowsAt(order edgeOrder, a, b *Edge) int {
	if a.Window != b.Window {
		return compareDayFileRows(order, *a, *b)
	}
	if c := cmp.Compare(b.Trips, a.Trips); c != 0 {
		return c
	}
	if c := cmp.Compare(a.From, b.From); c != 0 {
		return c
	}
	return cmp.Compare(a.To, b.To)
}

// compareDayFileRows is the order of the rows of a day file: by window,
// then trips descending, so that within a window the pairs with few trips
// fill the last pages, whose statistics let a reader with a minimum of
// trips skip them; then from and to, for fixed bytes.
func compareDayFileRows(order edgeOrder, a, b Edge) int {
	if a.Window != b.Window {
		return cmp.Compare(order.rank(a.Window), order.rank(b.Window))
	}
	if c := cmp.Compare(b.Trips, a.Trips); c != 0 {
		return c
	}
	if c := cmp.Compare(a.From, b.From); c != 0 {
		return c
	}
	return cmp.Compare(a.To, b.To)
}

// writeFileSynced creates path, has write fill it, and syncs it to disk;
// it returns the file's size.
func writeFileSynced(path string, write func(f *os.File) error) (int64, error) {
	f, err := os.OpenFile(path, os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o644)
	if err != nil {
		return 0, err
	}
	err = write(f)
	if err == nil {
		err = f.Sync()
	}
	var size int64
	if err == nil {
		var fi os.FileInfo
		if fi, err = f.Stat(); err == nil {
			size = fi.Size()
		}
	}
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	return size, err
}

// Written returns what the writer has written so far.
func (dw *DatasetWriter) Written() Written {
	dw.mu.Lock()
	defer dw.mu.Unlock()
	return dw.written
}

// Close writes the regions and the manifest and puts the dataset in place
// of whatever dataset was at its path.
func (dw *DatasetWriter) Close() error {
	if dw.closed {
		return errors.New("regiongraph: dataset: Close after Close or Abort")
	}
	dw.closed = true
	err := dw.finish()
	if err != nil {
		os.RemoveAll(dw.tmp)
	}
	return err
}

func (dw *DatasetWriter) finish() error {
	m, err := newManifest(dw.meta, dw.days)
	if err != nil {
		return fmt.Errorf("regiongraph: dataset %s: %v", dw.dir, err)
	}
	if len(dw.regions) > 0 {
		if _, err := writeFileSynced(filepath.Join(dw.tmp, datasetRegionsName), func(f *os.File) error {
			_, err := f.Write(dw.regions)
			return err
		}); err != nil {
			return fmt.Errorf("regiongraph: dataset %s: %w", dw.dir, err)
		}
		m.Regions = datasetRegionsName
		m.RegionsBytes = int64(len(dw.regions))
	}
	b, err := json.MarshalIndent(m, "", "  ")
	if err != nil {
		return fmt.Errorf("regiongraph: dataset %s: %v", dw.dir, err)
	}
	if _, err := writeFileSynced(filepath.Join(dw.tmp, ManifestName), func(f *os.File) error {
		_, err := f.Write(append(b, '\n'))
		return err
	}); err != nil {
		return fmt.Errorf("regiongraph: dataset %s: %w", dw.dir, err)
	}
	// The directory's modes: MkdirTemp makes it private.
	if err := os.Chmod(dw.tmp, 0o755); err != nil {
		return fmt.Errorf("regiongraph: dataset: %w", err)
	}
	if err := replaceable(dw.dir); err != nil {
		return err
	}
	var old string
	if _, err := os.Stat(dw.dir); err == nil {
		// Move the old dataset aside, put the new one in, then remove
		// the old: a crash in between leaves the old one beside.
		clean := filepath.Clean(dw.dir)
		if old, err = os.MkdirTemp(filepath.Dir(clean), "."+filepath.Base(clean)+".old-"); err != nil {
			return fmt.Errorf("regiongraph: dataset: %w", err)
		}
		if err := os.Remove(old); err != nil {
			return fmt.Errorf("regiongraph: dataset: %w", err)
		}
		if err := os.Rename(dw.dir, old); err != nil {
			return fmt.Errorf("regiongraph: dataset: %w", err)
		}
	}
	if err := os.Rename(dw.tmp, dw.dir); err != nil {
		if old != "" {
			os.Rename(old, dw.dir)
		}
		return fmt.Errorf("regiongraph: dataset: %w", err)
	}
	syncDir(filepath.Dir(dw.dir))
	if old != "" {
		os.RemoveAll(old)
	}
	return nil
}

// syncDir makes a rename in dir durable where the system allows it.
func syncDir(dir string) {
	if d, err := os.Open(dir); err == nil {
		d.Sync()
		d.Close()
	}
}

// Abort removes what the writer wrote; the dataset at its path, if any, is
// left as it was. Abort after Close does nothing.
func (dw *DatasetWriter) Abort() {
	if dw.closed {
		return
	}
	dw.closed = true
	os.RemoveAll(dw.tmp)
}

// WriteDataset writes the store as a dataset at dir (see CreateDataset).
func (s *Store) WriteDataset(dir string) error { return s.writeDataset(dir, datasetPageBytes) }

// writeDataset is WriteDataset with pages of pageBytes bytes.
func (s *Store) writeDataset(dir string, pageBytes int) error {
	if s == nil {
		return errors.New("regiongraph: write: nil store")
	}
	dw, err := CreateDataset(dir, s.Meta, s.regionsGeoJSON)
	if err != nil {
		return err
	}
	dw.pageBytes = pageBytes
	edges := edgeOrderOf(s.Meta.Windows).sorted(s.Edges)
	for len(edges) > 0 {
		n := dayLen(edges)
		if err := dw.WriteDay(edges[0].Day, edges[:n]); err != nil {
			dw.Abort()
			return err
		}
		edges = edges[n:]
	}
	return dw.Close()
}

// StaleDatasetDirs returns the temporary directories that a writer of the
// dataset at dir killed before Close left beside it; an old dataset set
// aside for the rename is listed only when the new one is in place.
func StaleDatasetDirs(dir string) ([]string, error) {
	clean := filepath.Clean(dir)
	parent, base := filepath.Dir(clean), filepath.Base(clean)
	entries, err := os.ReadDir(parent)
	if err != nil {
		if os.IsNotExist(err) {
			return nil, nil
		}
		return nil, err
	}
	_, statErr := os.Stat(filepath.Join(clean, ManifestName))
	var stale []string
	for _, e := range entries {
		name := e.Name()
		if !e.IsDir() {
			continue
		}
		if strings.HasPrefix(name, "."+base+".tmp-") || (statErr == nil && strings.HasPrefix(name, "."+base+".old-")) {
			stale = append(stale, filepath.Join(parent, name))
		}
	}
	return stale, nil
}
