package regiongraph

import (
	"context"
	"errors"
	"fmt"
	"runtime"
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
// finished day on a writer goroutine, a day file per goroutine at a time:
// day files are independent, and compressing them is most of an ingest's
// work once the trips are read.
type dayPipe struct {
	dw    *DatasetWriter
	order edgeOrder // of the store's windows
	day   Day
	edges []Edge
	// ordered: edges are in the day file's order, each window's run
	// ordered as it came (appendByTrips), so the writer need not copy
	// them again.
	ordered bool
	// totals adds up the day's edges as they come, in store order.
	totals *totalsAdder
	queue  chan dayEdges
	done   sync.WaitGroup
	mu     sync.Mutex
	err    error // the first of the writers or of a claim
	closed bool
}

type dayEdges struct {
	day     Day
	edges   []Edge
	ordered bool       // in the day file's order (dayPipe)
	totals  []DayTotal // nil when the edges came out of store order
}

// dayWriters is the number of day files a dayPipe writes at once.
func dayWriters() int { return max(1, min(runtime.GOMAXPROCS(0), 4)) }

func newDayPipe(dw *DatasetWriter) *dayPipe {
	// Unbuffered: a day waits for a free writer, so that the days held
	// are the writers' and the one being collected.
	p := &dayPipe{dw: dw, order: edgeOrderOf(dw.meta.Windows), totals: newTotalsAdder(dw.meta.Windows), queue: make(chan dayEdges)}
	for range dayWriters() {
		p.done.Add(1)
		go func() {
			defer p.done.Done()
			for d := range p.queue {
				if p.failed() {
					continue
				}
				if d.totals == nil {
					d.totals = totalsOf(dw.meta.Windows, d.edges)
				}
				rows := d.edges
				if !d.ordered {
					rows = dayFileRows(p.order, rows)
				}
				p.fail(dw.writeDay(d.day, rows, d.totals))
			}
		}()
	}
	return p
}

func (p *dayPipe) failed() bool {
	p.mu.Lock()
	defer p.mu.Unlock()
	return p.err != nil
}

func (p *dayPipe) fail(err error) {
	p.mu.Lock()
	defer p.mu.Unlock()
	if p.err == nil {
		p.err = err
	}
}

// send claims the collected day and hands it to a writer.
func (p *dayPipe) send() error {
	if len(p.edges) == 0 {
		return nil
	}
	d := dayEdges{p.day, p.edges, p.ordered, p.totals.totals}
	if p.totals.outOfOrder {
		d.totals = nil
	}
	p.edges = nil
	p.totals = newTotalsAdder(p.dw.meta.Windows)
	if err := p.dw.claimDay(d.day, d.edges); err != nil {
		p.fail(err)
		return err
	}
	if p.failed() {
		return p.firstErr()
	}
	p.queue <- d
	return nil
}

func (p *dayPipe) firstErr() error {
	p.mu.Lock()
	defer p.mu.Unlock()
	return p.err
}

// add takes the next edges in store order.
func (p *dayPipe) add(es []Edge) error {
	for len(es) > 0 {
		if p.day != es[0].Day && len(p.edges) > 0 {
			if err := p.send(); err != nil {
				return err
			}
		}
		if len(p.edges) == 0 {
			p.ordered = true
		}
		p.day = es[0].Day
		n := dayLen(es)
		p.totals.add(es[:n])
		// The edges of a window come in one piece, after the windows
		// before it, so each piece is put in the day file's order as it
		// is copied in.
		ok := false
		if k := len(p.edges); p.ordered && (k == 0 || p.order.rank(p.edges[k-1].Window) < p.order.rank(es[0].Window)) {
			p.edges, ok = appendByTrips(p.order, p.edges, es[:n])
		}
		if !ok {
			p.ordered = false
			p.edges = append(p.edges, es[:n]...)
		}
		es = es[n:]
	}
	return nil
}

// abort drops the day being collected and waits for the writers, after
// a failure: what they wrote is about to be removed.
func (p *dayPipe) abort() {
	p.edges = nil
	p.close()
}

// close writes the last day and waits for the writers.
func (p *dayPipe) close() error {
	if p.closed {
		return p.firstErr()
	}
	p.closed = true
	p.send()
	close(p.queue)
	p.done.Wait()
	return p.firstErr()
}

// MergeDataset merges stores into a dataset at dir, a day at a time: the
// stores given in memory first, then the stores at paths in order. Every
// store at paths is read a day at a time: a dataset a day file at a time,
// a single file a day's rows at a time (its days are runs of rows; one
// whose days are not in ascending order is read whole). The rules are
// Merge's: same regions hash, time zone and windows, and a (day, window)
// in one store only. The returned store has the merged metadata and no
// edges.
func MergeDataset(dir string, stores []*Store, paths []string) (*Store, Written, error) {
	if err := replaceable(dir); err != nil {
		return nil, Written{}, err
	}
	var srcs []mergeSource
	defer func() {
		for _, s := range srcs {
			s.close()
		}
	}()
	var metas []*Store // metadata and regions of each source, no edges
	for _, s := range stores {
		if s == nil {
			return nil, Written{}, fmt.Errorf("regiongraph: merge: store %d is nil", len(metas)+1)
		}
		srcs = append(srcs, &memoryDays{edges: s.Edges})
		metas = append(metas, &Store{Meta: s.Meta, regionsGeoJSON: s.regionsGeoJSON})
	}
	for _, p := range paths {
		src, meta, regions, err := openMergeInput(p)
		if err != nil {
			return nil, Written{}, err
		}
		srcs = append(srcs, src)
		metas = append(metas, &Store{Meta: meta, regionsGeoJSON: regions})
	}
	return mergeDays(dir, srcs, metas)
}

// openMergeInput opens the store at path, either layout, as a merge
// source.
func openMergeInput(path string) (mergeSource, Meta, []byte, error) {
	if IsDataset(path) {
		d, regions, err := openMergeDataset(path)
		if err != nil {
			return nil, Meta{}, nil, err
		}
		return d, d.meta, regions, nil
	}
	return openMergeFile(path, stretchRows)
}

// mergeDays writes the days of srcs, whose metadata are metas, to a
// dataset at dir: each step takes the earliest day any source has next,
// so that a day of each source is held at a time (and the days being
// written, see dayPipe).
func mergeDays(dir string, srcs []mergeSource, metas []*Store) (*Store, Written, error) {
	if len(srcs) == 0 {
		return nil, Written{}, errors.New("regiongraph: merge: no stores")
	}
	// Merge checks and sums the metadata.
	out, err := Merge(metas...)
	if err != nil {
		return nil, Written{}, err
	}
	type pending struct {
		day   Day
		edges []Edge // none after the source's last day
	}
	heads := make([]pending, len(srcs))
	advance := func(i int) error {
		day, es, err := srcs[i].next()
		if err == nil && len(es) > 0 && len(heads[i].edges) > 0 && day <= heads[i].day {
			err = fmt.Errorf("regiongraph: merge: store %d gives day %s after day %s", i+1, day, heads[i].day)
		}
		heads[i] = pending{day, es}
		return err
	}
	for i := range srcs {
		if err := advance(i); err != nil {
			return nil, Written{}, err
		}
	}
	dw, err := CreateDataset(dir, out.Meta, out.regionsGeoJSON)
	if err != nil {
		return nil, Written{}, err
	}
	pipe := newDayPipe(dw)
	fail := func(err error) (*Store, Written, error) {
		pipe.abort()
		dw.Abort()
		return nil, Written{}, err
	}
	var edges []Edge
	for {
		day, found := Day(0), false
		for _, h := range heads {
			if len(h.edges) > 0 && (!found || h.day < day) {
				day, found = h.day, true
			}
		}
		if !found {
			break
		}
		edges = edges[:0]
		owner := map[WindowIndex]int{}
		for i := range heads {
			if len(heads[i].edges) == 0 || heads[i].day != day {
				continue
			}
			es := heads[i].edges
			for j, e := range es {
				if j > 0 && es[j-1].Window == e.Window {
					continue
				}
				if k, dup := owner[e.Window]; dup && k != i {
					return fail(fmt.Errorf("regiongraph: merge: day %s (window %s) is in both store %d and store %d; ingest a day's trips together", day, out.Meta.WindowName(e.Window), k+1, i+1))
				}
				owner[e.Window] = i
			}
			edges = append(edges, es...)
			heads[i].edges = nil
			if err := advance(i); err != nil {
				return fail(err)
			}
		}
		if err := pipe.add(edges); err != nil {
			return fail(err)
		}
	}
	if err := pipe.close(); err != nil {
		return fail(err)
	}
	if err := dw.Close(); err != nil {
		return nil, Written{}, err
	}
	return out, dw.Written(), nil
}

// IngestMergeDataset is IngestDataset merging the stores at paths (either
// layout) into the new dataset at dir, day by day: the new trips' days
// come from the aggregation as it finishes them, and the stores at paths
// are read a day at a time (see MergeDataset), so that no store is held
// whole. edit, when not nil, may change the new trips' metadata (the
// sources' names) before it is merged. The returned store has the merged
// metadata and no edges.
func IngestMergeDataset(ctx context.Context, regions *partition.Partition, regionsSHA256 string, inputs []Input, opts Options, dir string, paths []string, edit func(*Meta)) (*Store, Written, error) {
	if err := replaceable(dir); err != nil {
		return nil, Written{}, err
	}
	src := startIngestDays(ctx, regions, regionsSHA256, inputs, opts, edit)
	srcs := []mergeSource{src}
	defer func() {
		for _, s := range srcs {
			s.close()
		}
	}()
	s, err := src.store()
	if err != nil {
		return nil, Written{}, err
	}
	metas := []*Store{{Meta: s.Meta, regionsGeoJSON: s.regionsGeoJSON}}
	for _, p := range paths {
		in, meta, regions, err := openMergeInput(p)
		if err != nil {
			return nil, Written{}, err
		}
		srcs = append(srcs, in)
		metas = append(metas, &Store{Meta: meta, regionsGeoJSON: regions})
	}
	out, n, err := mergeDays(dir, srcs, metas)
	if err != nil {
		return nil, Written{}, err
	}
	n.Spilled = s.spilled
	return out, n, nil
}

// ingestDays is an ingest running on its own goroutine as a merge source:
// its sink hands each finished day over a channel, so that the ingest
// aggregates at most a day ahead of the merge.
type ingestDays struct {
	meta     chan *Store // the store's metadata, once the ingest has read its inputs
	days     chan dayEdges
	quit     chan struct{} // closed by close: the sink stops
	finished chan struct{} // closed when the ingest has returned
	err      error         // of the ingest, read after finished
	edit     func(*Meta)
	stopped  bool
}

// errMergeStopped ends an ingest whose merge ended first.
var errMergeStopped = errors.New("regiongraph: merge ended")

func startIngestDays(ctx context.Context, regions *partition.Partition, regionsSHA256 string, inputs []Input, opts Options, edit func(*Meta)) *ingestDays {
	d := &ingestDays{meta: make(chan *Store, 1), days: make(chan dayEdges), quit: make(chan struct{}), finished: make(chan struct{}), edit: edit}
	go func() {
		defer close(d.finished)
		d.err = ingest(ctx, regions, regionsSHA256, inputs, opts, d.begin)
		close(d.days)
	}()
	return d
}

// begin is the ingest's sink: edges come in store order; a day is sent
// when the next begins, and the last at the end.
func (d *ingestDays) begin(s *Store) (func([]Edge) error, func() error, error) {
	if d.edit != nil {
		d.edit(&s.Meta)
	}
	d.meta <- s
	var cur dayEdges
	send := func() error {
		if len(cur.edges) == 0 {
			return nil
		}
		select {
		case d.days <- cur:
			cur = dayEdges{}
			return nil
		case <-d.quit:
			return errMergeStopped
		}
	}
	add := func(es []Edge) error {
		for len(es) > 0 {
			if cur.day != es[0].Day {
				if err := send(); err != nil {
					return err
				}
				cur.day = es[0].Day
			}
			n := dayLen(es)
			// The sink must not keep es: the day's edges are copied.
			cur.edges = append(cur.edges, es[:n]...)
			es = es[n:]
		}
		return nil
	}
	return add, send, nil
}

// store waits for the ingest to read its inputs and returns the store's
// metadata, or the ingest's error.
func (d *ingestDays) store() (*Store, error) {
	select {
	case s := <-d.meta:
		return s, nil
	case <-d.finished:
		select {
		case s := <-d.meta:
			return s, nil
		default:
		}
		if d.err == nil {
			return nil, errors.New("regiongraph: ingest ended without a store")
		}
		return nil, d.err
	}
}

func (d *ingestDays) next() (Day, []Edge, error) {
	de, ok := <-d.days
	if !ok {
		<-d.finished
		return 0, nil, d.err
	}
	return de.day, de.edges, nil
}

// close stops the ingest, if it still runs, and waits for it.
func (d *ingestDays) close() {
	if !d.stopped {
		d.stopped = true
		close(d.quit)
	}
	<-d.finished
}
