package regiongraph

import (
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"sync"
	"sync/atomic"
)

// readCounter counts what a read opened and read; tests set it through
// ReadOptions.counter to check what a read touches.
type readCounter struct {
	files atomic.Int64 // Parquet files opened, each counted once
	bytes atomic.Int64 // bytes read from them
	mu    sync.Mutex
	seen  map[string]bool
}

// countingReaderAt counts the bytes read through it.
type countingReaderAt struct {
	r io.ReaderAt
	c *readCounter
}

func (r countingReaderAt) ReadAt(p []byte, off int64) (int, error) {
	n, err := r.r.ReadAt(p, off)
	r.c.bytes.Add(int64(n))
	return n, err
}

// readerOf returns f, counted when opts asks for it.
func readerOf(f *os.File, opts ReadOptions) io.ReaderAt {
	c := opts.counter
	if c == nil {
		return f
	}
	c.mu.Lock()
	if !c.seen[f.Name()] {
		if c.seen == nil {
			c.seen = map[string]bool{}
		}
		c.seen[f.Name()] = true
		c.files.Add(1)
	}
	c.mu.Unlock()
	return countingReaderAt{f, c}
}

// datasetOpenFiles is the number of day files a dataset read holds open
// at once.
const datasetOpenFiles = 32

// readManifest reads and checks the manifest of the dataset at dir.
func readManifest(dir string) (*manifest, Meta, error) {
	path := filepath.Join(dir, ManifestName)
	f, err := os.Open(path)
	if err != nil {
		if os.IsNotExist(err) {
			return nil, Meta{}, fmt.Errorf("regiongraph: %s: a directory without %s: not a day-graph dataset, or one whose writing did not finish", dir, ManifestName)
		}
		return nil, Meta{}, fmt.Errorf("regiongraph: %w", err)
	}
	defer f.Close()
	data, err := io.ReadAll(io.LimitReader(f, maxManifestBytes+1))
	if err != nil {
		return nil, Meta{}, fmt.Errorf("regiongraph: %s: %v", path, err)
	}
	if len(data) > maxManifestBytes {
		return nil, Meta{}, fmt.Errorf("regiongraph: %s: more than %d bytes, not a dataset manifest", path, maxManifestBytes)
	}
	return parseManifest(path, data)
}

// readDatasetRegions reads the regions GeoJSON the manifest m of the
// dataset at dir names.
func readDatasetRegions(dir string, m *manifest) ([]byte, error) {
	path := filepath.Join(dir, m.Regions)
	b, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("regiongraph: dataset %s: %v", dir, err)
	}
	if int64(len(b)) != m.RegionsBytes {
		return nil, fmt.Errorf("regiongraph: %s: %d bytes, the manifest says %d", path, len(b), m.RegionsBytes)
	}
	return b, nil
}

// openDataset reads the manifest and regions of the dataset at dir into a
// store without edges, and lists the day files of opts' period with the
// options to read each with: a day file holds one day, so the period is
// applied by choosing files.
func openDataset(dir string, opts ReadOptions) (s *Store, days []dayJSON, fileOpts ReadOptions, err error) {
	m, meta, err := readManifest(dir)
	if err != nil {
		return nil, nil, opts, err
	}
	s = &Store{Meta: meta, totals: m.totals, totalsRecorded: m.totalsRecorded}
	if m.Regions != "" {
		if s.regionsGeoJSON, err = readDatasetRegions(dir, m); err != nil {
			return nil, nil, opts, err
		}
	}
	if opts.Window != "" && !slices.Contains(s.WindowNames(), opts.Window) {
		return nil, nil, opts, fmt.Errorf("regiongraph: %s: no window %q in the store (it has %s)", dir, opts.Window, strings.Join(s.WindowNames(), ", "))
	}
	for _, d := range m.Days {
		if opts.keepsDay(d.Day) {
			days = append(days, d)
		}
	}
	fileOpts = opts
	fileOpts.From, fileOpts.To = "", ""
	return s, days, fileOpts, nil
}

// readDataset is ReadFileOptions of a dataset directory: it opens the
// manifest, then only the day files of the days opts keeps.
func readDataset(dir string, opts ReadOptions, stretchRows int64) (*Store, error) {
	s, days, fileOpts, err := openDataset(dir, opts)
	if err != nil {
		return nil, err
	}
	opts, fileOpts = s.wholeWithoutTotals(opts), s.wholeWithoutTotals(fileOpts)
	// Two passes over the files, a batch of them open at a time: the
	// first finds the rows kept, so that the edges are allocated once at
	// their number, the second fills them.
	type selection struct {
		all  bool
		rows []int32
	}
	var kept []selection
	total := 0
	bufs := make([]readBuffers, readWorkers())
	for a := 0; a < len(days); a += datasetOpenFiles {
		sts, _, closeAll, err := openDays(dir, s.Meta, days[a:min(a+datasetOpenFiles, len(days))], fileOpts, stretchRows)
		if err == nil {
			err = forEachWorker(len(sts), func(w, i int) error { return sts[i].selectRows(fileOpts, &bufs[w]) })
		}
		closeAll()
		if err != nil {
			return nil, err
		}
		for _, st := range sts {
			kept = append(kept, selection{st.all, st.rows})
			total += st.kept()
		}
	}
	if total > 0 {
		s.Edges = make([]Edge, total)
	}
	k, offset := 0, 0
	for a := 0; a < len(days) && total > 0; a += datasetOpenFiles {
		sts, dayOf, closeAll, err := openDays(dir, s.Meta, days[a:min(a+datasetOpenFiles, len(days))], fileOpts, stretchRows)
		if err == nil && k+len(sts) > len(kept) {
			err = fmt.Errorf("regiongraph: dataset %s: its files changed while read", dir)
		}
		if err == nil {
			for _, st := range sts {
				st.all, st.rows = kept[k].all, kept[k].rows
				st.offset = offset
				offset += st.kept()
				k++
			}
			err = fillDays(sts, dayOf, s.Edges, fileOpts, bufs)
		}
		closeAll()
		if err != nil {
			return nil, err
		}
	}
	if err := checkAndOrder(dir, s); err != nil {
		return nil, err
	}
	if err := s.finishTotals(dir, opts); err != nil {
		return nil, err
	}
	return s, nil
}

