package patterns

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"sort"
	"strings"
	"testing"
	"time"

	"github.com/paulmach/orb"

	"narrows/partition"
	"narrows/partition/geodesy"
	"narrows/regiongraph"
)

// The synthetic town for these tests is a grid of square regions of cellDeg
// degrees, numbered row by row from 1 at the south-west corner, far from any
// real place.
const (
	gridCols, gridRows = 4, 3
	cellDeg            = 0.01
	originLon          = 0.2
	originLat          = 0.1
	testWindow         = "am"
)

func gridPartition() *partition.Partition {
	p := &partition.Partition{Source: "grid-test"}
	for row := 0; row < gridRows; row++ {
		for col := 0; col < gridCols; col++ {
			x0, y0 := originLon+float64(col)*cellDeg, originLat+float64(row)*cellDeg
			x1, y1 := x0+cellDeg, y0+cellDeg
			p.Regions = append(p.Regions, partition.Region{
				ID:      row*gridCols + col + 1,
				Polygon: orb.Polygon{orb.Ring{{x0, y0}, {x1, y0}, {x1, y1}, {x0, y1}, {x0, y0}}},
				Point:   orb.Point{(x0 + x1) / 2, (y0 + y1) / 2},
			})
		}
	}
	p.Bound = orb.Bound{Min: orb.Point{originLon, originLat}, Max: orb.Point{originLon + gridCols*cellDeg, originLat + gridRows*cellDeg}}
	return p
}

// plant is the mean behaviour of one directed edge on a day.
type plant struct {
	From, To int
	Trips    int
	SpeedKMH float64
	Detour   float64
}

// noise is the day-to-day spread of the daily medians.
type noise struct {
	TripsSpread int     // uniform ± this
	SpeedKMH    float64 // standard deviation
	Detour      float64 // standard deviation
}

// realistic: an edge with a few dozen trips a day has a daily median speed
// that moves by about 1 km/h from day to day (the median of ~30 trip speeds
// spread by ~5 km/h).
var realistic = noise{TripsSpread: 4, SpeedKMH: 1, Detour: 0.02}

func days(from string, n int) []string {
	t, err := time.Parse("2006-01-02", from)
	if err != nil {
		panic(err)
	}
	out := make([]string, n)
	for i := range out {
		out[i] = t.AddDate(0, 0, i).Format("2006-01-02")
	}
	return out
}

// syntheticStore builds a store with, on every day, background traffic on
// every pair of neighbouring cells (fast and direct, so never a candidate)
// plus the planted edges that plants returns for the day.
func syntheticStore(r *rand.Rand, dayList []string, plants func(day int) []plant, nz noise) *regiongraph.Store {
	grid := gridPartition()
	centre := func(id int) orb.Point { return grid.Regions[id-1].Point }
	straight := func(a, b int) float64 {
		pa, pb := centre(a), centre(b)
		lat := (pa.Lat() + pb.Lat()) / 2 * math.Pi / 180
		dx := (pa.Lon() - pb.Lon()) * math.Pi / 180 * math.Cos(lat) * geodesy.EarthRadiusMetres
		dy := (pa.Lat() - pb.Lat()) * math.Pi / 180 * geodesy.EarthRadiusMetres
		return math.Hypot(dx, dy)
	}
	store := &regiongraph.Store{Meta: regiongraph.Meta{TimeZone: "UTC", Windows: []regiongraph.Window{{Name: testWindow, StartMinute: 7 * 60, EndMinute: 10 * 60}}}}
	for d, day := range dayList {
		planted := plants(d)
		isPlanted := map[EdgeKey]bool{}
		for _, p := range planted {
			isPlanted[EdgeKey{From: p.From, To: p.To}] = true
		}
		all := append([]plant{}, planted...)
		for id := 1; id <= gridCols*gridRows; id++ {
			for _, nb := range []int{id + 1, id + gridCols} {
				if (nb == id+1 && (id-1)%gridCols == gridCols-1) || nb > gridCols*gridRows {
					continue
				}
				for _, k := range []EdgeKey{{From: id, To: nb}, {From: nb, To: id}} {
					if !isPlanted[k] {
						all = append(all, plant{From: k.From, To: k.To, Trips: 40, SpeedKMH: 36, Detour: 1.15})
					}
				}
			}
		}
		var edges []regiongraph.Edge
		for _, p := range all {
			trips := p.Trips
			if nz.TripsSpread > 0 {
				trips += r.IntN(2*nz.TripsSpread+1) - nz.TripsSpread
			}
			speed := math.Max(1, p.SpeedKMH+nz.SpeedKMH*r.NormFloat64()) / 3.6
			detour := math.Max(1, p.Detour+nz.Detour*r.NormFloat64())
			s := straight(p.From, p.To)
			dist := s * detour
			edges = append(edges, regiongraph.Edge{
				Day: testDay(day), Window: testWindowIndex(testWindow), From: p.From, To: p.To, Trips: trips,
				SpeedP25: speed * 0.85, SpeedMedian: speed, SpeedP75: speed * 1.15,
				DetourP25: 1 + (detour-1)*0.8, DetourMedian: detour, DetourP75: detour * 1.1,
				DistanceMedian: dist, DurationMedian: dist / speed,
				DistanceSum: dist * float64(trips), StraightSum: s * float64(trips), DurationSum: dist / speed * float64(trips),
			})
		}
		sort.Slice(edges, func(i, j int) bool {
			if edges[i].From != edges[j].From {
				return edges[i].From < edges[j].From
			}
			return edges[i].To < edges[j].To
		})
		store.Edges = append(store.Edges, edges...)
	}
	return store
}

