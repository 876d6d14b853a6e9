package regiongraph

import (
	"cmp"
	"context"
	"errors"
	"fmt"
	"io"
	"slices"
	"strings"

	"narrows/partition"
)

// An Aggregator turns placed trips (Place) into the edges of the store,
// as Ingest does: the duplicate check over all shards, then per day and
// window the counts, sums and exact quantiles. Give it each shard's
// metadata (AddMeta) before the shard's trips (Add), shards in the order
// that decides which of two repeated rows is kept (the first), then call
// Edges, Finish or WriteTo once, and Close.
//
// Its memory is bounded as Ingest's: trip records past Options.MemoryMB
// go to a temporary file a chunk at a time and come back a day at a time,
// so placed trips need not come sorted by day.
type Aggregator struct {
	regions *partition.Partition
	sha     string
	opts    Options
	loc     *locator

	st      *settings // nil until the first AddMeta
	first   PlacedMeta
	t       *tally
	quality Quality // of the shards' metadata
	sources []Source
	done    bool
}

// NewAggregator returns an Aggregator for placed trips on regions with
// that hash. Of opts it uses MinUsedShare, Strict (times whose offset is
// not the zone's become an error, as in Ingest), MemoryMB and SpillDir;
// the time zone, windows and placement options come from the shards.
func NewAggregator(regions *partition.Partition, regionsSHA256 string, opts Options) (*Aggregator, error) {
	if regions == nil || len(regions.Regions) == 0 {
		return nil, errors.New("regiongraph: no regions")
	}
	loc, err := newLocator(regions)
	if err != nil {
		return nil, err
	}
	return &Aggregator{regions: regions, sha: regionsSHA256, opts: opts, loc: loc, quality: Quality{Rejected: make(map[string]int64)}}, nil
}

// AddMeta adds a shard's metadata: its quality counts and sources. Every
// shard must have been placed on the same regions with the same time
// zone, windows and placement options.
func (a *Aggregator) AddMeta(m PlacedMeta) error {
	if err := a.addMeta(m); err != nil {
		return fmt.Errorf("regiongraph: aggregate: %w", err)
	}
	return nil
}

func (a *Aggregator) addMeta(m PlacedMeta) error {
	if m.RegionsSHA256 != a.sha {
		return fmt.Errorf("placed on other regions (sha256 %s; these regions have %s)", m.RegionsSHA256, a.sha)
	}
	if a.st == nil {
		o := a.opts
		o.TimeZone, o.Windows = m.TimeZone, m.Windows
		st, err := o.settings()
		if err != nil {
			return err
		}
		if len(st.windows) > MaxPlacedWindows {
			return fmt.Errorf("%d windows; at most %d", len(st.windows), MaxPlacedWindows)
		}
		memory := int64(o.MemoryMB) << 20
		if o.MemoryMB <= 0 {
			memory = defaultMemoryMB << 20
		}
		st.spill = newSpillFile(o.SpillDir)
		st.seen = newRowSet(memory/4, st.spill)
		st.recordBudget = int(max(1, 3*memory/4/recordBytes))
		a.st, a.first, a.t = st, m, newTally(st, a.loc)
	} else {
		switch {
		case m.TimeZone != a.first.TimeZone:
			return fmt.Errorf("time zone %q; the first shard has %q", m.TimeZone, a.first.TimeZone)
		case !slices.Equal(m.Windows, a.first.Windows):
			return fmt.Errorf("windows %v; the first shard has %v", m.Windows, a.first.Windows)
		case m.Settings != a.first.Settings:
			return fmt.Errorf("placed with options %s; the first shard with %s", m.Settings, a.first.Settings)
		}
	}
	addQuality(&a.quality, m.Quality)
	a.sources = append(a.sources, m.Sources...)
	return nil
}

// index returns the locator index of a region id, 0 when none.
func (a *Aggregator) index(id int32) int {
	i, ok := slices.BinarySearchFunc(a.loc.regions, int(id), func(r locRegion, id int) int { return cmp.Compare(r.id, id) })
	if !ok {
		return 0
	}
	return i + 1
}

