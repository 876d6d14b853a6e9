package main

import (
	"flag"
	"fmt"
	"maps"
	"slices"
	"strconv"
	"strings"
	"time"

	"github.com/paulmach/orb"

	"narrows/partition"
	"narrows/partition/geodesy"
	"narrows/patterns"
	"narrows/regiongraph"
)

// The options of every step live in the libraries' Options structs. Flags
// bind to their fields, pre-filled with the library's defaults, and study
// files decode into the same structs (their toml tags are the study keys),
// so a default is written once, in the library, and so is every range
// check (the Options' Validate). The adapters below serve the flags and
// keys whose unit or syntax differs from the field's.

// bindRegions binds the flags of the partition step to o.
func bindRegions(fs *flag.FlagSet, o *partition.Options) {
	fs.Var(&bboxValue{&o.BBox}, "bbox", "study area `W,S,E,N` in degrees (default: the file's header bounds)")
	fs.Var(&listValue{&o.Roads}, "roads", "highway classes that bound regions, comma-separated `list`")
	fs.Var(&barrierList{&o.Barriers}, "barriers", "barriers that also bound regions, a comma-separated `list` of rail, river, canal, coastline, water; none for roads only")
	fs.Float64Var(&o.SnapMetres, "snap", o.SnapMetres, "close gaps where a road ends within this many `metres` of another")
	fs.Float64Var(&o.MinAreaKM2, "min-area", o.MinAreaKM2, "merge regions smaller than this (`km2`) into a neighbour")
	fs.Float64Var(&o.MinCompactness, "min-compactness", o.MinCompactness, "merge regions thinner than this Polsby-Popper compactness (0-1)")
	fs.Float64Var(&o.MaxSliverWidthMetres, "max-sliver-width", o.MaxSliverWidthMetres, "the compactness rule merges only regions narrower than this many `metres` (mean width 2A/P; 0: any)")
	fs.Float64Var(&o.ExtendMetres, "extend", o.ExtendMetres, "extend a major road that ends within this many `metres` of a barrier or major road ahead (0: off)")
	fs.Float64Var(&o.MinWaterAreaKM2, "min-water-area", o.MinWaterAreaKM2, "water areas smaller than this (`km2`) count as land")
	fs.Float64Var(&o.MaxRegionKM2, "max-region-area", o.MaxRegionKM2, "split regions larger than this (`km2`) by the --split-roads inside them (0: off)")
	fs.Var(&listValue{&o.SplitRoads}, "split-roads", "highway classes that split oversized regions, tried in turn, comma-separated `list`")
	fs.Float64Var(&o.MinBorderRoadMetres, "min-border-road", o.MinBorderRoadMetres, "leave roads sharing less than this many `metres` out of a region's border roads and name")
	fs.BoolVar(&o.Exact, "exact", o.Exact, "no cleaning: the plain faces of the noded linework plus the study-area rectangle")
}

// barrierList is a list of barrier kinds; "none" is the empty list.
type barrierList struct{ p *[]string }

func (v *barrierList) String() string { return (&listValue{v.p}).String() }

func (v *barrierList) Set(s string) error {
	if strings.TrimSpace(s) == "none" {
		*v.p = []string{}
		return nil
	}
	*v.p = splitList(s)
	return nil
}