func scanPeriod(from, to string, exclude []string) ScanOptions {
	o := DefaultScanOptions()
	o.From, o.To, o.Window, o.Exclude = from, to, testWindow, exclude
	return o
}

func assessmentFor(t *testing.T, c *Comparison, from, to int) *Assessment {
	t.Helper()
	for i := range c.Assessments {
		e := c.Assessments[i].Finding.Edges
		if len(e) == 1 && e[0].From == from && e[0].To == to {
			return &c.Assessments[i]
		}
	}
	var ids []string
	for _, a := range c.Assessments {
		ids = append(ids, a.Finding.ID)
	}
	t.Fatalf("no assessment for the finding %d>%d; have %v", from, to, ids)
	return nil
}

// The planted town: A (1>2) is slow and circuitous before and fast and
// direct after (the new link); B (6>7) is the same in both periods; C
// (11>12) is fast before and slow after; D (3>4) recurs in both periods but
// is faster and more direct after. Trips, speeds and detours are chosen so
// that none of the planted edges dominates another (more trips always
// come with a higher speed and a shorter detour).
func plantedChange(afterStart int) func(day int) []plant {
	return func(day int) []plant {
		if day < afterStart {
			return []plant{
				{1, 2, 30, 14, 1.80},
				{6, 7, 60, 21, 1.60},
				{11, 12, 20, 33, 1.12},
				{3, 4, 45, 18, 1.70},
			}
		}
		return []plant{
			{1, 2, 30, 32, 1.15},
			{6, 7, 60, 21, 1.60},
			{11, 12, 20, 11, 1.90},
			{3, 4, 70, 25, 1.45},
		}
	}
}

