package regiongraph

import (
	"cmp"
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"sync"

	"narrows/partition"
)

// IngestDataset is Ingest writing the store as a dataset at dir (see
// CreateDataset): each day's edges are handed to a writer goroutine as
// soon as the day's last window is aggregated, so that a day is
// compressed while the next aggregates, and are not kept. The returned
// store has the metadata and no edges; edit, when not nil, may change the
// metadata (the sources' names) before it is written. On an error nothing
// is left at dir but what was there before.
func IngestDataset(ctx context.Context, regions *partition.Partition, regionsSHA256 string, inputs []Input, opts Options, dir string, edit func(*Meta)) (*Store, Written, error) {
	// The directory is checked before the input is read.
	if err := replaceable(dir); err != nil {
		return nil, Written{}, err
	}
	k := datasetSink{dir: dir, edit: edit}
	return k.finish(ingest(ctx, regions, regionsSHA256, inputs, opts, k.begin))
}

// dayPipe collects edges given in store order into days and writes each
// finished day on its own goroutine, one day behind the caller.
type dayPipe struct {
	dw     *DatasetWriter
	day    Day
	edges  []Edge
	queue  chan dayEdges
	done   sync.WaitGroup
	err    error // of the writer goroutine, read after done
	closed bool
}

type dayEdges struct {
	day   Day
	edges []Edge
}

func newDayPipe(dw *DatasetWriter) *dayPipe {
	p := &dayPipe{dw: dw, queue: make(chan dayEdges, 1)}
	p.done.Add(1)
	go func() {
		defer p.done.Done()
		for d := range p.queue {
			if p.err == nil {
				p.err = dw.WriteDay(d.day, d.edges)
			}
		}
	}()
	return p
}

// add takes the next edges in store order.
func (p *dayPipe) add(es []Edge) error {
	for len(es) > 0 {
		if p.day != es[0].Day && len(p.edges) > 0 {
			p.queue <- dayEdges{p.day, p.edges}
			p.edges = nil
		}
		p.day = es[0].Day
		n := 1
		for n < len(es) && es[n].Day == p.day {
			n++
		}
		p.edges = append(p.edges, es[:n]...)
		es = es[n:]
	}
	return nil
}

// close writes the last day and waits for the writer.
func (p *dayPipe) close() error {
	if p.closed {
		return p.err
	}
	p.closed = true
	if len(p.edges) > 0 {
		p.queue <- dayEdges{p.day, p.edges}
		p.edges = nil
	}
	close(p.queue)
	p.done.Wait()
	return p.err
}

