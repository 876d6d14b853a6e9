// The simulation: Simulate plans the days, builds each network state on
// first use and writes each day's trips.

package town

import (
	"bufio"
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"time"
)

// Stats summarises a simulation.
type Stats struct {
	Days, Trips, IncidentDays int
	// assignments has one entry per network state used (without the link,
	// then with it).
	assignments []assignmentStats
}

// assignmentStats describes the congested assignment of one network state.
type assignmentStats struct {
	WithLink            bool
	Zones, TripEnds     int
	Nodes, Links        int
	PeakHourVehicles    float64 // all traffic in the weekday peak hour
	PeakMinute          int     // minute of the day of the weekday peak
	MaxVolumeToCapacity float64
	RelativeGaps        []float64
}

// tripHeader is the first line of the trip CSV.
const tripHeader = "trip_id,start_time,end_time,start_lon,start_lat,end_lon,end_lat,distance_m"

// Simulate writes the fleet trips of opts.Days days to trips in the ingest
// trip CSV format (header line first), day by day in start-time order. The
// same town and options give the same bytes.
func (t *Town) Simulate(ctx context.Context, opts SimOptions, trips io.Writer) (Stats, error) {
	var st Stats
	if t == nil || t.grid == nil {
		return st, errors.New("town: Simulate needs a Town made by Generate")
	}
	o, err := t.normalise(opts)
	if err != nil {
		return st, err
	}
	s, err := t.newSim(o)
	if err != nil {
		return st, err
	}
	bw := bufio.NewWriterSize(trips, 1<<16)
	if _, err := bw.WriteString(tripHeader + "\n"); err != nil {
		return st, fmt.Errorf("town: writing trips: %w", err)
	}
	var nextID int64 = 1
	var buf []byte
	for d := 0; d < o.Days; d++ {
		if err := ctx.Err(); err != nil {
			return st, err
		}
		day := s.days[d]
		rs, err := s.state(ctx, day.withLink)
		if err != nil {
			return st, err
		}
		rows := s.dayTrips(day, rs)
		for i := range rows {
			buf = s.appendRow(buf[:0], nextID, &rows[i], day)
			if _, err := bw.Write(buf); err != nil {
				return st, fmt.Errorf("town: writing trips: %w", err)
			}
			if o.TraceEvery > 0 && nextID%int64(o.TraceEvery) == 0 {
				if err := o.OnTrace(s.trace(rs, nextID, &rows[i], day)); err != nil {
					return st, fmt.Errorf("town: trace of trip %d: %w", nextID, err)
				}
			}
			nextID++
		}
		st.Trips += len(rows)
		if day.incident {
			st.IncidentDays++
		}
		if o.Progress != nil {
			o.Progress(d+1, o.Days)
		}
	}
	st.Days = o.Days
	st.assignments = s.built
	if err := bw.Flush(); err != nil {
		return st, fmt.Errorf("town: writing trips: %w", err)
	}
	return st, nil
}

// sim is the state of one Simulate call.
type sim struct {
	t      *Town
	o      SimOptions
	prof   *profiles
	days   []dayPlan
	states [2]*netState // without, with the link
	built  []assignmentStats
}

type dayPlan struct {
	index     int
	midnight  time.Time
	weekend   bool
	withLink  bool
	factor    float64 // demand factor of the day
	volume    float64 // the NetworkChange's demand factor (1 without)
	pace      float64 // the NetworkChange's factor on driving times (1 without)
	incident  bool
	incidentU float64 // draws the incident link
	seed      uint64
}

func (t *Town) newSim(o SimOptions) (*sim, error) {
	s := &sim{t: t, o: o, prof: newProfiles()}
	rng := rand.New(rand.NewPCG(uint64(o.Seed), 0x5eed0fda75))
	var linkDay time.Time
	if o.LinkOpens != nil {
		l := o.LinkOpens.In(o.Location)
		linkDay = time.Date(l.Year(), l.Month(), l.Day(), 0, 0, 0, 0, o.Location)
	}
	for d := 0; d < o.Days; d++ {
		m := o.Start.AddDate(0, 0, d)
		m = time.Date(m.Year(), m.Month(), m.Day(), 0, 0, 0, 0, o.Location)
		wd := m.Weekday()
		p := dayPlan{index: d, midnight: m, weekend: wd == time.Saturday || wd == time.Sunday}
		p.withLink = o.LinkOpens != nil && !m.Before(linkDay)
		p.factor = math.Max(0.5, 1+o.DayVariation*rng.NormFloat64())
		p.volume, p.pace = o.Change.scale(m)
		p.incident = rng.Float64() < o.IncidentRate
		p.incidentU = rng.Float64()
		p.seed = rng.Uint64()
		s.days = append(s.days, p)
	}
	return s, nil
}

// state returns the network state, building it on first use.
func (s *sim) state(ctx context.Context, withLink bool) (*netState, error) {
	k := 0
	if withLink {
		k = 1
	}
	if s.states[k] != nil {
		return s.states[k], nil
	}
	// The other state is no longer needed once days move on.
	s.states[1-k] = nil
	rs, err := s.build(ctx, withLink)
	if err != nil {
		return nil, err
	}
	s.states[k] = rs
	s.built = append(s.built, rs.stats)
	return rs, nil
}
