package patterns

import (
	"math"

	"narrows/regiongraph"
)

// Measure names one of the absolute daily measures on which a finding is
// compared across periods.
type Measure int

const (
	// Cost is the finding's extra vehicle-hours on the day, summed over its
	// edges, each floored at 0 (as in the scan).
	Cost Measure = iota
	// TravelTime is the trip-weighted mean of the edges' median travel
	// times, seconds per trip.
	TravelTime
	// Trips is the number of trips on the finding's edges.
	Trips
	// Speed is the trip-weighted mean of the edges' median speeds, m/s.
	Speed
	// Detour is the trip-weighted mean of the edges' median detour ratios.
	Detour
	// ExtraKM is the finding's extra vehicle-kilometres on the day, each
	// edge floored at 0.
	ExtraKM
	// NumMeasures is the number of measures.
	NumMeasures
)

// String names the measure as the JSON keys and tests do.
func (m Measure) String() string {
	switch m {
	case Cost:
		return "cost"
	case TravelTime:
		return "travel_time"
	case Trips:
		return "trips"
	case Speed:
		return "speed"
	case Detour:
		return "detour"
	case ExtraKM:
		return "extra_km"
	}
	return "measure?"
}

// dayTotals accumulates a set of edges on one day.
type dayTotals struct {
	trips                    float64
	speedW, detourW, timeW   float64 // trip-weighted sums of the edges' medians
	distanceSum, durationSum float64 // vehicle-metres and vehicle-seconds travelled
	extraKM, extraHours      float64 // floored per edge
	bar                      bool    // some edge met the fixed bar
}

// add adds one edge's day; ref is the reference speed of the cost (m/s).
func (t *dayTotals) add(e *edgeDay, ref float64) {
	w := float64(e.trips)
	t.trips += w
	t.speedW += w * e.speed
	t.detourW += w * e.detour
	t.timeW += w * e.duration
	t.distanceSum += e.distanceSum
	t.durationSum += e.durationSum
	t.extraKM += max(0, e.distanceSum-e.straightSum) / 1000
	t.extraHours += max(0, e.durationSum-e.straightSum/ref) / 3600
}

// value returns the finding's measure m on the day.
func (t *dayTotals) value(m Measure) float64 {
	switch m {
	case Cost:
		return t.extraHours
	case TravelTime:
		return t.timeW / t.trips
	case Trips:
		return t.trips
	case Speed:
		return t.speedW / t.trips
	case Detour:
		return t.detourW / t.trips
	case ExtraKM:
		return t.extraKM
	}
	return math.NaN()
}

// scale returns the comparison group's counterpart of measure m on the day,
// the quantity whose change over the network is taken to move the
// finding's measure in proportion: for the costs the vehicle-hours and
// vehicle-kilometres travelled (a comparison group matched on detour and
// speed may have no extra hours of its own), for the others the measure
// itself.
func (t *dayTotals) scale(m Measure) float64 {
	switch m {
	case Cost:
		return t.durationSum
	case ExtraKM:
		return t.distanceSum
	}
	return t.value(m)
}

// edgeDay is one edge's values on one analysed day of a period.
type edgeDay struct {
	day                                   int32 // index into the period's days
	trips                                 int32
	speed, detour, duration               float64 // medians
	distanceSum, straightSum, durationSum float64
}

func newEdgeDay(day int, e *regiongraph.Edge) edgeDay {
	return edgeDay{day: int32(day), trips: int32(e.Trips), speed: e.SpeedMedian, detour: e.DetourMedian, duration: e.DurationMedian,
		distanceSum: e.DistanceSum, straightSum: e.StraightSum, durationSum: e.DurationSum}
}

// usable reports whether an edge of the store enters the comparison: in
// the window, with at least minTrips trips (and at least one) and finite
// medians.
func usable(e *regiongraph.Edge, window regiongraph.WindowIndex, minTrips int) bool {
	return e.Window == window && e.Trips > 0 && e.Trips >= minTrips &&
		!math.IsNaN(e.SpeedMedian) && !math.IsNaN(e.DetourMedian) && !math.IsNaN(e.DurationMedian) &&
		!math.IsInf(e.SpeedMedian, 0) && !math.IsInf(e.DetourMedian, 0)
}
