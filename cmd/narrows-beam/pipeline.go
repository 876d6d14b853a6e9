package main

import (
	"bytes"
	"cmp"
	"context"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"os"
	"reflect"
	"slices"

	"github.com/apache/beam/sdks/v2/go/pkg/beam"
	"github.com/apache/beam/sdks/v2/go/pkg/beam/register"

	"narrows/partition"
	"narrows/regiongraph"
)

// Config is what every step of the pipeline needs: plain values, since
// the runner ships the steps to its workers as JSON. Paths must be
// readable (the regions, the shards) and writable (the staging folder)
// by every worker.
type Config struct {
	Regions string // regions GeoJSON
	Format  string // trips, points or gpx ("" is trips)
	// Placement: the options of narrows place.
	TimeZone     string
	Windows      []string // NAME=HH:MM-HH:MM
	Columns      string   // name=header,...
	DistanceUnit string
	Strict       bool
	MinUsedShare float64
	// Output: the dataset folder, and the staging folder beside it that
	// the day files are written into before the manifest puts them in
	// place.
	Out, Staging string
}

// options returns the narrows options of the configuration.
func (c *Config) options() (regiongraph.Options, error) {
	o := regiongraph.DefaultOptions()
	if c.TimeZone != "" {
		o.TimeZone = c.TimeZone
	}
	if len(c.Windows) > 0 {
		o.Windows = nil
		for _, w := range c.Windows {
			pw, err := regiongraph.ParseWindow(w)
			if err != nil {
				return o, err
			}
			o.Windows = append(o.Windows, pw)
		}
	}
	cols, err := regiongraph.ParseColumns(c.Columns)
	if err != nil {
		return o, err
	}
	o.Columns = cols
	if c.DistanceUnit != "" {
		o.DistanceUnit = c.DistanceUnit
	}
	o.Strict = c.Strict
	o.MinUsedShare = c.MinUsedShare
	return o, o.Validate()
}

// loaded is what a step reads once per worker: the regions and options.
type loaded struct {
	regions *partition.Partition
	sha     string
	opts    regiongraph.Options
}

func (c *Config) load() (*loaded, error) {
	data, err := os.ReadFile(c.Regions)
	if err != nil {
		return nil, err
	}
	p, err := partition.ReadGeoJSON(bytes.NewReader(data), c.Regions)
	if err != nil {
		return nil, err
	}
	opts, err := c.options()
	if err != nil {
		return nil, err
	}
	return &loaded{regions: p, sha: regionsSHA256(data), opts: opts}, nil
}

// Shard is one input file (or GPX folder) and its place in the input
// order, which decides which of two repeated rows is kept.
type Shard struct {
	Index int64
	Path  string
}

// Placed is a regiongraph.PlacedTrip with where it came from (shard and
// row), in types every runner encodes.
type Placed struct {
	Shard, Seq                   int64
	Day                          int32
	Windows                      int64
	From, To                     int32
	Distance, Duration, Straight float32
	Rows                         int32
	Outcome                      string
	Keyed                        bool
	KeyID, KeyRow                int64
}

// shardMeta is a shard's metadata as it travels to the last step.
type shardMeta struct {
	Index int64
	Meta  regiongraph.PlacedMeta
}

// dayResult is what the aggregation of one day sends to the last step.
type dayResult struct {
	Quality regiongraph.Quality
	File    *regiongraph.DayFile // nil for a day without edges
}

// summary is one element of the last step: a shard's metadata or a
// day's result.
type summary struct {
	Shard *shardMeta `json:",omitempty"`
	Day   *dayResult `json:",omitempty"`
}

// placeFn places a shard with narrows' own code, emitting each placed
// trip keyed by its local day and the shard's metadata.
type placeFn struct {
	Cfg Config
	l   *loaded
}

func (f *placeFn) Setup() error {
	var err error
	f.l, err = f.Cfg.load()
	return err
}

