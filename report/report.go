package report

import (
	"errors"
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"
	"time"

	"narrows/partition"
	"narrows/patterns"
	"narrows/regiongraph"
)

// DefaultPublicationMinTrips is the publication threshold used when
// Input.PublicationMinTrips is zero: cells computed from fewer trips are
// suppressed. Ten is common practice for small-count disclosure control of
// mobility data; check the data licence of the study for its own rule.
const DefaultPublicationMinTrips = 10

// Input is everything a report shows. Only Title, Regions and one of Scan or
// Comparison are required; the writers never modify it.
type Input struct {
	Title string
	// Area names the town or study area (optional).
	Area string
	// Inputs are the study's input files with their SHA-256.
	Inputs []regiongraph.Source
	// Settings are the study's settings as ordered name/value pairs.
	Settings [][2]string
	// Regions is the partition the day graphs were built on.
	Regions *partition.Partition
	// Store is the day-graph store's provenance (optional): data quality,
	// time zone, windows and sources.
	Store *regiongraph.Meta
	// Scan is the result of a single period; used when Comparison is nil.
	Scan *patterns.Scan
	// Comparison is the before/after study; it takes precedence over Scan.
	Comparison *patterns.Comparison
	// Scheme is the scheme's linework (optional): the links it added,
	// highlighted on every map under the findings. The network drawn
	// beneath comes with the regions (Regions.Network).
	Scheme []partition.NetworkLine
	// Appraisal is the appraisal of candidate links for one weak link
	// (optional): the Candidate links sheet, the best candidate drawn on
	// the map and a table on the page.
	Appraisal *Appraisal
	// Exclusions are the days and region pairs the planner left out, each
	// with its reason (optional); the Method and Data quality sheets list
	// them. The analysis given must already leave them out.
	Exclusions patterns.Exclusions
	// FocusRegions are the region ids of the focus area (optional). When
	// empty, the regions of the assessments marked Focus are taken.
	FocusRegions []int
	// PublicationMinTrips is the publication threshold (default
	// DefaultPublicationMinTrips): counts and values from fewer trips are
	// shown suppressed.
	PublicationMinTrips int
	// Version is the version of the program that made the report.
	Version string
	// DailyRowCap is the most rows the workbook's Daily sheet holds
	// (default DefaultDailyRowCap); with more, the sheet holds a note and
	// the rows go to the daily CSV (see DailyOverflows, WriteDailyCSV).
	DailyRowCap int
	// DailyCSVName is the daily CSV's file name, which the note names
	// (default "daily.csv").
	DailyCSVName string
	// Created is written as the workbook's creation time. Zero means
	// midnight UTC after the last analysed day, so that the same study gives
	// byte-identical files.
	Created time.Time
}

// period is one analysed period with its label.
type period struct {
	Label string // "before", "after" or "study"
	Scan  *patterns.Scan
}

// item is one finding as the report shows it: from the scan, or from a
// comparison with its assessment.
type item struct {
	Finding    patterns.Finding
	Assessment *patterns.Assessment // nil without comparison
	// Name is the place's name (PlaceName).
	Name string
	// Key is unique within the report even when the same finding id occurs
	// in both periods (it cannot in a well-formed comparison, but the
	// report must not mix rows up if it does).
	Key string
}

// periodOf returns the label of the period whose scan ranked it: the
// single period of a scan, else before when the finding was found there.
func (v *view) periodOf(it item) string {
	if a := it.Assessment; a != nil {
		if a.InBefore {
			return "before"
		}
		return "after"
	}
	if len(v.periods) > 0 {
		return v.periods[0].Label
	}
	return ""
}

// Verdict returns the item's verdict, or "" without comparison.
func (it item) Verdict() patterns.Verdict {
	if it.Assessment == nil {
		return ""
	}
	return it.Assessment.Verdict
}

// view is the validated, derived content shared by every writer.
type view struct {
	in       Input
	minTrips int
	periods  []period
	items    []item
	regions  map[int]*partition.Region
	focus    map[int]bool
	verdicts []patterns.Verdict // verdicts present, in severity order
	counts   map[patterns.Verdict]int
	// focusCounts counts the assessments marked Focus by verdict.
	focusCounts map[patterns.Verdict]int
}

// verdictOrder lists the verdicts in the order the report shows them.
var verdictOrder = [...]patterns.Verdict{patterns.Worse, patterns.New, patterns.Unchanged, patterns.Eased, patterns.Cleared}

// render validates in, derives the view every output shares and has write
// put one output to w. Nothing is written when in is not valid.
func render(w io.Writer, in Input, write func(*view, io.Writer) error) error {
	v, err := newView(in)
	if err != nil {
		return err
	}
	return write(v, w)
}

