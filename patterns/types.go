package patterns

import (
	"narrows/patterns/groups"
	"narrows/skyline"
)

// EdgeKey is a directed region pair, the edge of the groups the scan
// mines.
type EdgeKey = groups.Edge

// DaySelector filters the days of a period.
type DaySelector string

const (
	AllDays  DaySelector = "all"
	Weekdays DaySelector = "weekdays"
	Weekends DaySelector = "weekends"
)

// ScanOptions selects the days and thresholds of a scan. The toml tags are
// the keys of a study file's [scan] table.
type ScanOptions struct {
	// From and To are the inclusive local days YYYY-MM-DD of the period;
	// empty means the store's first or last day.
	From string `toml:"from"`
	To   string `toml:"to"`
	// Window names the time window; empty means the store's first window.
	Window string `toml:"window"`
	// Days selects the days by weekday (default AllDays).
	Days DaySelector `toml:"days"`
	// Exclude lists days YYYY-MM-DD to leave out (holidays, incidents).
	Exclude []string `toml:"exclude"`
	// Skyline holds the daily candidate rules; a study file gives its
	// keys beside the scan's own.
	Skyline skyline.Options `toml:"-"`
	// Support is the share of analysed days on which a group must recur
	// (default 0.2).
	Support float64 `toml:"support"`
	// MaxGroupEdges caps the number of edges in a group (default 6); a
	// group of edges that always recur together is reported whole even
	// when larger (see groups.Options.MaxEdges).
	MaxGroupEdges int `toml:"max_edges"`
	// MaximalOnly keeps only the groups not contained in another reported
	// group (default false: every closed group, nested ones included).
	MaximalOnly bool `toml:"maximal_only"`
	// ReferenceSpeed in m/s against which extra vehicle-hours are counted
	// (default 30 km/h).
	ReferenceSpeed float64 `toml:"-"` // a study file gives it in km/h
}

// DailyValue is one edge on one analysed day.
type DailyValue struct {
	Day         string
	Trips       int
	Speed       float64 // median, m/s
	Detour      float64 // median
	Candidate   bool    // a skyline candidate that day
	DistanceSum float64 // metres
	StraightSum float64 // metres
	DurationSum float64 // seconds
}

// FindingEdge is one directed edge of a finding with its medians over the
// finding's days.
type FindingEdge struct {
	From, To     int
	TripsMedian  float64
	SpeedMedian  float64 // m/s
	DetourMedian float64
	// ExtraKMPerDay: median over the finding's days of
	// (travel distance - straight-line distance) summed over trips, km.
	ExtraKMPerDay float64
	// ExtraHoursPerDay: median over the finding's days of vehicle-hours
	// beyond those at the reference speed over the straight-line distance.
	ExtraHoursPerDay float64
	// Daily holds every analysed day on which the edge had trips.
	Daily []DailyValue
}

// Finding is a closed connected group of candidate edges recurring on at
// least the support share of the analysed days.
type Finding struct {
	Rank    int    // 1 = highest cost over the period (ExtraHoursPerDay x Share)
	ID      string // stable key built from the edges, e.g. "12>15+15>18"
	Regions []int  // ascending
	Edges   []FindingEdge
	Days    []string // days on which all edges were candidates together
	Share   float64  // len(Days) / analysed days
	// Costs: sums over edges of the per-edge medians.
	ExtraKMPerDay    float64
	ExtraHoursPerDay float64
}

// Scan is the result of scanning one period.
type Scan struct {
	Options ScanOptions
	Window  string
	// Days are the analysed days, ascending.
	Days []string
	// CandidatesPerDay is the number of candidates on each analysed day.
	CandidatesPerDay []int
	// DayCandidates holds the candidate edges of each analysed day (same
	// order as Days), each sorted by From, To.
	DayCandidates [][]EdgeKey
	// EdgeDaily holds, for every edge that was a candidate on at least one
	// analysed day, its values on every analysed day it had trips, by day.
	// Iterate in sorted key order for deterministic output.
	EdgeDaily map[EdgeKey][]DailyValue
	Findings  []Finding
}
