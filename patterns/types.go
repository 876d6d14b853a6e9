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
	// JoinCorrelation is the least correlation of two region pairs' daily
	// recurrence (the phi coefficient of their candidate days) for them to
	// be one place, when they share a region and recur together on at
	// least the support share of the days (default 0.5). Pairs that recur
	// together no more than chance would have them stay apart.
	JoinCorrelation float64 `toml:"join_correlation"`
	// MaxGroupVisits bounds the listing of recurring groups by the search's
	// work over the whole scan, in the units of groups.Options.MaxVisits
	// (a group visited or an edge tested against a group's days; default
	// 2,000,000, about a second); 0 means no bound.
	MaxGroupVisits int `toml:"max_group_visits"`
	// Progress, when not nil, is called as the scan goes: stage names the
	// step ("candidates", "groups"), done counts the items of total done.
	Progress func(stage string, done, total int) `toml:"-"`
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

// FindingEdge is one directed edge of a finding with its own recurrence
// and its medians over the days it was a candidate.
type FindingEdge struct {
	From, To int
	// Days are the analysed days on which the edge was a candidate;
	// Share is their share of the analysed days.
	Days  []string
	Share float64
	// Medians over the edge's Days.
	TripsMedian  float64
	SpeedMedian  float64 // m/s
	DetourMedian float64
	// ExtraKMPerWeakDay: median over the edge's Days of (travel distance -
	// straight-line distance) summed over trips, km.
	ExtraKMPerWeakDay float64
	// ExtraHoursPerWeakDay: median over the edge's Days of vehicle-hours
	// beyond those at the reference speed over the straight-line distance.
	ExtraHoursPerWeakDay float64
	// ExtraKMPerDay and ExtraHoursPerDay spread the weak-day cost over
	// every analysed day of the period: the weak-day median x Share.
	ExtraKMPerDay    float64
	ExtraHoursPerDay float64
	// Daily holds every analysed day on which the edge had trips.
	Daily []DailyValue
}

// RecurringGroup is a closed connected group of a finding's edges that
// were candidates together on at least the support share of the days:
// which of the place's edges recur together, and on which days.
type RecurringGroup struct {
	Edges []EdgeKey // sorted by From, To
	Days  []string
	Share float64
}

// Finding is one weak place: the directed region pairs that recur as
// candidates and recur together (see ScanStore). Each directed pair
// belongs to at most one finding of a scan.
type Finding struct {
	Rank    int    // 1 = highest ExtraHoursPerDay
	ID      string // stable key built from the edges, e.g. "12>15+15>12"
	Regions []int  // ascending
	Edges   []FindingEdge
	// Groups are the recurring groups within the place, sorted by edge
	// list: detail, not findings of their own.
	Groups []RecurringGroup
	Days   []string // days on which at least one edge was a candidate
	Share  float64  // len(Days) / analysed days
	// Costs per day of the period: sums over the edges, each edge counted
	// once, so findings' costs add up without double counting.
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
	// GroupVisits counts the search's work (see MaxGroupVisits) while listing the
	// findings' recurring groups; GroupsTruncated is set when the listing
	// stopped at ScanOptions.MaxGroupVisits, so that some findings list
	// only part of their groups. The findings, their edges and costs do
	// not depend on the listing and are complete either way.
	GroupVisits     int
	GroupsTruncated bool
}