func TestComparePlantedChange(t *testing.T) {
	r := rand.New(rand.NewPCG(2026, 1))
	dayList := append(days("2026-03-02", 28), days("2026-05-04", 28)...)
	store := syntheticStore(r, dayList, plantedChange(28), realistic)
	opts := DefaultCompareOptions()
	opts.Focus = &Focus{Regions: []int{6}, Point: &orb.Point{originLon + 3.5*cellDeg, originLat + 2.5*cellDeg}} // inside region 12
	c, err := Compare(context.Background(), store, gridPartition(),
		scanPeriod("2026-03-02", "2026-03-29", nil), scanPeriod("2026-05-04", "2026-05-31", nil), opts)
	if err != nil {
		t.Fatal(err)
	}
	if len(c.Before.Days) != 28 || len(c.After.Days) != 28 {
		t.Fatalf("analysed %d and %d days, want 28 and 28", len(c.Before.Days), len(c.After.Days))
	}
	tests := []struct {
		name              string
		from, to          int
		want              Verdict
		basis             Basis
		inBefore, inAfter bool
		focus             bool
		speedKMH, detour  float64 // planted change, after − before
		cost, time        Change  // the deciding changes
	}{
		{"A a new link clears it", 1, 2, Cleared, BasisCost, true, false, false, 18, -0.65, Down, Down},
		{"B untouched", 6, 7, Unchanged, BasisNone, true, true, true, 0, 0, NoChange, NoChange},
		{"C appears", 11, 12, New, BasisCost, false, true, true, -22, 0.78, Up, Up},
		{"D eased", 3, 4, Eased, BasisCost, true, true, false, 7, -0.25, Down, Down},
	}
	inFinding := map[EdgeKey]bool{}
	for _, a := range c.Assessments {
		for _, k := range findingKeys(a.Finding) {
			inFinding[k] = true
		}
	}
	for _, tc := range tests {
		a := assessmentFor(t, c, tc.from, tc.to)
		if a.Verdict != tc.want || a.Basis != tc.basis {
			t.Errorf("%s: verdict %s on %s, want %s on %s (%s)", tc.name, a.Verdict, a.Basis, tc.want, tc.basis, why(a))
		}
		if a.InBefore != tc.inBefore || a.InAfter != tc.inAfter {
			t.Errorf("%s: in before/after = %v/%v, want %v/%v", tc.name, a.InBefore, a.InAfter, tc.inBefore, tc.inAfter)
		}
		if a.Focus != tc.focus {
			t.Errorf("%s: focus %v, want %v", tc.name, a.Focus, tc.focus)
		}
		if a.TotalBefore != 28 || a.TotalAfter != 28 || a.DaysWithTrips != [2]int{28, 28} {
			t.Errorf("%s: %d/%d analysed days, %v with trips; want 28 of each", tc.name, a.TotalBefore, a.TotalAfter, a.DaysWithTrips)
		}
		if tc.inBefore && a.DaysBefore != len(c.Before.Findings[indexOfFinding(c.Before, a.Finding.ID)].Days) {
			t.Errorf("%s: recurrence before %d differs from the finding's %d days", tc.name, a.DaysBefore, len(a.Finding.Days))
		}
		// The raw changes recover the planted change within the day-to-day
		// noise.
		if got := a.Effects[Speed].Raw * 3.6; math.Abs(got-tc.speedKMH) > 1 {
			t.Errorf("%s: speed change %+.2f km/h, planted %+.0f", tc.name, got, tc.speedKMH)
		}
		if got := a.Effects[Detour].Raw; math.Abs(got-tc.detour) > 0.03 {
			t.Errorf("%s: detour change %+.3f, planted %+.2f", tc.name, got, tc.detour)
		}
		cost := a.Effects[Cost].Adjusted
		if !(cost.Low <= cost.Shift && cost.Shift <= cost.High) || cost.PAdjusted < cost.P || a.FisherPAdjusted < a.FisherP {
			t.Errorf("%s: cost interval [%v, %v] misses %v, or an adjusted p-value is below its raw value", tc.name, cost.Low, cost.High, cost.Shift)
		}
		if got := [2]Change{cost.Change, a.Effects[TravelTime].Adjusted.Change}; got != [2]Change{tc.cost, tc.time} {
			t.Errorf("%s: cost and time changes %v, want %v", tc.name, got, [2]Change{tc.cost, tc.time})
		}
		// The comparison group: background pairs only, none in a finding or
		// touching the focus area (regions 6 and 12).
		if len(a.Group.Edges) < DefaultCompareOptions().GroupMinSize {
			t.Errorf("%s: comparison group of %d pairs", tc.name, len(a.Group.Edges))
		}
		for _, k := range a.Group.Edges {
			if inFinding[k] || k.From == 6 || k.To == 6 || k.From == 12 || k.To == 12 {
				t.Errorf("%s: comparison pair %v is in a finding or the focus area", tc.name, k)
			}
		}
		t.Logf("%s: %s — %s", tc.name, a.Verdict, why(a))
	}
	if len(c.Assessments) != len(tests) {
		t.Errorf("%d assessments, want %d", len(c.Assessments), len(tests))
	}
	want := map[Verdict]int{Cleared: 1, Unchanged: 1, New: 1, Eased: 1, Worse: 0}
	for v, n := range want {
		if c.Counts[v] != n {
			t.Errorf("count of %s = %d, want %d", v, c.Counts[v], n)
		}
	}
	for i := 1; i < len(c.Assessments); i++ {
		if severity(c.Assessments[i-1].Verdict) > severity(c.Assessments[i].Verdict) {
			t.Errorf("assessments not ordered by severity: %s before %s", c.Assessments[i-1].Verdict, c.Assessments[i].Verdict)
		}
	}
	if c.Alpha != 0.05 {
		t.Errorf("alpha %v, want 0.05", c.Alpha)
	}
}

