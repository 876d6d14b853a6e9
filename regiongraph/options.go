package regiongraph

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
	"time"

	_ "time/tzdata" // study zones must resolve on machines without a zoneinfo database
)

// Format names the kind of an input file.
type Format string

const (
	// FormatAuto detects the kind: a folder or a .gpx file is GPX, a .parquet
	// file or one starting with the Parquet magic "PAR1" is a trip table, and a
	// CSV file is GPS points when its header has the vehicle_id and time
	// columns but no start_time column, else a trip table.
	FormatAuto Format = ""
	// FormatTrips is a trip table, CSV with a header or Parquet: one row per
	// trip with origin, destination, their times and the travel distance.
	FormatTrips Format = "trips"
	// FormatPoints is a CSV table of GPS points: vehicle_id, time, lon, lat
	// and optionally occupied.
	FormatPoints Format = "points"
	// FormatGPX is a GPX 1.1 file, or a folder of .gpx files read in the
	// order of their names.
	FormatGPX Format = "gpx"
)

// Input is one file (or, for GPX, a folder) to ingest.
type Input struct {
	Path   string
	Format Format
}

// Logical column names. A trip table has the trip columns, a GPS point table
// the point columns. Options.Columns maps a logical name to the header used
// in the file.
const (
	colTripID    = "trip_id" // optional, not used in the aggregates
	colStartTime = "start_time"
	colEndTime   = "end_time"
	colStartLon  = "start_lon"
	colStartLat  = "start_lat"
	colEndLon    = "end_lon"
	colEndLat    = "end_lat"
	colDistance  = "distance_m" // in Options.DistanceUnit

	colVehicleID = "vehicle_id"
	colTime      = "time"
	colLon       = "lon"
	colLat       = "lat"
	colOccupied  = "occupied" // optional: 1/0, true/false, yes/no
)

// LogicalColumns returns the logical column names that Options.Columns may
// rename, trip table columns first.
func LogicalColumns() []string {
	return []string{colTripID, colStartTime, colEndTime, colStartLon, colStartLat,
		colEndLon, colEndLat, colDistance, colVehicleID, colTime, colLon, colLat, colOccupied}
}

