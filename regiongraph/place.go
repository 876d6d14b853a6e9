package regiongraph

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"slices"
	"time"

	"narrows/partition"
)

// An ingest is two steps: placing each trip (reading rows, the checks,
// finding its regions, its local day and windows), which needs no other
// row and so runs on any shard of the input anywhere, and aggregating the
// placed trips of a day into edges. Place is the first step alone, the
// Aggregator the second; Ingest runs both in one process.

// MaxPlacedWindows is the most windows Place handles: a placed trip keeps
// the windows it falls in as bits of a 64-bit word.
const MaxPlacedWindows = 64

// PlacedTrip is one trip after Place: where and when it falls, and the
// values its edge aggregates. A row that was given a duplicate-check key
// (a trip table CSV row that parsed) is a PlacedTrip even when a later
// check rejected it, because the duplicate check comes first and is made
// when the shards are aggregated: a repeat of it in another shard must
// count as a duplicate, whatever its own outcome.
type PlacedTrip struct {
	Day     Day    // local day of the start
	Windows uint64 // bit i: the start falls in window i of the shard's windows (in the order given); 0 when rejected
	From    int32  // origin region id; 0 when rejected
	To      int32  // destination region id; 0 when rejected
	// Travel distance (m), duration (s) and great-circle
	// origin-destination distance (m), as the ingest holds them.
	Distance, Duration, Straight float32
	Rows                         int32  // input rows the trip stands for: 1 for a table row, its points for a GPS trip
	Outcome                      Reason // "" when used, else the first check that rejected it
	// Keyed rows take part in the duplicate check with KeyID (hash of the
	// trip id, 0 without one) and KeyRow (hash of the row's text).
	Keyed         bool
	KeyID, KeyRow uint64
}

// PlacedMeta describes the placed trips of a shard: what they were placed
// on and with, the rows of the shard that have no PlacedTrip (rows that
// failed to parse, GPS points not in a trip, rejected rows without a
// duplicate-check key), and the shard's files.
type PlacedMeta struct {
	RegionsSHA256 string
	TimeZone      string
	Windows       []Window
	// Settings are the placement options as text: shards aggregate
	// together only when theirs are equal.
	Settings string
	Quality  Quality // rows counted in the shard, outside the placed trips
	Sources  []Source
}

// placementSettings are the options that decide how a row is placed.
type placementSettings struct {
	Columns        map[string]string `json:"columns,omitempty"`
	DistanceUnit   string            `json:"distance_unit"`
	MinStraight    float64           `json:"min_od_metres"`
	MaxDurationS   float64           `json:"max_duration_s"`
	MinSpeedKMH    float64           `json:"min_speed_kmh"`
	MaxSpeedKMH    float64           `json:"max_speed_kmh"`
	MinDetour      float64           `json:"min_detour"`
	MaxJumpKMH     float64           `json:"max_jump_speed_kmh"`
	GapMinutes     float64           `json:"gap_minutes"`
	DwellMinutes   float64           `json:"dwell_minutes"`
	DwellMetres    float64           `json:"dwell_metres"`
	MaxQuotedLines int               `json:"max_quoted_lines"`
	MaxQuotedBytes int64             `json:"max_quoted_bytes"`
	EarliestTime   string            `json:"earliest_time,omitempty"`
	LatestTime     string            `json:"latest_time,omitempty"`
}

// NewPlacedMeta returns the PlacedMeta that Place gives shards placed on
// regions of that hash with opts, without quality counts or sources: an
// engine that aggregates placed trips it did not read from files gives it
// to Aggregator.AddMeta.
func NewPlacedMeta(regionsSHA256 string, opts Options) (PlacedMeta, error) {
	st, err := opts.settings()
	if err != nil {
		return PlacedMeta{}, err
	}
	return placedMetaOf(st, regionsSHA256)
}