// why describes the evidence behind an assessment's verdict for test
// messages.
func why(a *Assessment) string {
	c, tt := a.Effects[Cost], a.Effects[TravelTime]
	return fmt.Sprintf("%s on %s; cost %.2f -> %.2f veh-h/day, group %+.3f, adjusted %+.2f (%+.2f, p adjusted %.4f); time %.0f -> %.0f s, group %+.3f, adjusted %+.0f (%+.2f, p adjusted %.4f); bar %v of %v days; skyline %d/%d -> %d/%d days",
		a.Verdict, a.Basis, c.Before, c.After, c.Group, c.Adjusted.Shift, c.Relative, c.Adjusted.PAdjusted,
		tt.Before, tt.After, tt.Group, tt.Adjusted.Shift, tt.Relative, tt.Adjusted.PAdjusted,
		a.BarDays, a.DaysWithTrips, a.DaysBefore, a.TotalBefore, a.DaysAfter, a.TotalAfter)
}

func indexOfFinding(s *Scan, id string) int {
	for i, f := range s.Findings {
		if f.ID == id {
			return i
		}
	}
	return -1
}

// stationary plants the same three edges on every day: the null hypothesis.
func stationary(int) []plant {
	return []plant{
		{1, 2, 30, 14, 1.80},
		{6, 7, 60, 21, 1.60},
		{3, 4, 45, 18, 1.70},
	}
}

// alternateWeeks splits the days into odd and even weeks of the period, so
// that before and after interleave through the same stationary period.
func alternateWeeks(dayList []string) (odd, even []string) {
	for i, d := range dayList {
		if (i/7)%2 == 0 {
			odd = append(odd, d)
		} else {
			even = append(even, d)
		}
	}
	return odd, even
}

func TestCompareControlSamePeriod(t *testing.T) {
	// Two samples of one stationary period (odd against even weeks), with
	// realistic day-to-day noise: no finding may be called cleared or
	// worse, whatever the seed.
	dayList := days("2026-03-02", 56)
	odd, even := alternateWeeks(dayList)
	first, last := dayList[0], dayList[len(dayList)-1]
	seeds := 20
	if testing.Short() {
		seeds = 5
	}
	tally := map[Verdict]int{}
	for seed := 0; seed < seeds; seed++ {
		r := rand.New(rand.NewPCG(uint64(seed), 77))
		store := syntheticStore(r, dayList, stationary, realistic)
		c, err := Compare(context.Background(), store, gridPartition(),
			scanPeriod(first, last, even), scanPeriod(first, last, odd), DefaultCompareOptions())
		if err != nil {
			t.Fatal(err)
		}
		if len(c.Before.Days) != 28 || len(c.After.Days) != 28 {
			t.Fatalf("seed %d: %d and %d days, want 28 and 28", seed, len(c.Before.Days), len(c.After.Days))
		}
		if len(c.Assessments) != 3 {
			t.Errorf("seed %d: %d assessments, want 3", seed, len(c.Assessments))
		}
		for _, a := range c.Assessments {
			tally[a.Verdict]++
			if a.Verdict == Cleared || a.Verdict == Worse {
				t.Errorf("seed %d: control gives %s for %s: %s", seed, a.Verdict, a.Finding.ID, why(&a))
			}
		}
	}
	t.Logf("control over %d seeds: %v", seeds, tally)
}

func TestCompareControlFalsePositiveRate(t *testing.T) {
	if testing.Short() {
		t.Skip("many seeds")
	}
	// With noise four times the realistic level, significant and material
	// shifts do occur by chance. Under the null hypothesis each harmful
	// direction (fewer recurrences with the finding lost, slower, more
	// circuitous) is a two-sided test's half at level α after adjustment,
	// so the share of findings called cleared or worse is at most about
	// 1.5·α; allow three binomial standard errors above that.
	heavy := noise{TripsSpread: 8, SpeedKMH: 4, Detour: 0.08}
	dayList := days("2026-03-02", 56)
	odd, even := alternateWeeks(dayList)
	first, last := dayList[0], dayList[len(dayList)-1]
	opts := DefaultCompareOptions()
	var trials, harmful int
	for seed := 0; seed < 30; seed++ {
		r := rand.New(rand.NewPCG(uint64(seed), 99))
		store := syntheticStore(r, dayList, stationary, heavy)
		c, err := Compare(context.Background(), store, gridPartition(),
			scanPeriod(first, last, even), scanPeriod(first, last, odd), opts)
		if err != nil {
			t.Fatal(err)
		}
		for _, a := range c.Assessments {
			trials++
			if a.Verdict == Cleared || a.Verdict == Worse {
				harmful++
			}
		}
	}
	bound := 1.5 * opts.Alpha
	limit := bound + 3*math.Sqrt(bound*(1-bound)/float64(trials))
	rate := float64(harmful) / float64(trials)
	if rate > limit {
		t.Errorf("control with heavy noise: %d of %d findings cleared or worse (%.3f > %.3f)", harmful, trials, rate, limit)
	}
	t.Logf("control with heavy noise: %d of %d findings cleared or worse (rate %.3f, limit %.3f)", harmful, trials, rate, limit)
}

