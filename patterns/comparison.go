package patterns

import (
	"math"
	"strconv"
)

// Verdict is the outcome of comparing a finding across two periods, on
// its own measures against its comparison group (see Compare).
type Verdict string

const (
	Cleared   Verdict = "cleared"   // the weakness went: cost fell by half or more, or the bar is no longer met on most days
	Eased     Verdict = "eased"     // significantly and materially quicker or cheaper, beyond the network's change
	Unchanged Verdict = "unchanged" // no significant, material change of its own (or mixed)
	Worse     Verdict = "worse"     // significantly and materially slower or costlier, beyond the network's change
	New       Verdict = "new"       // a finding of the after period only, and worse on its own measures
)

// Basis names the evidence that decided a verdict.
type Basis string

const (
	BasisNone  Basis = "none"  // no significant, material change
	BasisMixed Basis = "mixed" // one deciding measure better, the other worse
	BasisCost  Basis = "cost"  // the adjusted cost (extra vehicle-hours per day)
	BasisTime  Basis = "time"  // the adjusted travel time per trip
	BasisBar   Basis = "bar"   // the fixed bar no longer met on most days, with a better cost or time
)

// Change is the direction in which one measure of a finding changed, after
// against before, as far as the decision rule counts it: significant after
// adjustment and, for speed and detour, at least the material shift.
type Change int

const (
	NoChange Change = iota // no change both significant and material
	Up                     // higher after: recurs on more days, faster, more circuitous
	Down                   // lower after: recurs on fewer days, slower, less circuitous
)

func (c Change) String() string {
	switch c {
	case NoChange:
		return "none"
	case Up:
		return "up"
	case Down:
		return "down"
	}
	return "Change(" + strconv.Itoa(int(c)) + ")"
}

// Shift is a Mann-Whitney U test with the Hodges-Lehmann shift (after minus
// before) and its 95 % confidence interval.
type Shift struct {
	Before, After []float64 // daily values
	U             float64   // statistic of the after sample
	P             float64   // two-sided
	PAdjusted     float64   // Benjamini-Hochberg across findings
	Shift         float64   // Hodges-Lehmann estimate, after - before
	Low, High     float64   // 95 % confidence interval of Shift
	// Change is the direction of a significant, material shift.
	Change Change
}

// Assessment is one finding's verdict with its evidence.
type Assessment struct {
	Finding           Finding // from the before scan when present there, else after
	Verdict           Verdict
	Basis             Basis // the evidence that decided the verdict
	InBefore, InAfter bool
	// Effects holds each measure, by Measure: the finding's daily medians
	// in each period, its raw change, its comparison group's change and
	// the adjusted change. Cost and TravelTime decide the verdict (their
	// Adjusted.Change is set); the others explain it.
	Effects [NumMeasures]Effect
	// Group is the finding's comparison group.
	Group ComparisonGroup
	// DaysWithTrips counts, per period (0 before, 1 after), the analysed
	// days on which the finding's edges carried trips (at least
	// MinDayTrips) and its comparison group too: the days of the daily
	// series. BarDays counts those of them on which the finding met the
	// fixed bar (any edge at least as circuitous as the detour floor and
	// slower than the before period's median speed).
	DaysWithTrips, BarDays [2]int
	// DailyCost is the finding's own cost (extra vehicle-hours) on each day
	// of the daily series, per period, in day order: the values the cost
	// effect is computed from, before any adjustment (for a timeline).
	DailyCost [2][]DayValue
	// Skyline recurrence, context only: days on which any edge was a
	// candidate / analysed days, with the Fisher test.
	DaysBefore, TotalBefore  int
	DaysAfter, TotalAfter    int
	FisherP, FisherPAdjusted float64
	Focus                    bool // within the focus area
}

// DayValue is one day's value of a daily series.
type DayValue struct {
	Day   string // YYYY-MM-DD
	Value float64
}

// BarShare returns the share of the days of period p (0 before, 1 after)
// on which the finding met the fixed bar (NaN without days).
func (a *Assessment) BarShare(p int) float64 {
	if a.DaysWithTrips[p] == 0 {
		return math.NaN()
	}
	return float64(a.BarDays[p]) / float64(a.DaysWithTrips[p])
}

// NetworkChange is the change over every pair of the window with trips, on
// the same days: what happened to the whole town (season, growth).
type NetworkChange struct {
	// Trips per day, TravelTime per trip (s) and Speed (m/s, vehicle-km
	// over vehicle-hours): Before and After are daily medians, Raw the
	// change, Adjusted.Shift the Hodges-Lehmann shift of the daily values
	// and Relative that shift over Before.
	Trips, TravelTime, Speed Effect
}

// Comparison is the before/after study.
type Comparison struct {
	Before, After *Scan
	Assessments   []Assessment // ordered by verdict severity then rank
	Counts        map[Verdict]int
	Alpha         float64 // significance level after adjustment (default 0.05)
	Options       CompareOptions
	// Network is the change over the whole network.
	Network NetworkChange
	// BarSpeed is the fixed bar's speed, m/s: the before period's median
	// of the daily trip-weighted median speed.
	BarSpeed float64
	// PoolSize is the number of pairs eligible for comparison groups.
	PoolSize int
}

// severity orders verdicts for the report, most urgent first.
func severity(v Verdict) int {
	switch v {
	case Worse:
		return 0
	case New:
		return 1
	case Unchanged:
		return 2
	case Eased:
		return 3
	case Cleared:
		return 4
	}
	return 5
}