// Options control an ingest. The zero value is not useful; start from
// DefaultOptions. The toml tags are the keys of a study file's [trips]
// table; the time zone, the windows and the longest duration are read
// there in other forms.
type Options struct {
	// TimeZone is the study's IANA time zone (default "UTC"). Days are local
	// calendar days of the trip start; times without an offset are read in
	// this zone.
	TimeZone string `toml:"-"`
	// Windows are the named time-of-day windows (default one window "all",
	// 00:00-24:00). Windows may overlap: a trip is aggregated in every window
	// that holds its local start time.
	Windows []Window `toml:"-"`
	// Columns maps logical column names (see LogicalColumns) to the headers
	// of the input files; unmapped names are expected as they are.
	Columns map[string]string `toml:"columns"`
	// DistanceUnit is the unit of the trip table distance column: "m"
	// (default), "km" or "mi".
	DistanceUnit string `toml:"distance_unit"`

	// MinStraightMetres is the least great-circle origin-destination
	// distance of a trip (default 500 m).
	MinStraightMetres float64 `toml:"min_od_metres"`
	// MaxDuration is the longest trip (default 4 h).
	MaxDuration time.Duration `toml:"-"`
	// MinSpeedKMH and MaxSpeedKMH bound the travel speed (default 1 and 150).
	MinSpeedKMH float64 `toml:"min_speed_kmh"`
	MaxSpeedKMH float64 `toml:"max_speed_kmh"`
	// MinDetour is the floor of travel distance / great-circle distance
	// (default 0.95: a little under 1 allows for odometer rounding).
	MinDetour float64 `toml:"min_detour"`
	// MaxJumpKMH is the highest implied speed between consecutive GPS points
	// (default 200); a trip with a faster step is rejected as a GPS jump.
	MaxJumpKMH float64 `toml:"max_jump_speed_kmh"`
	// GapMinutes cuts GPS points of a vehicle into trips where consecutive
	// points are further apart in time (default 5), when there is no
	// occupied column.
	GapMinutes float64 `toml:"gap_minutes"`
	// DwellMinutes and DwellMetres define a dwell, which also cuts trips: the
	// vehicle stays within DwellMetres of a point for more than DwellMinutes
	// (default 3 min and 50 m).
	DwellMinutes float64 `toml:"dwell_minutes"`
	DwellMetres  float64 `toml:"dwell_metres"`

	// MaxQuotedLines and MaxQuotedBytes bound a quoted field (default 10
	// lines and 64 KiB): a field still open after that many lines or bytes,
	// or one that never closes, makes its record "unbalanced quote", that
	// record is its first line alone and reading resumes on the next line.
	// A stray quote (an inch mark, a truncated export) so costs one row,
	// whatever the size of the file, and reading stays linear. Multi-line
	// free-text fields of a few lines still read as one row.
	MaxQuotedLines int   `toml:"max_quoted_lines"`
	MaxQuotedBytes int64 `toml:"max_quoted_bytes"`
	// EarliestTime and LatestTime bound the plausible trip and point times
	// (default 2000-01-01 00:00 UTC and, when zero, one day after the
	// ingest starts): a time outside is "implausible time", not a day graph
	// of its own (a zero Unix time reads as 1970).
	EarliestTime time.Time `toml:"earliest_time"`
	LatestTime   time.Time `toml:"latest_time"`
	// MinUsedShare is the least share of the rows read that an ingest must
	// use (default 0.01); under it, or when no row is used, Ingest fails
	// with a *YieldError naming the top rejection reasons and what to check
	// (distance unit, column mapping, time zone), rather than write a store
	// that holds next to nothing.
	MinUsedShare float64 `toml:"min_used_share"`

	// Strict stops at the first row with bad data (unparseable, missing
	// field, bad duration, GPS jump, bad speed, detour below floor) with an
	// error "file:line: reason". Rows that only fail a filter (outside the
	// study area, intra-region, short trip, not occupied, stationary,
	// outside the time windows) are counted as usual. It also makes times
	// whose UTC offset is not TimeZone's an error (see
	// OffsetMismatchError), after all rows are read.
	Strict bool `toml:"strict"`
	// Progress, when not nil, is called from one goroutine at a time with the
	// bytes read so far and the total bytes of all inputs.
	Progress func(done, total int64) `toml:"-"`
	// KeepTrip, when not nil, sees every used trip once for each window it
	// falls in, during the ingest's one pass over the files, from one
	// goroutine at a time and in no set order (SortTrips orders them): a
	// later step that re-routes trips keeps those it may need without
	// reading the files again. Each kept Trip costs about 130 bytes.
	KeepTrip func(Trip) `toml:"-"`

	// MemoryMB bounds the memory an ingest holds for the trips of days
	// not yet aggregated and for its duplicate check (default 128 MB):
	// past it they go to a temporary file in SpillDir (default the
	// system's temporary folder), removed when the ingest ends. The store
	// does not depend on either.
	MemoryMB int    `toml:"-"`
	SpillDir string `toml:"-"`
}

// defaultMemoryMB is the default of Options.MemoryMB.
const defaultMemoryMB = 128

// DefaultOptions returns the documented defaults.
func DefaultOptions() Options {
	return Options{
		TimeZone:          "UTC",
		Windows:           []Window{{Name: "all", StartMinute: 0, EndMinute: 24 * 60}},
		DistanceUnit:      "m",
		MinStraightMetres: 500,
		MaxDuration:       4 * time.Hour,
		MinSpeedKMH:       1,
		MaxSpeedKMH:       150,
		MinDetour:         0.95,
		MaxJumpKMH:        200,
		GapMinutes:        5,
		DwellMinutes:      3,
		DwellMetres:       50,
		MaxQuotedLines:    10,
		MaxQuotedBytes:    64 << 10,
		EarliestTime:      time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC),
		MinUsedShare:      0.01,
	}
}

// ParseWindow parses "name=HH:MM-HH:MM", for example "am=07:00-10:00". The end
// may be 24:00; an end before the start wraps past midnight ("night=22:00-06:00"),
// and the trip's day stays the day of its start.
func ParseWindow(s string) (Window, error) {
	name, span, ok := strings.Cut(s, "=")
	name = strings.TrimSpace(name)
	if !ok || name == "" {
		return Window{}, fmt.Errorf("regiongraph: window %q: want name=HH:MM-HH:MM", s)
	}
	if err := checkWindowName(name); err != nil {
		return Window{}, fmt.Errorf("regiongraph: window %q: %v", s, err)
	}
	from, to, ok := strings.Cut(strings.TrimSpace(span), "-")
	if !ok {
		return Window{}, fmt.Errorf("regiongraph: window %q: want name=HH:MM-HH:MM", s)
	}
	start, err := parseClock(from)
	if err != nil {
		return Window{}, fmt.Errorf("regiongraph: window %q: start: %v", s, err)
	}
	end, err := parseClock(to)
	if err != nil {
		return Window{}, fmt.Errorf("regiongraph: window %q: end: %v", s, err)
	}
	w := Window{Name: name, StartMinute: start, EndMinute: end}
	if err := w.check(); err != nil {
		return Window{}, fmt.Errorf("regiongraph: window %q: %v", s, err)
	}
	return w, nil
}