// MergeDataset merges stores into a dataset at dir, a day at a time: the
// stores given in memory first, then the stores at paths in order. A
// dataset among paths is read one day file at a time; a single-file store
// is read whole (it is one ingest's store). The rules are Merge's: same
// regions hash, time zone and windows, and a (day, window) in one store
// only. The returned store has the merged metadata and no edges.
func MergeDataset(dir string, stores []*Store, paths []string) (*Store, Written, error) {
	if err := replaceable(dir); err != nil {
		return nil, Written{}, err
	}
	var ins []mergeInput
	for _, s := range stores {
		if s == nil {
			return nil, Written{}, fmt.Errorf("regiongraph: merge: store %d is nil", len(ins)+1)
		}
		ins = append(ins, mergeInput{store: s, meta: s.Meta, regions: s.regionsGeoJSON})
	}
	for _, p := range paths {
		in := mergeInput{path: p}
		if IsDataset(p) {
			m, meta, err := readManifest(p)
			if err != nil {
				return nil, Written{}, err
			}
			in.meta, in.days = meta, m.Days
			if m.Regions != "" {
				if in.regions, err = os.ReadFile(filepath.Join(p, m.Regions)); err != nil {
					return nil, Written{}, fmt.Errorf("regiongraph: %w", err)
				}
			}
		} else {
			s, err := ReadFile(p)
			if err != nil {
				return nil, Written{}, err
			}
			in.store, in.meta, in.regions = s, s.Meta, s.regionsGeoJSON
		}
		ins = append(ins, in)
	}
	if len(ins) == 0 {
		return nil, Written{}, errors.New("regiongraph: merge: no stores")
	}
	// Merge checks and sums the metadata.
	metas := make([]*Store, len(ins))
	for i, in := range ins {
		metas[i] = &Store{Meta: in.meta, regionsGeoJSON: in.regions}
	}
	out, err := Merge(metas...)
	if err != nil {
		return nil, Written{}, err
	}
	dayset := map[string]bool{}
	for _, in := range ins {
		for _, d := range in.dayList() {
			dayset[d] = true
		}
	}
	days := make([]string, 0, len(dayset))
	for d := range dayset {
		days = append(days, d)
	}
	slices.Sort(days)
	dw, err := CreateDataset(dir, out.Meta, out.regionsGeoJSON)
	if err != nil {
		return nil, Written{}, err
	}
	for _, day := range days {
		var edges []Edge
		owner := map[WindowIndex]int{}
		for i := range ins {
			es, err := ins[i].day(day)
			if err != nil {
				dw.Abort()
				return nil, Written{}, err
			}
			for j, e := range es {
				if j > 0 && es[j-1].Window == e.Window {
					continue
				}
				if k, dup := owner[e.Window]; dup && k != i {
					dw.Abort()
					return nil, Written{}, fmt.Errorf("regiongraph: merge: day %s (window %s) is in both store %d and store %d; ingest a day's trips together", day, out.Meta.WindowName(e.Window), k+1, i+1)
				}
				owner[e.Window] = i
			}
			edges = append(edges, es...)
		}
		d, err := ParseDay(day)
		if err != nil {
			dw.Abort()
			return nil, Written{}, fmt.Errorf("regiongraph: merge: %v", err)
		}
		if err := dw.WriteDay(d, edges); err != nil {
			dw.Abort()
			return nil, Written{}, err
		}
	}
	if err := dw.Close(); err != nil {
		return nil, Written{}, err
	}
	return out, dw.Written(), nil
}

// mergeInput is one store of MergeDataset: in memory, or a dataset read a
// day at a time.
type mergeInput struct {
	path    string
	store   *Store    // in memory
	days    []dayJSON // of a dataset
	meta    Meta
	regions []byte
}

func (in *mergeInput) dayList() []string {
	if in.store == nil {
		out := make([]string, len(in.days))
		for i, d := range in.days {
			out[i] = d.Day
		}
		return out
	}
	var out []string
	for i, e := range in.store.Edges {
		if i == 0 || in.store.Edges[i-1].Day != e.Day {
			out = append(out, e.Day.String())
		}
	}
	return out
}

// day returns the input's edges of day, in store order.
func (in *mergeInput) day(day string) ([]Edge, error) {
	if in.store != nil {
		d, err := ParseDay(day)
		if err != nil {
			return nil, fmt.Errorf("regiongraph: merge: %v", err)
		}
		es := in.store.Edges
		a, _ := slices.BinarySearchFunc(es, d, func(e Edge, d Day) int { return cmp.Compare(e.Day, d) })
		b := a
		for b < len(es) && es[b].Day == d {
			b++
		}
		return es[a:b], nil
	}
	if _, found := slices.BinarySearchFunc(in.days, day, func(d dayJSON, day string) int { return strings.Compare(d.Day, day) }); !found {
		return nil, nil
	}
	i, _ := slices.BinarySearchFunc(in.days, day, func(d dayJSON, day string) int { return strings.Compare(d.Day, day) })
	edges, err := readDays(in.path, in.meta, in.days[i:i+1], ReadOptions{}, stretchRows)
	if err != nil {
		return nil, err
	}
	if compare := edgeOrderOf(in.meta.Windows).compare; !slices.IsSortedFunc(edges, compare) {
		slices.SortStableFunc(edges, compare)
	}
	if err := checkStore(in.path, &Store{Meta: in.meta, Edges: edges}); err != nil {
		return nil, err
	}
	return edges, nil
}
