package regiongraph

import (
	"cmp"
	"context"
	"errors"
	"runtime"
	"slices"
	"sync"

	"github.com/paulmach/orb"

	"narrows/partition"
)

// Trip is one trip as the ingest used it, in one of its windows: the
// store keeps only aggregates, and a step that needs the trips themselves
// (re-routing them) reads them again with the same checks.
type Trip struct {
	Origin, Dest orb.Point
	// From and To are region ids.
	From, To int
	// Day is the local day (YYYY-MM-DD) and Window the window's name, as
	// the store's edges name them.
	Day, Window     string
	DistanceMetres  float64
	DurationSeconds float64
	StartUnixMS     int64
}

// ReadTrips reads the inputs with Ingest's checks and returns, for each
// used trip and each window it falls in, the Trip when keep accepts it
// (keep nil keeps all). Trips are in order of day, window, start, origin
// and destination, whatever the number of reader goroutines.
func ReadTrips(ctx context.Context, regions *partition.Partition, inputs []Input, opts Options, keep func(*Trip) bool) ([]Trip, error) {
	if regions == nil || len(regions.Regions) == 0 {
		return nil, errors.New("regiongraph: no regions")
	}
	if len(inputs) == 0 {
		return nil, errors.New("regiongraph: no input files")
	}
	st, err := opts.settings()
	if err != nil {
		return nil, err
	}
	memory := int64(opts.MemoryMB) << 20
	if opts.MemoryMB <= 0 {
		memory = defaultMemoryMB << 20
	}
	st.spill = newSpillFile(opts.SpillDir)
	defer st.spill.close()
	st.seen = newRowSet(memory/4, st.spill)
	files, err := expandInputs(inputs, st)
	if err != nil {
		return nil, err
	}
	loc, err := newLocator(regions)
	if err != nil {
		return nil, err
	}
	var out []Trip
	parsers := max(1, min(runtime.GOMAXPROCS(0), maxParsers))
	tallies := make([]*tally, parsers)
	visit := tripVisitor(st, loc, func(t Trip) {
		if keep == nil || keep(&t) {
			out = append(out, t)
		}
	})
	for i := range tallies {
		tallies[i] = newTally(st, loc)
		tallies[i].visit, tallies[i].visitOnly = visit, true
	}
	if _, err := ingestFiles(ctx, st, files, tallies, progressOf(files, opts.Progress)); err != nil {
		return nil, err
	}
	SortTrips(out)
	return out, nil
}

// tripVisitor returns the tallies' visit function that hands each used
// trip, as a Trip, to fn, from one goroutine at a time. Day names are
// shared between trips of the same day.
func tripVisitor(st *settings, loc *locator, fn func(Trip)) func(tr *trip, from, to int, day Day, wi int) {
	var mu sync.Mutex
	dayNames := map[Day]string{}
	return func(tr *trip, from, to int, day Day, wi int) {
		mu.Lock()
		defer mu.Unlock()
		name, ok := dayNames[day]
		if !ok {
			name = day.String()
			dayNames[day] = name
		}
		fn(Trip{Origin: orb.Point(tr.origin), Dest: orb.Point(tr.dest), From: loc.id(from), To: loc.id(to),
			Day: name, Window: st.windows[wi].Name,
			DistanceMetres: tr.distance, DurationSeconds: float64(tr.endMS-tr.startMS) / 1000, StartUnixMS: tr.startMS})
	}
}

// SortTrips orders trips by day, window, start, origin and destination
// (then distance and duration), the order ReadTrips returns.
func SortTrips(out []Trip) {
	slices.SortFunc(out, func(a, b Trip) int {
		return cmp.Or(cmp.Compare(a.Day, b.Day), cmp.Compare(a.Window, b.Window), cmp.Compare(a.StartUnixMS, b.StartUnixMS),
			cmp.Compare(a.Origin[0], b.Origin[0]), cmp.Compare(a.Origin[1], b.Origin[1]),
			cmp.Compare(a.Dest[0], b.Dest[0]), cmp.Compare(a.Dest[1], b.Dest[1]),
			cmp.Compare(a.DistanceMetres, b.DistanceMetres), cmp.Compare(a.DurationSeconds, b.DurationSeconds))
	})
}