// newView checks in and derives what every output shows from it.
func newView(in Input) (*view, error) {
	if in.Regions == nil {
		return nil, errors.New("report: input has no regions")
	}
	v := &view{in: in, minTrips: in.PublicationMinTrips, regions: map[int]*partition.Region{}, focus: map[int]bool{}, counts: map[patterns.Verdict]int{}, focusCounts: map[patterns.Verdict]int{}}
	if v.minTrips <= 0 {
		v.minTrips = DefaultPublicationMinTrips
	}
	if in.Appraisal != nil {
		if err := in.Appraisal.check(); err != nil {
			return nil, err
		}
	}
	if err := v.indexRegions(); err != nil {
		return nil, err
	}
	if err := v.collectItems(); err != nil {
		return nil, err
	}
	if err := v.countItems(); err != nil {
		return nil, err
	}
	v.orderVerdicts()
	v.focusArea()
	return v, nil
}

// indexRegions indexes the regions by id, checking that ids are unique and
// coordinates finite.
func (v *view) indexRegions() error {
	for i := range v.in.Regions.Regions {
		r := &v.in.Regions.Regions[i]
		if _, dup := v.regions[r.ID]; dup {
			return fmt.Errorf("report: region %d appears twice in the partition", r.ID)
		}
		if !finite(r.Point[0]) || !finite(r.Point[1]) {
			return fmt.Errorf("report: region %d: representative point %v is not finite", r.ID, r.Point)
		}
		for i, ring := range r.Polygon {
			for j, pt := range ring {
				if !finite(pt[0]) || !finite(pt[1]) {
					return fmt.Errorf("report: region %d: point %d of ring %d is not finite", r.ID, j, i)
				}
			}
		}
		v.regions[r.ID] = r
	}
	return nil
}

// collectItems takes the periods and the findings from the comparison, or
// else from the scan, whose findings it orders by rank.
func (v *view) collectItems() error {
	switch {
	case v.in.Comparison != nil:
		c := v.in.Comparison
		if c.Before == nil || c.After == nil {
			return errors.New("report: comparison lacks its before or after scan")
		}
		v.periods = []period{{"before", c.Before}, {"after", c.After}}
		for i := range c.Assessments {
			a := &c.Assessments[i]
			v.items = append(v.items, item{Finding: a.Finding, Assessment: a, Key: a.Finding.ID})
		}
	case v.in.Scan != nil:
		v.periods = []period{{"study", v.in.Scan}}
		fs := append([]patterns.Finding(nil), v.in.Scan.Findings...)
		sort.SliceStable(fs, func(i, j int) bool { return fs[i].Rank < fs[j].Rank })
		for _, f := range fs {
			v.items = append(v.items, item{Finding: f, Key: f.ID})
		}
	default:
		return errors.New("report: input has neither a scan nor a comparison")
	}
	return nil
}

// countItems gives every item a unique key, checks that its edges join
// regions of the partition and counts the verdicts.
func (v *view) countItems() error {
	seen := map[string]int{}
	for i := range v.items {
		it := &v.items[i]
		if n := seen[it.Finding.ID]; n > 0 {
			it.Key = it.Finding.ID + "#" + strconv.Itoa(n+1)
		}
		seen[it.Finding.ID]++
		it.Name = PlaceName(it.Finding, v.in.Regions)
		for _, e := range it.Finding.Edges {
			for _, id := range [2]int{e.From, e.To} {
				if v.regions[id] == nil {
					return fmt.Errorf("report: finding %q edge %d>%d: region %d is not in the partition", it.Finding.ID, e.From, e.To, id)
				}
			}
		}
		if vd := it.Verdict(); vd != "" {
			v.counts[vd]++
			if it.Assessment.Focus {
				v.focusCounts[vd]++
			}
		}
	}
	return nil
}

// orderVerdicts lists the verdicts present in severity order.
func (v *view) orderVerdicts() {
	for _, vd := range verdictOrder {
		if v.counts[vd] > 0 {
			v.verdicts = append(v.verdicts, vd)
		}
	}
	// Verdicts outside the known set still get shown, after the known ones.
	var extra []patterns.Verdict
	for vd := range v.counts {
		if !knownVerdict(vd) {
			extra = append(extra, vd)
		}
	}
	sort.Slice(extra, func(i, j int) bool { return extra[i] < extra[j] })
	v.verdicts = append(v.verdicts, extra...)
}

// focusArea marks the focus regions: those given, or else the regions of
// the assessments marked Focus.
func (v *view) focusArea() {
	if len(v.in.FocusRegions) > 0 {
		for _, id := range v.in.FocusRegions {
			v.focus[id] = true
		}
		return
	}
	for _, it := range v.items {
		if it.Assessment != nil && it.Assessment.Focus {
			for _, id := range it.Finding.Regions {
				v.focus[id] = true
			}
		}
	}
}