func (f *placeFn) ProcessElement(ctx context.Context, sh Shard, emit func(int64, Placed), emitMeta func(string)) error {
	var seq int64
	meta, err := regiongraph.Place(ctx, f.l.regions, f.l.sha, []regiongraph.Input{{Path: sh.Path, Format: regiongraph.Format(f.Cfg.Format)}}, f.l.opts,
		func(p *regiongraph.PlacedTrip) error {
			emit(int64(p.Day), Placed{Shard: sh.Index, Seq: seq, Day: int32(p.Day), Windows: int64(p.Windows), From: p.From, To: p.To,
				Distance: p.Distance, Duration: p.Duration, Straight: p.Straight, Rows: p.Rows, Outcome: string(p.Outcome),
				Keyed: p.Keyed, KeyID: int64(p.KeyID), KeyRow: int64(p.KeyRow)})
			seq++
			return nil
		})
	if err != nil {
		return fmt.Errorf("shard %d: %w", sh.Index+1, err)
	}
	b, err := json.Marshal(summary{Shard: &shardMeta{Index: sh.Index, Meta: meta}})
	if err != nil {
		return err
	}
	emitMeta(string(b))
	return nil
}

// aggregateDayFn aggregates one local day's placed trips, in input order,
// and writes the day's file into the staging folder.
type aggregateDayFn struct {
	Cfg Config
	l   *loaded
}

func (f *aggregateDayFn) Setup() error {
	var err error
	f.l, err = f.Cfg.load()
	return err
}

func (f *aggregateDayFn) ProcessElement(ctx context.Context, day int64, trips func(*Placed) bool, emit func(string)) error {
	var all []Placed
	var p Placed
	for trips(&p) {
		all = append(all, p)
	}
	slices.SortFunc(all, func(a, b Placed) int { return cmp.Or(cmp.Compare(a.Shard, b.Shard), cmp.Compare(a.Seq, b.Seq)) })
	head, err := regiongraph.NewPlacedMeta(f.l.sha, f.l.opts)
	if err != nil {
		return err
	}
	a, err := regiongraph.NewAggregator(f.l.regions, f.l.sha, f.l.opts)
	if err != nil {
		return err
	}
	defer a.Close()
	if err := a.AddMeta(head); err != nil {
		return err
	}
	for i := range all {
		q := &all[i]
		if err := a.Add(&regiongraph.PlacedTrip{Day: regiongraph.Day(q.Day), Windows: uint64(q.Windows), From: q.From, To: q.To,
			Distance: q.Distance, Duration: q.Duration, Straight: q.Straight, Rows: q.Rows, Outcome: regiongraph.Reason(q.Outcome),
			Keyed: q.Keyed, KeyID: uint64(q.KeyID), KeyRow: uint64(q.KeyRow)}); err != nil {
			return fmt.Errorf("day %d, shard %d row %d: %w", day, q.Shard+1, q.Seq+1, err)
		}
	}
	var edges []regiongraph.Edge
	q, err := a.Edges(ctx, func(es []regiongraph.Edge) error { edges = append(edges, es...); return nil })
	if err != nil {
		return err
	}
	res := dayResult{Quality: q}
	if len(edges) > 0 {
		meta := regiongraph.Meta{RegionsSHA256: f.l.sha, TimeZone: head.TimeZone, Windows: head.Windows}
		df, err := regiongraph.WriteDayFile(f.Cfg.Staging, meta, edges[0].Day, edges)
		if err != nil {
			return err
		}
		res.File = &df
	}
	b, err := json.Marshal(summary{Day: &res})
	if err != nil {
		return err
	}
	emit(string(b))
	return nil
}

// finishFn sums the quality counts of the shards and days, makes the
// checks of narrows ingest, and writes the manifest that puts the
// dataset in place.
type finishFn struct {
	Cfg Config
	l   *loaded
}

func (f *finishFn) Setup() error {
	var err error
	f.l, err = f.Cfg.load()
	return err
}