func placedMetaOf(st *settings, regionsSHA256 string) (PlacedMeta, error) {
	if len(st.windows) > MaxPlacedWindows {
		return PlacedMeta{}, fmt.Errorf("regiongraph: place: %d windows; at most %d", len(st.windows), MaxPlacedWindows)
	}
	o := st.opts
	ps := placementSettings{Columns: o.Columns, DistanceUnit: o.DistanceUnit, MinStraight: o.MinStraightMetres,
		MaxDurationS: o.MaxDuration.Seconds(), MinSpeedKMH: o.MinSpeedKMH, MaxSpeedKMH: o.MaxSpeedKMH,
		MinDetour: o.MinDetour, MaxJumpKMH: o.MaxJumpKMH, GapMinutes: o.GapMinutes, DwellMinutes: o.DwellMinutes,
		DwellMetres: o.DwellMetres, MaxQuotedLines: o.MaxQuotedLines, MaxQuotedBytes: o.MaxQuotedBytes}
	if ps.DistanceUnit == "" {
		ps.DistanceUnit = "m"
	}
	if !o.EarliestTime.IsZero() {
		ps.EarliestTime = o.EarliestTime.UTC().Format(time.RFC3339Nano)
	}
	if !o.LatestTime.IsZero() {
		ps.LatestTime = o.LatestTime.UTC().Format(time.RFC3339Nano)
	}
	b, err := json.Marshal(ps) // map keys sorted: the text depends only on the options
	if err != nil {
		return PlacedMeta{}, fmt.Errorf("regiongraph: place: %v", err)
	}
	return PlacedMeta{RegionsSHA256: regionsSHA256, TimeZone: st.opts.TimeZone, Windows: slices.Clone(st.windows),
		Settings: string(b), Quality: Quality{Rejected: make(map[string]int64)}}, nil
}

// Place reads the inputs with Ingest's checks, finds each trip's regions,
// local day and windows, and hands the trips to emit in input order (emit
// must not keep the pointer). It returns the shard's metadata, whose
// quality counts the rows that are not placed trips. Place holds no trips:
// its memory does not grow with the input (GPS points excepted, which are
// held per file as Ingest holds them).
//
// A shard is any part of the input such that no trip spans two shards:
// trip table rows cut anywhere, GPS points cut by vehicle, GPX files. The
// duplicate check is not made here but when the shards are aggregated
// (see PlacedTrip), so repeats across shards are found. Place reads CSV
// with one goroutine: shards are the unit of parallel work. Options.Strict
// stops the shard at its first row with bad data (a *RowError naming file
// and line), and at times whose offset is not the zone's; the yield check
// (MinUsedShare) is the aggregation's. MemoryMB and SpillDir are not used.
func Place(ctx context.Context, regions *partition.Partition, regionsSHA256 string, inputs []Input, opts Options, emit func(*PlacedTrip) error) (PlacedMeta, error) {
	if regions == nil || len(regions.Regions) == 0 {
		return PlacedMeta{}, errors.New("regiongraph: no regions")
	}
	if len(inputs) == 0 {
		return PlacedMeta{}, errors.New("regiongraph: no input files")
	}
	st, err := opts.settings()
	if err != nil {
		return PlacedMeta{}, err
	}
	meta, err := placedMetaOf(st, regionsSHA256)
	if err != nil {
		return PlacedMeta{}, err
	}
	files, err := expandInputs(inputs, st)
	if err != nil {
		return PlacedMeta{}, err
	}
	loc, err := newLocator(regions)
	if err != nil {
		return PlacedMeta{}, err
	}
	ctx, cancel := context.WithCancel(ctx)
	defer cancel()
	t := newTally(st, loc)
	var emitErr error
	t.place = func(p *PlacedTrip) {
		if emitErr == nil {
			if emitErr = emit(p); emitErr != nil {
				cancel()
			}
		}
	}
	sources, err := ingestFiles(ctx, st, files, []*tally{t}, progressOf(files, opts.Progress))
	if emitErr != nil {
		return PlacedMeta{}, emitErr
	}
	if err != nil {
		return PlacedMeta{}, err
	}
	q, _, _ := gather([]*tally{t})
	if st.opts.Strict && q.OffsetMismatch > 0 {
		return PlacedMeta{}, OffsetMismatchError(q, st.loc.String())
	}
	meta.Quality, meta.Sources = q, sources
	return meta, nil
}

// addQuality adds q to sum.
func addQuality(sum *Quality, q Quality) {
	sum.Read += q.Read
	sum.Used += q.Used
	sum.OffsetTimes += q.OffsetTimes
	sum.OffsetMismatch += q.OffsetMismatch
	if sum.Rejected == nil {
		sum.Rejected = make(map[string]int64)
	}
	for r, n := range q.Rejected {
		sum.Rejected[r] += n
	}
}