// shownVerdicts lists every known verdict, then any other verdict present.
func (v *view) shownVerdicts() []patterns.Verdict {
	out := append([]patterns.Verdict(nil), verdictOrder[:]...)
	for _, vd := range v.verdicts {
		if !knownVerdict(vd) {
			out = append(out, vd)
		}
	}
	return out
}

func knownVerdict(vd patterns.Verdict) bool {
	for _, k := range verdictOrder {
		if k == vd {
			return true
		}
	}
	return false
}

// comparing reports whether the report shows a comparison.
func (v *view) comparing() bool { return v.in.Comparison != nil }

// suppressed reports whether a value from trips trips must be hidden.
func (v *view) suppressed(trips float64) bool { return trips < float64(v.minTrips) }

// countMark is shown instead of a suppressed trip count.
func (v *view) countMark() string { return "<" + strconv.Itoa(v.minTrips) }

// valueMark is shown instead of a value computed from too few trips.
func (v *view) valueMark() string { return "n<" + strconv.Itoa(v.minTrips) }

// created is the fixed creation time written into the workbook.
func (v *view) created() time.Time {
	if !v.in.Created.IsZero() {
		return v.in.Created.UTC()
	}
	last := ""
	for _, p := range v.periods {
		if n := len(p.Scan.Days); n > 0 && p.Scan.Days[n-1] > last {
			last = p.Scan.Days[n-1]
		}
	}
	if t, err := time.Parse("2006-01-02", last); err == nil {
		return t.AddDate(0, 0, 1)
	}
	return time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC)
}

// findingTotals sums a finding's per-edge daily medians of trips and
// weights its edges' median speed and detour by them.
type findingTotals struct {
	Trips  float64 // sum over edges of the median trips per day
	Speed  float64 // trip-weighted mean of the edges' median speeds, m/s
	Detour float64 // trip-weighted mean of the edges' median detours
}

func totals(f patterns.Finding) findingTotals {
	var t findingTotals
	var w float64
	for _, e := range f.Edges {
		t.Trips += e.TripsMedian
		w += e.TripsMedian
		t.Speed += e.TripsMedian * e.SpeedMedian
		t.Detour += e.TripsMedian * e.DetourMedian
	}
	if w > 0 {
		t.Speed /= w
		t.Detour /= w
	} else if n := float64(len(f.Edges)); n > 0 {
		t.Speed, t.Detour = 0, 0
		for _, e := range f.Edges {
			t.Speed += e.SpeedMedian / n
			t.Detour += e.DetourMedian / n
		}
	}
	return t
}

// dailyOf returns the daily values of edge k in period p for item it: the
// finding's own daily values when the finding comes from that period, else
// the period's EdgeDaily, else the same finding in that period's findings.
func dailyOf(p period, it item, k patterns.EdgeKey) []patterns.DailyValue {
	if p.Scan.EdgeDaily != nil {
		if d, ok := p.Scan.EdgeDaily[k]; ok {
			return d
		}
	}
	for _, f := range p.Scan.Findings {
		if f.ID != it.Finding.ID {
			continue
		}
		for _, e := range f.Edges {
			if e.From == k.From && e.To == k.To {
				return e.Daily
			}
		}
	}
	return nil
}

// sortedEdgeKeys returns the keys of m in (From, To) order.
func sortedEdgeKeys(m map[patterns.EdgeKey][]patterns.DailyValue) []patterns.EdgeKey {
	keys := make([]patterns.EdgeKey, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Slice(keys, func(i, j int) bool {
		if keys[i].From != keys[j].From {
			return keys[i].From < keys[j].From
		}
		return keys[i].To < keys[j].To
	})
	return keys
}

// kmh converts m/s to km/h.
func kmh(mps float64) float64 { return mps * 3.6 }

// finite reports whether x is neither NaN nor infinite.
func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// joinInts formats ids as "1, 2, 3".
func joinInts(ids []int) string {
	s := make([]string, len(ids))
	for i, id := range ids {
		s[i] = strconv.Itoa(id)
	}
	return strings.Join(s, ", ")
}

// edgeLabel formats a directed edge as "12>15".
func edgeLabel(from, to int) string { return strconv.Itoa(from) + ">" + strconv.Itoa(to) }

// dayRange formats a scan's days as "first to last".
func dayRange(s *patterns.Scan) string {
	if len(s.Days) == 0 {
		return "no days"
	}
	if len(s.Days) == 1 {
		return s.Days[0]
	}
	return s.Days[0] + " to " + s.Days[len(s.Days)-1]
}

// support returns the scan's support share, with the scan default.
func support(s *patterns.Scan) float64 {
	if s.Options.Support > 0 {
		return s.Options.Support
	}
	return 0.2
}