// Add adds a placed trip, after the metadata of its shard.
func (a *Aggregator) Add(p *PlacedTrip) error {
	if a.st == nil {
		return errors.New("regiongraph: aggregate: a placed trip before any shard's metadata")
	}
	if a.done {
		return errors.New("regiongraph: aggregate: a placed trip after the edges")
	}
	if err := p.check(len(a.st.windows)); err != nil {
		return fmt.Errorf("regiongraph: aggregate: %v", err)
	}
	r := p.Outcome
	if p.Keyed {
		if d := a.st.seen.check(rowKey{day: p.Day, id: p.KeyID, content: p.KeyRow}); d != reasonUsed {
			r = d
		}
		if a.st.seen.err != nil {
			return a.st.seen.err
		}
	}
	if r == reasonUsed {
		from, to := a.index(p.From), a.index(p.To)
		if from == 0 || to == 0 {
			return fmt.Errorf("regiongraph: aggregate: a trip from region %d to %d, not both in the regions", p.From, p.To)
		}
		rec := record{pair: uint32(from)<<16 | uint32(to), distance: p.Distance, duration: p.Duration, straight: p.Straight}
		t := a.t
		for wi := range a.st.windows {
			if p.Windows&(1<<wi) != 0 {
				t.hold(p.Day, wi, rec)
			}
		}
		if t.held > t.budget {
			t.spillAll()
			if t.err != nil {
				return t.err
			}
		}
	}
	a.t.count(r, int64(p.Rows))
	return nil
}

// Close removes the temporary file.
func (a *Aggregator) Close() {
	if a.st != nil {
		a.st.spill.close()
	}
}

// Edges hands the edges of the trips added, in store order a day and
// window at a time, to sink (which must not keep the slice), and returns
// the quality counts of the shards and their trips. It makes no yield
// check: an engine that aggregates each day apart sums the days' counts
// and calls Options.CheckYield.
func (a *Aggregator) Edges(ctx context.Context, sink func([]Edge) error) (Quality, error) {
	if a.st == nil {
		return Quality{}, errors.New("regiongraph: aggregate: no shards")
	}
	a.done = true
	a.st.seen = nil
	var total Quality
	_, err := finish(ctx, a.st, a.loc, []*tally{a.t}, func(q Quality) (func([]Edge) error, error) {
		total = q
		addQuality(&total, a.quality)
		return sink, nil
	})
	return total, err
}

// Finish is Edges for a store: the store's metadata (time zone, windows,
// quality summed over the shards, the shards' sources, the regions) goes
// to begin after the checks Ingest makes (the yield, and in strict mode
// the time offsets) and before the first edge; the edges then go to the
// first function begin returns, and the second is called at the end.
func (a *Aggregator) Finish(ctx context.Context, begin func(*Store) (add func([]Edge) error, end func() error, err error)) error {
	if a.st == nil {
		return errors.New("regiongraph: aggregate: no shards")
	}
	regionsJSON, err := storeRegionsJSON(a.regions)
	if err != nil {
		return err
	}
	a.done = true
	a.st.seen = nil
	return finishStore(ctx, a.st, a.loc, []*tally{a.t}, regionsJSON, a.sha, a.sources, &a.quality, begin)
}

// Store is Finish collecting the store in memory.
func (a *Aggregator) Store(ctx context.Context) (*Store, error) {
	var k memorySink
	err := a.Finish(ctx, k.begin)
	return k.store, err
}

// WriteTo is Finish writing the store to w as one Parquet file, the bytes
// IngestTo writes of the same trips; edit, when not nil, may change the
// metadata first. The returned store has the metadata and no edges.
func (a *Aggregator) WriteTo(ctx context.Context, w io.Writer, edit func(*Meta)) (*Store, Written, error) {
	k := fileSink{w: w, edit: edit}
	if err := a.Finish(ctx, k.begin); err != nil {
		return nil, Written{}, err
	}
	return k.store, k.written(), nil
}

// AddFile adds a placed-trip file (ReadPlaced): its metadata, then its
// trips. Errors name the file.
func (a *Aggregator) AddFile(path string) error {
	row := int64(0)
	_, err := ReadPlaced(path, func(m PlacedMeta) error {
		if err := a.addMeta(m); err != nil {
			return fmt.Errorf("regiongraph: aggregate: %s: %w", path, err)
		}
		return nil
	}, func(p *PlacedTrip) error {
		row++
		if err := a.Add(p); err != nil {
			return fmt.Errorf("regiongraph: aggregate: %s:row %d: %s", path, row, strings.TrimPrefix(err.Error(), "regiongraph: aggregate: "))
		}
		return nil
	})
	return err
}

// CheckYield returns a *YieldError when the quality counts q, of an
// ingest or aggregation of the sources, used no row or fewer than
// MinUsedShare of the rows read.
func (o Options) CheckYield(q Quality, sources []Source) error {
	return checkYield(&settings{opts: o}, q, sources)
}

// WriteDataset is Finish writing the store as a dataset at dir (see
// CreateDataset), a day at a time as the days are aggregated; edit, when
// not nil, may change the metadata first. Nothing is left at dir on an
// error. The returned store has the metadata and no edges.
func (a *Aggregator) WriteDataset(ctx context.Context, dir string, edit func(*Meta)) (*Store, Written, error) {
	k := datasetSink{dir: dir, edit: edit}
	return k.finish(a.Finish(ctx, k.begin))
}