// String formats w as ParseWindow reads it.
func (w Window) String() string {
	return fmt.Sprintf("%s=%02d:%02d-%02d:%02d", w.Name, w.StartMinute/60, w.StartMinute%60, w.EndMinute/60, w.EndMinute%60)
}

// contains reports whether the local minute of day m falls in w.
func (w Window) contains(m int) bool {
	if w.StartMinute < w.EndMinute {
		return m >= w.StartMinute && m < w.EndMinute
	}
	return m >= w.StartMinute || m < w.EndMinute
}

func (w Window) check() error {
	if err := checkWindowName(w.Name); err != nil {
		return err
	}
	if w.StartMinute < 0 || w.StartMinute >= 24*60 || w.EndMinute < 0 || w.EndMinute > 24*60 {
		return fmt.Errorf("times must be within 00:00-24:00")
	}
	if w.StartMinute == w.EndMinute {
		return fmt.Errorf("window is empty (start equals end)")
	}
	return nil
}

func checkWindowName(name string) error {
	if name == "" {
		return fmt.Errorf("empty window name")
	}
	for _, c := range name {
		if !(c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' || c >= '0' && c <= '9' || c == '_' || c == '-') {
			return fmt.Errorf("window name %q: use letters, digits, '_' and '-'", name)
		}
	}
	return nil
}

func parseClock(s string) (int, error) {
	s = strings.TrimSpace(s)
	h, m, ok := strings.Cut(s, ":")
	if !ok || len(h) == 0 || len(h) > 2 || len(m) != 2 {
		return 0, fmt.Errorf("%q is not HH:MM", s)
	}
	hh, err1 := strconv.Atoi(h)
	mm, err2 := strconv.Atoi(m)
	if err1 != nil || err2 != nil || hh < 0 || mm < 0 || mm > 59 || hh > 24 || hh == 24 && mm != 0 {
		return 0, fmt.Errorf("%q is not a time of day HH:MM", s)
	}
	return hh*60 + mm, nil
}

// ParseColumns parses "logical=header,..." such as
// "start_time=pickup,end_time=dropoff" into a map for Options.Columns.
// Logical names are those of LogicalColumns.
func ParseColumns(s string) (map[string]string, error) {
	out := make(map[string]string)
	if strings.TrimSpace(s) == "" {
		return out, nil
	}
	for _, part := range strings.Split(s, ",") {
		logical, header, ok := strings.Cut(part, "=")
		logical, header = strings.TrimSpace(logical), strings.TrimSpace(header)
		if !ok || logical == "" || header == "" {
			return nil, fmt.Errorf("regiongraph: columns %q: %q is not name=header", s, part)
		}
		if !slices.Contains(LogicalColumns(), logical) {
			return nil, fmt.Errorf("regiongraph: columns %q: unknown column name %q (known: %s)", s, logical, strings.Join(LogicalColumns(), ", "))
		}
		if _, dup := out[logical]; dup {
			return nil, fmt.Errorf("regiongraph: columns %q: %q given twice", s, logical)
		}
		out[logical] = header
	}
	return out, nil
}

// settings are validated options in the units the readers use.
type settings struct {
	opts          Options
	loc           *time.Location
	windows       []Window
	distanceScale float64 // metres per distance unit
	minStraight   float64 // m
	maxDurationS  float64
	minSpeed      float64 // m/s
	maxSpeed      float64 // m/s
	minDetour     float64
	maxJump       float64 // m/s
	gapMS         int64
	dwellMS       int64
	dwellMetres   float64
	earliestMS    int64 // plausible times, Unix milliseconds, both included
	latestMS      int64

	// seen is the row set of one ingest, shared by its files, and spill
	// its temporary file (set by Ingest, not by Validate).
	seen  *rowSet
	spill *spillFile
	// recordBudget is the trip records a tally holds before spilling.
	recordBudget int
}

