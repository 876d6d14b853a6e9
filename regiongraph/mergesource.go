package regiongraph

import (
	"fmt"
	"os"
	"path/filepath"
)

// A mergeSource is one store of a streamed merge (MergeDataset), handed
// out a day at a time: next returns the store's next day and that day's
// edges in store order, or no edges after the last day. Only the day
// returned last is held, so a merge holds a day of each store.
type mergeSource interface {
	next() (day Day, edges []Edge, err error)
	close()
}

// memoryDays hands out the days of a store held in memory.
type memoryDays struct{ edges []Edge }

func (m *memoryDays) next() (Day, []Edge, error) {
	if len(m.edges) == 0 {
		return 0, nil, nil
	}
	n := dayLen(m.edges)
	es := m.edges[:n]
	m.edges = m.edges[n:]
	return es[0].Day, es, nil
}

func (m *memoryDays) close() {}

// datasetDays reads a dataset one day file at a time.
type datasetDays struct {
	dir  string
	meta Meta
	days []dayJSON // not yet read
}

func (d *datasetDays) next() (Day, []Edge, error) {
	for len(d.days) > 0 {
		day := d.days[0]
		d.days = d.days[1:]
		edges, err := readDays(d.dir, d.meta, []dayJSON{day}, ReadOptions{}, stretchRows)
		if err != nil {
			return 0, nil, err
		}
		if err := checkAndOrder(d.dir, &Store{Meta: d.meta, Edges: edges}); err != nil {
			return 0, nil, err
		}
		if len(edges) > 0 {
			return edges[0].Day, edges, nil
		}
	}
	return 0, nil, nil
}

func (d *datasetDays) close() {}

// openMergeDataset opens the dataset at dir as a merge source, with its
// metadata and regions.
func openMergeDataset(dir string) (*datasetDays, []byte, error) {
	m, meta, err := readManifest(dir)
	if err != nil {
		return nil, nil, err
	}
	var regions []byte
	if m.Regions != "" {
		if regions, err = os.ReadFile(filepath.Join(dir, m.Regions)); err != nil {
			return nil, nil, fmt.Errorf("regiongraph: %w", err)
		}
	}
	return &datasetDays{dir: dir, meta: meta, days: m.Days}, regions, nil
}

// fileDays reads a single-file store a day at a time. WriteParquet writes
// the edges in store order, day first, so each day is a run of rows: one
// pass over the day column alone finds the runs, and a day's edges are
// then read from its rows only. A file whose days are not in ascending
// order (not written by narrows) is read whole instead, as ReadFile does.
type fileDays struct {
	path        string
	f           *os.File
	meta        Meta
	regionsJSON []byte
	runs        []dayRun // not yet read, ascending days
}

// dayRun is the rows of one day in a single-file store: pieces of
// stretches, in file order.
type dayRun struct {
	day    string
	pieces []stretch
}

// openMergeFile opens the single-file store at path as a merge source,
// with its metadata and regions; a day is read in stretches of up to
// stretchRows rows.
func openMergeFile(path string, stretchRows int64) (mergeSource, Meta, []byte, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, Meta{}, nil, fmt.Errorf("regiongraph: %w", err)
	}
	fd := &fileDays{path: path, f: f}
	s, err := fd.open(stretchRows)
	if err != nil {
		f.Close()
		return nil, Meta{}, nil, err
	}
	if s != nil {
		// The days are not in order: the store was read whole.
		f.Close()
		return &memoryDays{edges: s.Edges}, s.Meta, s.regionsGeoJSON, nil
	}
	return fd, fd.meta, fd.regions(), nil
}

// open reads the file's metadata and finds its day runs; when the days
// are not ascending it returns the store read whole.
func (fd *fileDays) open(stretchRows int64) (*Store, error) {
	fi, err := fd.f.Stat()
	if err != nil {
		return nil, fmt.Errorf("regiongraph: %w", err)
	}
	pf, err := openParquetChecked(fd.f, fi.Size())
	if err != nil {
		return nil, fmt.Errorf("regiongraph: %s: not a Parquet day-graph store: %v", fd.path, err)
	}
	leaf, err := storeLeaves(fd.path, pf)
	if err != nil {
		return nil, err
	}
	s := &Store{}
	if err := readStoreMeta(fd.path, pf, s); err != nil {
		return nil, err
	}
	fd.meta, fd.regionsJSON = s.Meta, s.regionsGeoJSON
	stretches, err := cutStretches(fd.path, pf, leaf, stretchRows, fd.meta.Windows)
	if err != nil {
		return nil, err
	}
	var days [readBlock]string
	for _, st := range stretches {
		c := newColumnCursor(st, storeDay)
		for a := st.first; a < st.end; a += readBlock {
			b := min(a+readBlock, st.end)
			if err := c.strings(a, b, nil, days[:b-a]); err != nil {
				c.close()
				return nil, err
			}
			for i, day := range days[:b-a] {
				row := a + int64(i)
				n := len(fd.runs)
				switch {
				case n > 0 && day == fd.runs[n-1].day:
					r := &fd.runs[n-1]
					// A piece stays inside its stretch, the unit of
					// parallel reading.
					if p := &r.pieces[len(r.pieces)-1]; p.group == st.group && p.first >= st.first && p.end == row {
						p.end++
						continue
					}
					r.pieces = append(r.pieces, piece(st, row))
				case n > 0 && day < fd.runs[n-1].day:
					c.close()
					whole, err := ReadFile(fd.path)
					return whole, err
				default:
					fd.runs = append(fd.runs, dayRun{day: day, pieces: []stretch{piece(st, row)}})
				}
			}
		}
		c.close()
	}
	return nil, nil
}

// piece returns the one row row of st as a stretch of its own.
func piece(st *stretch, row int64) stretch {
	p := *st
	p.first, p.end = row, row+1
	p.rows, p.all = nil, true
	return p
}

func (fd *fileDays) regions() []byte { return fd.regionsJSON }

func (fd *fileDays) next() (Day, []Edge, error) {
	if len(fd.runs) == 0 {
		return 0, nil, nil
	}
	r := fd.runs[0]
	fd.runs = fd.runs[1:]
	pieces := make([]*stretch, len(r.pieces))
	for i := range r.pieces {
		pieces[i] = &r.pieces[i]
	}
	edges, err := readStretches(pieces, ReadOptions{})
	if err != nil {
		return 0, nil, err
	}
	if err := checkAndOrder(fd.path, &Store{Meta: fd.meta, Edges: edges}); err != nil {
		return 0, nil, err
	}
	if len(edges) == 0 {
		return 0, nil, fmt.Errorf("regiongraph: %s: day %s has rows but no edges were read", fd.path, r.day)
	}
	return edges[0].Day, edges, nil
}

func (fd *fileDays) close() { fd.f.Close() }