func (f *finishFn) ProcessElement(_ int, parts func(*string) bool) error {
	var shards []shardMeta
	var days []regiongraph.DayFile
	q := regiongraph.Quality{Rejected: map[string]int64{}}
	add := func(x regiongraph.Quality) {
		q.Read += x.Read
		q.Used += x.Used
		q.OffsetTimes += x.OffsetTimes
		q.OffsetMismatch += x.OffsetMismatch
		for r, n := range x.Rejected {
			q.Rejected[r] += n
		}
	}
	var text string
	for parts(&text) {
		var s summary
		if err := json.Unmarshal([]byte(text), &s); err != nil {
			return err
		}
		switch {
		case s.Shard != nil:
			shards = append(shards, *s.Shard)
			add(s.Shard.Meta.Quality)
		case s.Day != nil:
			add(s.Day.Quality)
			if s.Day.File != nil {
				days = append(days, *s.Day.File)
			}
		}
	}
	slices.SortFunc(shards, func(a, b shardMeta) int { return cmp.Compare(a.Index, b.Index) })
	head, err := regiongraph.NewPlacedMeta(f.l.sha, f.l.opts)
	if err != nil {
		return err
	}
	meta := regiongraph.Meta{RegionsSHA256: f.l.sha, TimeZone: head.TimeZone, Windows: head.Windows, Quality: q}
	for _, s := range shards {
		meta.Sources = append(meta.Sources, s.Meta.Sources...)
	}
	if err := f.l.opts.CheckYield(q, meta.Sources); err != nil {
		return err
	}
	if f.l.opts.Strict && q.OffsetMismatch > 0 {
		return regiongraph.OffsetMismatchError(q, head.TimeZone)
	}
	var regions bytes.Buffer
	if err := f.l.regions.WriteGeoJSON(&regions); err != nil {
		return err
	}
	return regiongraph.FinishDataset(f.Cfg.Staging, f.Cfg.Out, meta, regions.Bytes(), days)
}

func init() {
	register.DoFn4x1[context.Context, Shard, func(int64, Placed), func(string), error](&placeFn{})
	register.DoFn4x1[context.Context, int64, func(*Placed) bool, func(string), error](&aggregateDayFn{})
	register.DoFn2x1[int, func(*string) bool, error](&finishFn{})
	register.Emitter2[int64, Placed]()
	register.Emitter1[string]()
	register.Iter1[Placed]()
	register.Iter1[string]()
	beam.RegisterType(typeOf[Shard]())
	beam.RegisterType(typeOf[Placed]())
}

// Build adds the pipeline to s: shards in, the dataset at cfg.Out out.
// The shards' order is the input order of narrows ingest.
func Build(s beam.Scope, cfg Config, shards []string) error {
	if len(shards) == 0 {
		return errors.New("no shards")
	}
	if _, err := cfg.options(); err != nil {
		return err
	}
	var in []Shard
	for i, p := range shards {
		in = append(in, Shard{Index: int64(i), Path: p})
	}
	col := beam.CreateList(s.Scope("shards"), in)
	placed, metas := beam.ParDo2(s.Scope("place"), &placeFn{Cfg: cfg}, col)
	byDay := beam.GroupByKey(s.Scope("group by day"), placed)
	days := beam.ParDo(s.Scope("aggregate day"), &aggregateDayFn{Cfg: cfg}, byDay)
	all := beam.AddFixedKey(s.Scope("gather"), beam.Flatten(s.Scope("gather"), metas, days))
	beam.ParDo0(s.Scope("manifest"), &finishFn{Cfg: cfg}, beam.GroupByKey(s.Scope("gather"), all))
	return nil
}

func typeOf[T any]() reflect.Type { return reflect.TypeFor[T]() }

func regionsSHA256(data []byte) string {
	sum := sha256.Sum256(data)
	return hex.EncodeToString(sum[:])
}
