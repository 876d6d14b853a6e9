package regiongraph

import (
	"fmt"
	"io"
)

// A sink receives a store as an ingest or an aggregation finishes it:
// begin is given the store with its metadata before the first edge, and
// returns where the edges go, in store order, and what to call after the
// last. Ingest and the Aggregator share the three sinks below.
type sinkBegin = func(*Store) (add func([]Edge) error, end func() error, err error)

// memorySink keeps every edge in the store.
type memorySink struct{ store *Store }

func (k *memorySink) begin(s *Store) (func([]Edge) error, func() error, error) {
	k.store = s
	return func(es []Edge) error { s.Edges = append(s.Edges, es...); return nil }, func() error { return nil }, nil
}

// fileSink writes the store to w as one Parquet file, edges as they come;
// edit, when not nil, may change the metadata first.
type fileSink struct {
	w     io.Writer
	edit  func(*Meta)
	store *Store
	ew    *edgeWriter
}

func (k *fileSink) begin(s *Store) (func([]Edge) error, func() error, error) {
	k.store = s
	if k.edit != nil {
		k.edit(&s.Meta)
	}
	wopts, err := storeMetadata(s)
	if err != nil {
		return nil, nil, fmt.Errorf("regiongraph: write: %v", err)
	}
	k.ew = newEdgeWriter(k.w, rowGroupRows, wopts, s.Meta.Windows)
	// The edges come in store order: their totals are added up as they
	// pass and go into the file's metadata at the end.
	totals := newTotalsAdder(s.Meta.Windows)
	add := func(es []Edge) error {
		totals.add(es)
		if err := k.ew.add(es); err != nil {
			return fmt.Errorf("regiongraph: write: %w", err)
		}
		return nil
	}
	return add, func() error {
		if !totals.outOfOrder {
			if err := k.ew.setTotals(totals.totals); err != nil {
				return fmt.Errorf("regiongraph: write: %v", err)
			}
		}
		if err := k.ew.close(); err != nil {
			return fmt.Errorf("regiongraph: write: %w", err)
		}
		return nil
	}, nil
}

// written counts what the sink wrote; call it after a successful end.
func (k *fileSink) written() Written {
	return Written{Edges: k.ew.n, Days: k.ew.days, Spilled: k.store.spilled}
}

// datasetSink writes the store as a dataset at dir (see CreateDataset),
// each finished day handed to a writer goroutine (dayPipe); edit, when not
// nil, may change the metadata first.
type datasetSink struct {
	dir   string
	edit  func(*Meta)
	store *Store
	dw    *DatasetWriter
	days  *dayPipe
}

func (k *datasetSink) begin(s *Store) (func([]Edge) error, func() error, error) {
	k.store = s
	if k.edit != nil {
		k.edit(&s.Meta)
	}
	var err error
	if k.dw, err = CreateDataset(k.dir, s.Meta, s.regionsGeoJSON); err != nil {
		return nil, nil, err
	}
	k.days = newDayPipe(k.dw)
	return k.days.add, k.days.close, nil
}

// finish puts the dataset in place after the ingest or aggregation ended
// with err, or, when err is not nil, removes what was written, and counts
// what was written.
func (k *datasetSink) finish(err error) (*Store, Written, error) {
	if err != nil {
		if k.days != nil {
			k.days.abort()
		}
		if k.dw != nil {
			k.dw.Abort()
		}
		return nil, Written{}, err
	}
	if err := k.dw.Close(); err != nil {
		return nil, Written{}, err
	}
	n := k.dw.Written()
	n.Spilled = k.store.spilled
	return k.store, n, nil
}