// bindIngest binds the flags of the ingest step to o and format.
func bindIngest(fs *flag.FlagSet, o *regiongraph.Options, format *regiongraph.Format) {
	fs.Var(&textValue[regiongraph.Format]{format}, "format", "input kind: trips (CSV or Parquet table), points (GPS CSV) or gpx")
	fs.Var(&columnsValue{&o.Columns}, "columns", "rename columns: `name=header,...` (e.g. start_time=pickup_at)")
	fs.StringVar(&o.DistanceUnit, "distance-unit", o.DistanceUnit, "unit of the distance column: m, km or mi")
	fs.StringVar(&o.TimeZone, "tz", o.TimeZone, "IANA time zone of the study: local days and windows")
	fs.Var(&windowsValue{w: &o.Windows}, "window", "named time window `NAME=HH:MM-HH:MM` (repeatable)")
	fs.BoolVar(&o.Strict, "strict", o.Strict, "stop at the first bad row, naming file and line")
	fs.Float64Var(&o.MinStraightMetres, "min-od", o.MinStraightMetres, "reject trips whose origin-destination distance is under this many `metres`")
	fs.DurationVar(&o.MaxDuration, "max-duration", o.MaxDuration, "reject trips longer than this")
	fs.Float64Var(&o.MinSpeedKMH, "min-speed", o.MinSpeedKMH, "reject trips slower than this many `km/h`")
	fs.Float64Var(&o.MaxSpeedKMH, "max-speed", o.MaxSpeedKMH, "reject trips faster than this many `km/h`")
	fs.Float64Var(&o.MinDetour, "min-detour", o.MinDetour, "reject trips whose travel distance is under this `ratio` of the straight line")
	fs.Float64Var(&o.MaxJumpKMH, "max-jump-speed", o.MaxJumpKMH, "GPS: reject a trace with a step faster than this many `km/h`")
	fs.Float64Var(&o.GapMinutes, "gap", o.GapMinutes, "GPS without an occupied column: cut trips at time gaps over this many `minutes`")
	fs.Float64Var(&o.DwellMinutes, "dwell-minutes", o.DwellMinutes, "GPS: cut trips where a vehicle stays put longer than this many `minutes`")
	fs.Float64Var(&o.DwellMetres, "dwell-metres", o.DwellMetres, "GPS: the radius of such a dwell, in `metres`")
	fs.IntVar(&o.MaxQuotedLines, "max-quoted-lines", o.MaxQuotedLines, "a quoted field may span at most this many `lines`; else its row is rejected as an unbalanced quote")
	fs.Int64Var(&o.MaxQuotedBytes, "max-quoted-bytes", o.MaxQuotedBytes, "a quoted field may span at most this many `bytes`")
	fs.Var(&timeValue{&o.EarliestTime}, "earliest", "reject times before this `time` (YYYY-MM-DD or RFC 3339, UTC)")
	fs.Var(&timeValue{&o.LatestTime}, "latest", "reject times after this `time` (default: a day after the ingest starts)")
	fs.Float64Var(&o.MinUsedShare, "min-used-share", o.MinUsedShare, "fail when fewer than this `share` of the rows read are used")
}

// timeValue is a date or RFC 3339 time over a time.Time field; empty is
// the zero time.
type timeValue struct{ t *time.Time }

func (v *timeValue) String() string {
	if v.t == nil || v.t.IsZero() {
		return ""
	}
	return v.t.Format(time.RFC3339)
}

func (v *timeValue) Set(s string) error {
	if s == "" {
		*v.t = time.Time{}
		return nil
	}
	for _, layout := range []string{time.DateOnly, time.RFC3339} {
		if t, err := time.Parse(layout, s); err == nil {
			*v.t = t
			return nil
		}
	}
	return fmt.Errorf("%q is not a date YYYY-MM-DD or an RFC 3339 time", s)
}

// bindScan binds the thresholds shared by scan and compare to o.
func bindScan(fs *flag.FlagSet, o *patterns.ScanOptions) {
	fs.StringVar(&o.Window, "window", o.Window, "time window to analyse (default: the store's first window)")
	fs.Var(&textValue[patterns.DaySelector]{&o.Days}, "days", "days to analyse: all, weekdays or weekends")
	fs.Var(&listValue{&o.Exclude}, "exclude", "days to leave out, `YYYY-MM-DD,...` (holidays, incidents)")
	fs.IntVar(&o.Skyline.MinTrips, "min-trips", o.Skyline.MinTrips, "ignore region pairs with fewer trips on a day")
	fs.Float64Var(&o.Support, "support", o.Support, "share of days (0-1] on which a group must recur")
	fs.IntVar(&o.Skyline.K, "k", o.Skyline.K, "widen the daily skyline to the k-skyband (dominated by fewer than k pairs)")
	fs.Float64Var(&o.Skyline.DetourFloor, "detour-floor", o.Skyline.DetourFloor, "candidates need a median detour ratio at least this")
	fs.BoolVar(&o.Skyline.NoDetourGate, "no-detour-gate", o.Skyline.NoDetourGate, "switch the detour floor off")
	fs.BoolVar(&o.Skyline.NoSpeedGate, "no-speed-gate", o.Skyline.NoSpeedGate, "switch off the gate 'slower than the day's median speed'")
	fs.IntVar(&o.MaxGroupEdges, "max-edges", o.MaxGroupEdges, "largest recurring group of edges to list within a place")
	fs.BoolVar(&o.MaximalOnly, "maximal-only", o.MaximalOnly, "list only a place's groups not contained in another of its groups")
	fs.Float64Var(&o.JoinCorrelation, "join-correlation", o.JoinCorrelation, "least correlation of two region pairs' weak days for them to be one place")
	fs.IntVar(&o.MaxGroupVisits, "max-group-visits", o.MaxGroupVisits, "bound on the steps of the search that lists recurring groups: groups visited and edges tested (0 = none)")
	fs.Var(&kmhValue{&o.ReferenceSpeed}, "reference-speed", "`km/h` against which extra vehicle-hours are counted")
}