func (o Options) settings() (*settings, error) {
	tz := o.TimeZone
	if tz == "" {
		tz = "UTC"
	}
	loc, err := time.LoadLocation(tz)
	if err != nil || strings.EqualFold(tz, "local") {
		return nil, fmt.Errorf("regiongraph: unknown time zone %q (want an IANA name such as Europe/Berlin)", o.TimeZone)
	}
	st := &settings{opts: o, loc: loc}
	st.opts.TimeZone = tz
	st.windows = o.Windows
	if len(st.windows) == 0 {
		st.windows = DefaultOptions().Windows
	}
	if len(st.windows) > math.MaxUint8 {
		return nil, fmt.Errorf("regiongraph: too many windows (%d)", len(st.windows))
	}
	seen := make(map[string]bool)
	for _, w := range st.windows {
		if err := w.check(); err != nil {
			return nil, fmt.Errorf("regiongraph: window %s: %v", w, err)
		}
		if seen[w.Name] {
			return nil, fmt.Errorf("regiongraph: window name %q given twice", w.Name)
		}
		seen[w.Name] = true
	}
	switch o.DistanceUnit {
	case "", "m":
		st.distanceScale = 1
	case "km":
		st.distanceScale = 1000
	case "mi":
		st.distanceScale = 1609.344 // international mile
	default:
		return nil, fmt.Errorf("regiongraph: distance unit %q: want m, km or mi", o.DistanceUnit)
	}
	for logical := range o.Columns {
		if !slices.Contains(LogicalColumns(), logical) {
			return nil, fmt.Errorf("regiongraph: unknown column name %q (known: %s)", logical, strings.Join(LogicalColumns(), ", "))
		}
	}
	type bound struct {
		name string
		v    float64
	}
	for _, b := range []bound{{"MinStraightMetres", o.MinStraightMetres}, {"MinSpeedKMH", o.MinSpeedKMH},
		{"MinDetour", o.MinDetour}, {"GapMinutes", o.GapMinutes}, {"DwellMinutes", o.DwellMinutes}, {"DwellMetres", o.DwellMetres}} {
		if !(b.v >= 0) || math.IsInf(b.v, 0) {
			return nil, fmt.Errorf("regiongraph: option %s = %v: want a finite value >= 0", b.name, b.v)
		}
	}
	for _, b := range []bound{{"MaxSpeedKMH", o.MaxSpeedKMH}, {"MaxJumpKMH", o.MaxJumpKMH}} {
		if !(b.v > 0) {
			return nil, fmt.Errorf("regiongraph: option %s = %v: want a value > 0", b.name, b.v)
		}
	}
	if o.MaxDuration <= 0 {
		return nil, fmt.Errorf("regiongraph: option MaxDuration = %v: want > 0", o.MaxDuration)
	}
	if o.MinSpeedKMH > o.MaxSpeedKMH {
		return nil, fmt.Errorf("regiongraph: MinSpeedKMH %v is above MaxSpeedKMH %v", o.MinSpeedKMH, o.MaxSpeedKMH)
	}
	if o.MaxQuotedLines < 1 {
		return nil, fmt.Errorf("regiongraph: option MaxQuotedLines = %d: want at least 1", o.MaxQuotedLines)
	}
	if o.MaxQuotedBytes < 1 || o.MaxQuotedBytes > maxLineSize {
		return nil, fmt.Errorf("regiongraph: option MaxQuotedBytes = %d: want 1 to %d", o.MaxQuotedBytes, maxLineSize)
	}
	if !(o.MinUsedShare >= 0 && o.MinUsedShare <= 1) {
		return nil, fmt.Errorf("regiongraph: option MinUsedShare = %v: want a share from 0 to 1", o.MinUsedShare)
	}
	latest := o.LatestTime
	if latest.IsZero() {
		latest = time.Now().Add(24 * time.Hour)
	}
	if !o.EarliestTime.IsZero() && !latest.After(o.EarliestTime) {
		return nil, fmt.Errorf("regiongraph: LatestTime %v is not after EarliestTime %v", latest, o.EarliestTime)
	}
	st.earliestMS = math.MinInt64
	if !o.EarliestTime.IsZero() {
		st.earliestMS = o.EarliestTime.UnixMilli()
	}
	st.latestMS = latest.UnixMilli()
	st.minStraight = o.MinStraightMetres
	st.maxDurationS = o.MaxDuration.Seconds()
	st.minSpeed = o.MinSpeedKMH / 3.6
	st.maxSpeed = o.MaxSpeedKMH / 3.6
	st.minDetour = o.MinDetour
	st.maxJump = o.MaxJumpKMH / 3.6
	st.gapMS = int64(o.GapMinutes * 60000)
	st.dwellMS = int64(o.DwellMinutes * 60000)
	st.dwellMetres = o.DwellMetres
	return st, nil
}

// column returns the header expected for a logical column.
func (st *settings) column(logical string) string {
	if h, ok := st.opts.Columns[logical]; ok {
		return h
	}
	return logical
}