func TestCompareErrors(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 5))
	dayList := days("2026-03-02", 14)
	store := syntheticStore(r, dayList, stationary, realistic)
	grid := gridPartition()
	good := scanPeriod("2026-03-02", "2026-03-08", nil)
	later := scanPeriod("2026-03-09", "2026-03-15", nil)
	empty := scanPeriod("2027-01-01", "2027-01-31", nil)
	otherWindow := later
	otherWindow.Window = "pm"
	withOpts := func(f func(*CompareOptions)) CompareOptions { o := DefaultCompareOptions(); f(&o); return o }
	tests := []struct {
		name          string
		store         *regiongraph.Store
		regions       *partition.Partition
		before, after ScanOptions
		opts          CompareOptions
		wantInError   string
	}{
		{"nil store", nil, grid, good, later, DefaultCompareOptions(), "store"},
		{"empty after period", store, grid, good, empty, DefaultCompareOptions(), "after period"},
		{"different windows", store, grid, good, otherWindow, DefaultCompareOptions(), ""},
		{"alpha zero", store, grid, good, later, withOpts(func(o *CompareOptions) { o.Alpha = 0 }), "alpha"},
		{"negative material cost", store, grid, good, later, withOpts(func(o *CompareOptions) { o.MaterialCost = -1 }), "material cost"},
		{"NaN material time", store, grid, good, later, withOpts(func(o *CompareOptions) { o.MaterialTime = math.NaN() }), "travel time"},
		{"group smaller than its minimum", store, grid, good, later, withOpts(func(o *CompareOptions) { o.GroupSize = 3 }), "group size"},
		{"opening not a day", store, grid, good, later, withOpts(func(o *CompareOptions) { o.Opening = "30/03/2026" }), "opening"},
		{"unknown focus region", store, grid, good, later, withOpts(func(o *CompareOptions) { o.Focus = &Focus{Regions: []int{99}} }), "99"},
		{"focus point without regions", store, nil, good, later, withOpts(func(o *CompareOptions) { o.Focus = &Focus{Point: &orb.Point{0.2, 0.1}} }), "partition"},
		{"focus point off the globe", store, grid, good, later, withOpts(func(o *CompareOptions) { o.Focus = &Focus{Point: &orb.Point{200, 0.1}} }), "WGS84"},
		{"negative radius", store, grid, good, later, withOpts(func(o *CompareOptions) {
			o.Focus = &Focus{Point: &orb.Point{0.2, 0.1}, RadiusMetres: -5}
		}), "radius"},
		{"partition of another store", store, &partition.Partition{Source: "other", Regions: grid.Regions[:3]}, good, later, DefaultCompareOptions(), "region"},
	}
	for _, tc := range tests {
		_, err := Compare(context.Background(), tc.store, tc.regions, tc.before, tc.after, tc.opts)
		if err == nil {
			t.Errorf("%s: no error", tc.name)
			continue
		}
		if !strings.Contains(err.Error(), tc.wantInError) {
			t.Errorf("%s: error %q does not mention %q", tc.name, err, tc.wantInError)
		}
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := Compare(ctx, store, grid, good, later, DefaultCompareOptions()); err == nil {
		t.Error("cancelled context: no error")
	}
	// Without a point focus, the partition may be left out.
	if _, err := Compare(context.Background(), store, nil, good, later, DefaultCompareOptions()); err != nil {
		t.Errorf("nil partition without focus point: %v", err)
	}
}