// bindCompare binds the decision rule of compare to o.
func bindCompare(fs *flag.FlagSet, o *patterns.CompareOptions) *focusValue {
	fs.Float64Var(&o.Alpha, "alpha", o.Alpha, "significance level after Benjamini-Hochberg adjustment")
	fs.StringVar(&o.Opening, "opening", o.Opening, "day `YYYY-MM-DD` the scheme opened, marked on the timeline")
	focus := &focusValue{f: &o.Focus}
	fs.Var(focus, "focus", "pairs around a scheme: region ids `12,15` or a point and radius LON,LAT@METRES")
	return focus
}

// optionFlags are the flags that one bind function added to a flag set.
type optionFlags struct {
	fs    *flag.FlagSet
	names map[string]bool
}

// bindOptions runs bind on fs and remembers the flags it added.
func bindOptions(fs *flag.FlagSet, bind func(*flag.FlagSet)) optionFlags {
	before := map[string]bool{}
	fs.VisitAll(func(f *flag.Flag) { before[f.Name] = true })
	bind(fs)
	of := optionFlags{fs: fs, names: map[string]bool{}}
	fs.VisitAll(func(f *flag.Flag) { of.names[f.Name] = !before[f.Name] })
	return of
}

// check turns err, the validation error of the Options the flags are bound
// to, into a usage error that names those of the flags the command line
// set (the library's message names the option itself).
func (of optionFlags) check(err error) error {
	if err == nil {
		return nil
	}
	var set []string
	of.fs.Visit(func(f *flag.Flag) {
		if of.names[f.Name] {
			set = append(set, "--"+f.Name)
		}
	})
	if len(set) == 0 {
		return usageError{err.Error()}
	}
	return usagef("%s: %v", strings.Join(set, ", "), err)
}

// textValue is a flag over a field of a string type.
type textValue[T ~string] struct{ p *T }

func (v *textValue[T]) String() string {
	if v.p == nil {
		return ""
	}
	return string(*v.p)
}

func (v *textValue[T]) Set(s string) error { *v.p = T(s); return nil }

// listValue is a comma-separated list over a []string field.
type listValue struct{ p *[]string }

func (v *listValue) String() string {
	if v.p == nil {
		return ""
	}
	return strings.Join(*v.p, ",")
}

func (v *listValue) Set(s string) error { *v.p = splitList(s); return nil }

func splitList(s string) []string {
	var out []string
	for _, p := range strings.Split(s, ",") {
		if p = strings.TrimSpace(p); p != "" {
			out = append(out, p)
		}
	}
	return out
}

// kmhValue is a speed in km/h over a field in m/s, as flag and study key.
type kmhValue struct{ mps *float64 }

func (v *kmhValue) String() string {
	if v.mps == nil {
		return ""
	}
	return strconv.FormatFloat(geodesy.KMH(*v.mps), 'g', -1, 64)
}

func (v *kmhValue) Set(s string) error {
	kmh, err := strconv.ParseFloat(s, 64)
	if err != nil {
		return fmt.Errorf("%q is not a speed in km/h", s)
	}
	*v.mps = geodesy.MPS(kmh)
	return nil
}

func (v *kmhValue) UnmarshalTOML(data any) error {
	switch kmh := data.(type) {
	case float64:
		*v.mps = geodesy.MPS(kmh)
	case int64:
		*v.mps = geodesy.MPS(float64(kmh))
	default:
		return fmt.Errorf("want a speed in km/h, got %v", data)
	}
	return nil
}

// bboxValue is a study area "W,S,E,N" over a *orb.Bound field; empty
// means none.
type bboxValue struct{ b **orb.Bound }

func (v *bboxValue) String() string {
	if v.b == nil || *v.b == nil {
		return ""
	}
	b := *v.b
	return fmt.Sprintf("%v,%v,%v,%v", b.Min[0], b.Min[1], b.Max[0], b.Max[1])
}

func (v *bboxValue) Set(s string) error {
	if s == "" {
		*v.b = nil
		return nil
	}
	b, err := partition.ParseBBox(s)
	if err != nil {
		return err
	}
	*v.b = &b
	return nil
}