// readDays reads the edges opts keeps of the given day files, in store
// order.
func readDays(dir string, meta Meta, days []dayJSON, opts ReadOptions, stretchRows int64) ([]Edge, error) {
	stretches, dayOf, closeAll, err := openDays(dir, meta, days, opts, stretchRows)
	defer closeAll()
	if err != nil {
		return nil, err
	}
	edges, err := readStretches(stretches, opts)
	if err != nil {
		return nil, err
	}
	if err := checkDayEdges(stretches, dayOf, edges); err != nil {
		return nil, err
	}
	return edges, nil
}

// openDays opens the given day files and cuts them into stretches; day
// holds each stretch's day. closeAll closes the files, also on an error.
func openDays(dir string, meta Meta, days []dayJSON, opts ReadOptions, stretchRows int64) (stretches []*stretch, day []Day, closeAll func(), err error) {
	var files []*os.File
	closeAll = func() {
		for _, f := range files {
			f.Close()
		}
	}
	for _, d := range days {
		path := filepath.Join(dir, filepath.FromSlash(d.File))
		f, err := os.Open(path)
		if err != nil {
			if os.IsNotExist(err) {
				return nil, nil, closeAll, fmt.Errorf("regiongraph: dataset %s: day %s: %s is missing", dir, d.Day, path)
			}
			return nil, nil, closeAll, fmt.Errorf("regiongraph: dataset %s: %w", dir, err)
		}
		files = append(files, f)
		fi, err := f.Stat()
		if err != nil {
			return nil, nil, closeAll, fmt.Errorf("regiongraph: %w", err)
		}
		if fi.Size() != d.Bytes {
			return nil, nil, closeAll, fmt.Errorf("regiongraph: %s: %d bytes, the manifest says %d: the file was changed or cut short", path, fi.Size(), d.Bytes)
		}
		pf, err := openParquetChecked(readerOf(f, opts), fi.Size())
		if err != nil {
			return nil, nil, closeAll, fmt.Errorf("regiongraph: %s: not a Parquet day file: %v", path, err)
		}
		if pf.NumRows() != d.Edges {
			return nil, nil, closeAll, fmt.Errorf("regiongraph: %s: %d rows, the manifest says %d", path, pf.NumRows(), d.Edges)
		}
		leaf, err := storeLeaves(path, pf)
		if err != nil {
			return nil, nil, closeAll, err
		}
		for _, kv := range [...]struct{ key, want string }{{metaRegions, meta.RegionsSHA256}, {metaTimeZone, meta.TimeZone}} {
			if got, _ := pf.Lookup(kv.key); got != kv.want {
				return nil, nil, closeAll, fmt.Errorf("regiongraph: %s: %s %q, the manifest says %q", path, kv.key, got, kv.want)
			}
		}
		sts, err := cutStretches(path, pf, leaf, stretchRows, meta.Windows)
		if err != nil {
			return nil, nil, closeAll, err
		}
		dayValue, err := ParseDay(d.Day)
		if err != nil {
			return nil, nil, closeAll, fmt.Errorf("regiongraph: dataset %s: manifest: %v", dir, err)
		}
		for _, st := range sts {
			st.dayOrder = true
		}
		stretches = append(stretches, sts...)
		for range sts {
			day = append(day, dayValue)
		}
	}
	return stretches, day, closeAll, nil
}

// fillDays fills the stretches' kept edges at their offsets in edges, each
// day in store order (see stretch.dayOrder), and checks their days.
func fillDays(stretches []*stretch, day []Day, edges []Edge, opts ReadOptions, bufs []readBuffers) error {
	cols := readColumns(opts)
	if err := forEachWorker(len(stretches), func(w, i int) error {
		st := stretches[i]
		return st.fill(edges[st.offset:st.offset+st.kept()], cols, &bufs[w])
	}); err != nil {
		return err
	}
	return checkDayEdges(stretches, day, edges)
}

// checkDayEdges checks that each stretch's edges are of its day.
func checkDayEdges(stretches []*stretch, day []Day, edges []Edge) error {
	return forEach(len(stretches), func(i int) error {
		st := stretches[i]
		mine := edges[st.offset : st.offset+st.kept()]
		for j := range mine {
			if mine[j].Day != day[i] {
				return fmt.Errorf("regiongraph: %s: holds an edge of day %s, the manifest lists it as day %s", st.path, mine[j].Day, day[i])
			}
		}
		return nil
	})
}

// datasetDayRange returns the first and last day of the dataset at dir.
func datasetDayRange(dir string) (first, last string, err error) {
	m, _, err := readManifest(dir)
	if err != nil {
		return "", "", err
	}
	if len(m.Days) == 0 {
		return "", "", nil
	}
	return m.Days[0].Day, m.Days[len(m.Days)-1].Day, nil
}