func TestCompareDeterministic(t *testing.T) {
	dayList := append(days("2026-03-02", 28), days("2026-05-04", 28)...)
	run := func() string {
		store := syntheticStore(rand.New(rand.NewPCG(3, 3)), dayList, plantedChange(28), realistic)
		c, err := Compare(context.Background(), store, gridPartition(),
			scanPeriod("2026-03-02", "2026-03-29", nil), scanPeriod("2026-05-04", "2026-05-31", nil), DefaultCompareOptions())
		if err != nil {
			t.Fatal(err)
		}
		var b strings.Builder
		for _, a := range c.Assessments {
			fmt.Fprintf(&b, "%s %s %v %v %s\n", a.Finding.ID, a.Verdict, a.Effects, a.Group, why(&a))
		}
		return b.String()
	}
	if first, second := run(), run(); first != second {
		t.Errorf("two runs differ:\n%s\n---\n%s", first, second)
	}
}

// TestCompareLinkRoad compares the two periods of the planted town with the
// default options, as a caller would, and checks the verdicts and figures.
func TestCompareLinkRoad(t *testing.T) {
	// A synthetic town with a link road opened between the two periods.
	dayList := append(days("2026-03-02", 28), days("2026-05-04", 28)...)
	store := syntheticStore(rand.New(rand.NewPCG(1, 1)), dayList, plantedChange(28), realistic)

	before := DefaultScanOptions()
	before.From, before.To = "2026-03-02", "2026-03-29"
	after := DefaultScanOptions()
	after.From, after.To = "2026-05-04", "2026-05-31"

	c, err := Compare(context.Background(), store, gridPartition(), before, after, DefaultCompareOptions())
	if err != nil {
		t.Fatal(err)
	}
	var b strings.Builder
	for _, a := range c.Assessments {
		fmt.Fprintf(&b, "%-6s %-9s recurred %2d/%d -> %2d/%d days, speed %+5.1f km/h\n", a.Finding.ID, a.Verdict,
			a.DaysBefore, a.TotalBefore, a.DaysAfter, a.TotalAfter, a.Effects[Speed].Raw*3.6)
	}
	want := `11>12  new       recurred  0/28 -> 28/28 days, speed -21.8 km/h
6>7    unchanged recurred 28/28 -> 28/28 days, speed  +0.2 km/h
3>4    eased     recurred 28/28 -> 28/28 days, speed  +6.9 km/h
1>2    cleared   recurred 28/28 ->  0/28 days, speed +17.6 km/h
`
	if got := b.String(); got != want {
		t.Errorf("got\n%s\nwant\n%s", got, want)
	}
}

func BenchmarkCompare(b *testing.B) {
	dayList := append(days("2026-03-02", 28), days("2026-05-04", 28)...)
	store := syntheticStore(rand.New(rand.NewPCG(3, 3)), dayList, plantedChange(28), realistic)
	grid := gridPartition()
	before, after := scanPeriod("2026-03-02", "2026-03-29", nil), scanPeriod("2026-05-04", "2026-05-31", nil)
	b.ReportMetric(float64(len(store.Edges)), "edges")
	for b.Loop() {
		if _, err := Compare(context.Background(), store, grid, before, after, DefaultCompareOptions()); err != nil {
			b.Fatal(err)
		}
	}
}