func (v *bboxValue) UnmarshalText(text []byte) error { return v.Set(string(text)) }

// windowsValue is the repeatable --window over the windows field: the
// first window given replaces the default ones.
type windowsValue struct {
	w   *[]regiongraph.Window
	set bool
}

func (v *windowsValue) String() string {
	if v.w == nil {
		return ""
	}
	var s []string
	for _, w := range *v.w {
		s = append(s, w.String())
	}
	return strings.Join(s, " ")
}

func (v *windowsValue) Set(s string) error {
	w, err := regiongraph.ParseWindow(s)
	if err != nil {
		return err
	}
	if !v.set {
		*v.w, v.set = nil, true
	}
	*v.w = append(*v.w, w)
	return nil
}

// columnsValue is "logical=header,..." over the column map.
type columnsValue struct{ m *map[string]string }

func (v *columnsValue) String() string {
	if v.m == nil {
		return ""
	}
	var s []string
	for _, k := range slices.Sorted(maps.Keys(*v.m)) {
		s = append(s, k+"="+(*v.m)[k])
	}
	return strings.Join(s, ",")
}

func (v *columnsValue) Set(s string) error {
	m, err := regiongraph.ParseColumns(s)
	if err != nil {
		return err
	}
	*v.m = m
	return nil
}

// durationText is a study key holding a Go duration such as "4h".
type durationText struct{ d *time.Duration }

func (v *durationText) UnmarshalText(text []byte) error {
	d, err := time.ParseDuration(string(text))
	if err != nil {
		return err
	}
	*v.d = d
	return nil
}

// focusValue is --focus and the study key focus over the focus field. It
// keeps the text as given for the report's settings table.
type focusValue struct {
	f    **patterns.Focus
	text string
}

func (v *focusValue) String() string { return v.text }

func (v *focusValue) Set(s string) error {
	f, err := parseFocus(s)
	if err != nil {
		return err
	}
	*v.f, v.text = f, s
	return nil
}

func (v *focusValue) UnmarshalText(text []byte) error { return v.Set(string(text)) }

// periodValue is a period "D1..D2" of inclusive local days.
type periodValue struct{ from, to string }

func (v *periodValue) String() string {
	if v.from == "" {
		return ""
	}
	return v.from + ".." + v.to
}

func (v *periodValue) Set(s string) (err error) {
	v.from, v.to, err = patterns.ParsePeriod(s)
	return err
}

// UnmarshalText reads a study's period; empty means none given.
func (v *periodValue) UnmarshalText(text []byte) error {
	if len(text) == 0 {
		return nil
	}
	return v.Set(string(text))
}

// apply returns o for the period.
func (v *periodValue) apply(o patterns.ScanOptions) patterns.ScanOptions {
	o.From, o.To = v.from, v.to
	return o
}

// parseFocus parses --focus: region ids "12,15,18", or a point and radius
// "LON,LAT@METRES" (the scheme's location).
func parseFocus(s string) (*patterns.Focus, error) {
	if s = strings.TrimSpace(s); s == "" {
		return nil, nil
	}
	if pt, radius, ok := strings.Cut(s, "@"); ok {
		parts := strings.Split(pt, ",")
		if len(parts) != 2 {
			return nil, fmt.Errorf("want LON,LAT@METRES such as 8.512,0.734@600, got %q", s)
		}
		lon, err1 := strconv.ParseFloat(strings.TrimSpace(parts[0]), 64)
		lat, err2 := strconv.ParseFloat(strings.TrimSpace(parts[1]), 64)
		r, err3 := strconv.ParseFloat(strings.TrimSpace(radius), 64)
		if err1 != nil || err2 != nil || err3 != nil || lon < -180 || lon > 180 || lat < -90 || lat > 90 || r <= 0 {
			return nil, fmt.Errorf("want LON,LAT@METRES with a positive radius, got %q", s)
		}
		p := orb.Point{lon, lat}
		return &patterns.Focus{Point: &p, RadiusMetres: r}, nil
	}
	f := &patterns.Focus{}
	for _, id := range splitList(s) {
		n, err := strconv.Atoi(id)
		if err != nil || n < 1 {
			return nil, fmt.Errorf("want region ids such as 12,15 or LON,LAT@METRES, got %q", s)
		}
		f.Regions = append(f.Regions, n)
	}
	if len(f.Regions) == 0 {
		return nil, fmt.Errorf("want region ids such as 12,15 or LON,LAT@METRES, got %q", s)
	}
	return f, nil
}
