// The options of Generate and Simulate: their defaults and their checks.

package town

import (
	"fmt"
	"time"
)

// Size selects the extent of the generated town.
type Size string

const (
	// SizeTown is the demo town: a 6 x 6 grid of arterial cells, about
	// 6 km across, which partitions into about 50 regions (with the river
	// and the railway as barriers).
	SizeTown Size = "town"
	// sizeCity is the benchmark city: a 40 x 40 grid of arterial cells,
	// about 20 km across, which partitions into about 1,450 regions.
	sizeCity Size = "city"
)

// Options controls Generate.
type Options struct {
	// Size is SizeTown or "city" (the benchmark city). Default SizeTown.
	Size Size
	// Seed drives the perturbation of the grid; the demo uses 1.
	Seed int64
	// RailWeakness plants a second weakness beside the river crossing: the
	// railway runs just east of the jobs district, the arterial along the
	// jobs district's southern edge does not cross it, and a housing
	// district across the railway commutes to the jobs (Town.RailHousing).
	RailWeakness bool
}

// defaultOptions returns the demo town with seed 1.
func defaultOptions() Options { return Options{Size: SizeTown, Seed: 1} }

// SimOptions controls Simulate. Zero Days, TripsPerDay, MSARounds,
// Location and Start take their defaults; the shares and rates are used as
// given (0 means none), so start from Plan.SimOptions.
type SimOptions struct {
	// Seed drives every random draw of the simulation. Default 1.
	Seed int64
	// Start is the first day, at local midnight. Default 2026-03-02
	// (a Monday) in Location.
	Start time.Time
	// Days is the number of days simulated. Default 7.
	Days int
	// TripsPerDay is the number of fleet trips written on an average
	// weekday. Default 10,000.
	TripsPerDay int
	// LinkOpens is the day from which the new link exists (its calendar
	// day in Location counts). Nil: the link never opens.
	LinkOpens *time.Time
	// Change, when not nil, scales demand and speeds over the whole town
	// from its day on.
	Change *NetworkChange
	// Location is the study's time zone. Default Etc/GMT-1 (UTC+1), or a
	// fixed +01:00 zone if the time zone database is not available.
	Location *time.Location
	// MSARounds is the number of MSA rounds per network state. Default 4.
	MSARounds int
	// IncidentRate is the share of days with an incident: one arterial link
	// keeps 35 % of its capacity for the day. Default 0.1.
	IncidentRate float64
	// DayVariation is the standard deviation of the daily demand factor
	// (mean 1). Default 0.08.
	DayVariation float64
	// ZoneNodes is the number of network nodes per zone that serve as trip
	// ends (the nodes nearest the zone's centre). 0: automatic, all the
	// zone's nodes when the town has at most 1,000 such nodes, else 1.
	ZoneNodes int
	// TraceEvery gives every n-th trip (by trip id) a GPS trace, passed to
	// OnTrace. 0: no traces.
	TraceEvery int
	// TraceInterval is the time between GPS fixes. Default 15 s.
	TraceInterval time.Duration
	// OnTrace receives the traces in trip order; an error from it stops
	// the simulation. Write them with a PointsWriter or WriteGPX.
	OnTrace func(Trace) error
	// Progress, when not nil, is called after each simulated day with the
	// days done and the days in all (a city's simulation takes minutes).
	Progress func(done, total int)
}

// defaultSimOptions returns the documented defaults.
func defaultSimOptions() SimOptions {
	loc := studyLocation()
	return SimOptions{
		Seed: 1, Start: time.Date(2026, 3, 2, 0, 0, 0, 0, loc), Days: 7, TripsPerDay: 10000,
		Location: loc, MSARounds: 4, IncidentRate: 0.1, DayVariation: 0.08,
	}
}

// studyLocation returns the demo's time zone, Etc/GMT-1 (UTC+1 all year),
// or a fixed zone of the same name and offset if the time zone database is
// missing.
func studyLocation() *time.Location {
	if loc, err := time.LoadLocation("Etc/GMT-1"); err == nil {
		return loc
	}
	return time.FixedZone("Etc/GMT-1", 3600)
}

// normalise fills in the defaults of zero options and checks the rest.
func (t *Town) normalise(o SimOptions) (SimOptions, error) {
	def := defaultSimOptions()
	if o.Location == nil {
		o.Location = def.Location
	}
	if o.Start.IsZero() {
		o.Start = time.Date(2026, 3, 2, 0, 0, 0, 0, o.Location)
	}
	if o.Days == 0 {
		o.Days = def.Days
	}
	if o.TripsPerDay == 0 {
		o.TripsPerDay = def.TripsPerDay
	}
	if o.MSARounds == 0 {
		o.MSARounds = def.MSARounds
	}
	switch {
	case o.Days < 0 || o.Days > 3660:
		return o, fmt.Errorf("town: Days = %d, want 1..3660", o.Days)
	case o.TripsPerDay < 0 || o.TripsPerDay > 10_000_000:
		return o, fmt.Errorf("town: TripsPerDay = %d, want 1..10,000,000", o.TripsPerDay)
	case o.MSARounds < 0 || o.MSARounds > 100:
		return o, fmt.Errorf("town: MSARounds = %d, want 1..100", o.MSARounds)
	case !(o.IncidentRate >= 0 && o.IncidentRate <= 1):
		return o, fmt.Errorf("town: IncidentRate = %v, want 0..1", o.IncidentRate)
	case !(o.DayVariation >= 0 && o.DayVariation <= 1):
		return o, fmt.Errorf("town: DayVariation = %v, want 0..1", o.DayVariation)
	case o.ZoneNodes < 0:
		return o, fmt.Errorf("town: ZoneNodes = %d, want >= 0", o.ZoneNodes)
	case o.TraceEvery < 0 || (o.TraceEvery > 0 && o.OnTrace == nil):
		return o, fmt.Errorf("town: TraceEvery = %d, want >= 0, and OnTrace set when positive", o.TraceEvery)
	case o.TraceInterval < 0:
		return o, fmt.Errorf("town: TraceInterval = %v, want > 0", o.TraceInterval)
	}
	if o.TraceInterval == 0 {
		o.TraceInterval = 15 * time.Second
	}
	o.Start = o.Start.In(o.Location)
	return o, nil
}