func TestCompareMultiEdgeFinding(t *testing.T) {
	// A two-way weak pair (9>10 and 10>9, always candidates together) is one
	// finding of two edges. After the change, 10>9 has no trips at all and
	// 9>10 is fast and direct: the daily series after comes from 9>10 alone.
	dayList := append(days("2026-03-02", 28), days("2026-05-04", 28)...)
	plants := func(day int) []plant {
		if day < 28 {
			return []plant{{9, 10, 30, 14, 1.8}, {10, 9, 45, 18, 1.7}}
		}
		return []plant{{9, 10, 30, 33, 1.1}}
	}
	store := syntheticStore(rand.New(rand.NewPCG(8, 8)), dayList, plants, realistic)
	// 10>9 is background traffic in the grid unless planted; drop it after.
	kept := store.Edges[:0]
	for _, e := range store.Edges {
		if !(e.Day >= testDay("2026-05-04") && e.From == 10 && e.To == 9) {
			kept = append(kept, e)
		}
	}
	store.Edges = kept
	c, err := Compare(context.Background(), store, gridPartition(),
		scanPeriod("2026-03-02", "2026-03-29", nil), scanPeriod("2026-05-04", "2026-05-31", nil), DefaultCompareOptions())
	if err != nil {
		t.Fatal(err)
	}
	if len(c.Assessments) != 1 {
		t.Fatalf("%d assessments, want the one two-edge finding", len(c.Assessments))
	}
	a := c.Assessments[0]
	if len(a.Finding.Edges) != 2 || a.Verdict != Cleared || a.DaysBefore != 28 || a.DaysAfter != 0 {
		t.Errorf("finding %s with %d edges: %s, %d and %d days; want 2 edges, cleared, 28 and 0 days (%s)",
			a.Finding.ID, len(a.Finding.Edges), a.Verdict, a.DaysBefore, a.DaysAfter, why(&a))
	}
	if len(a.Effects[Speed].Adjusted.After) != 28 {
		t.Errorf("speed series after has %d days, want 28 (days with trips on any edge)", len(a.Effects[Speed].Adjusted.After))
	}
	// Before: trip-weighted mean of 14 and 18 km/h with 30 and 45 trips is
	// 16.4 km/h; after: 33 km/h. The shift is about +16.6 km/h.
	if got := a.Effects[Speed].Raw * 3.6; math.Abs(got-16.6) > 1 {
		t.Errorf("speed shift %+.2f km/h, want about +16.6", got)
	}
}

func TestCompareRejectsDifferentWindows(t *testing.T) {
	store := syntheticStore(rand.New(rand.NewPCG(4, 4)), days("2026-03-02", 14), stationary, realistic)
	store.Meta.Windows = append(store.Meta.Windows, regiongraph.Window{Name: "pm", StartMinute: 16 * 60, EndMinute: 19 * 60})
	n := len(store.Edges)
	for _, e := range store.Edges[:n] {
		e.Window = testWindowIndex("pm")
		store.Edges = append(store.Edges, e)
	}
	sort.SliceStable(store.Edges, func(i, j int) bool {
		a, b := store.Edges[i], store.Edges[j]
		if a.Day != b.Day {
			return a.Day < b.Day
		}
		return a.Window < b.Window
	})
	before := scanPeriod("2026-03-02", "2026-03-08", nil)
	after := scanPeriod("2026-03-09", "2026-03-15", nil)
	after.Window = "pm"
	_, err := Compare(context.Background(), store, gridPartition(), before, after, DefaultCompareOptions())
	if err == nil || !strings.Contains(err.Error(), "different time windows") {
		t.Errorf("error %v, want one about different time windows", err)
	}
	after.Window = "am"
	if _, err := Compare(context.Background(), store, gridPartition(), before, after, DefaultCompareOptions()); err != nil {
		t.Errorf("same window: %v", err)
	}
}

// BenchmarkCompareYearAgainstYear compares a year against the next over a
// 45 x 45 grid (2,025 regions, about 4,000 edges a day, 2.9 million edges
// in all): both scans, the comparison groups, the effects and the rule.
func BenchmarkCompareYearAgainstYear(b *testing.B) {
	store := scanTestStore(6, 45, 730, 4200, []scanPlant{scanPlantA, scanPlantB})
	first, last := store.Edges[0].Day, store.Edges[len(store.Edges)-1].Day
	// As the command reads it: edges under the scan's minimum trips are
	// dropped while reading (regiongraph.ReadOptions.MinTrips).
	store.Edges = keptEdges(store.Edges, DefaultScanOptions().Skyline.MinTrips)
	split, _ := time.Parse("2006-01-02", first.String())
	mid := split.AddDate(0, 0, 365).Format("2006-01-02")
	before, after := DefaultScanOptions(), DefaultScanOptions()
	before.From, before.To = first.String(), split.AddDate(0, 0, 364).Format("2006-01-02")
	after.From, after.To = mid, last.String()
	// The synthetic pairs are drawn afresh each day, each present on about
	// 9 % of the days and with 10 trips or more on a fifth of those: a pool
	// needs the share lowered to fill.
	opts := DefaultCompareOptions()
	opts.GroupMinDays = 0.01
	var c *Comparison
	for b.Loop() {
		var err error
		if c, err = Compare(context.Background(), store, nil, before, after, opts); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(len(store.Edges)), "edges")
	b.ReportMetric(float64(len(c.Assessments)), "findings")
	b.ReportMetric(float64(c.PoolSize), "pool")
}
