package report

import (
	"strconv"

	"github.com/xuri/excelize/v2"

	"narrows/partition/geodesy"
	"narrows/patterns"
)

// The Cost by day sheet: for each weak link, its extra vehicle-hours and
// detour on every analysed day, one column per period so that before and
// after are separate chart series, with the scheme's opening marked.

// SheetCostDays is the sheet of each weak link's daily cost and detour.
const SheetCostDays = "Cost by day"

// costDaysMax is how many weak links (in the summary's order) get a block
// and charts: beyond it the charts no longer help a reader.
const costDaysMax = 10

// costDayRows is the least number of rows a block takes, so that its two
// charts (costChartHeight px, 20 px a row) do not overlap the next block.
const (
	costChartHeight = 300
	costDayRows     = costChartHeight/20 + 3
)

// dayCost is one weak link on one analysed day of one period: the sums
// over its edges.
type dayCost struct {
	trips              int
	hours              float64 // extra vehicle-hours
	distance, straight float64 // metres
	periodIndex        int
	present            bool
}

// detour is the day's detour ratio over all the weak link's trips: travel
// distance over straight-line distance.
func (d dayCost) detour() float64 {
	if d.straight <= 0 {
		return 0
	}
	return d.distance / d.straight
}

// costByDay returns, for item it, its cost on each day of each period,
// keyed by period index and day.
func (v *view) costByDay(it item) []map[string]dayCost {
	out := make([]map[string]dayCost, len(v.periods))
	for pi, p := range v.periods {
		ref := p.Scan.Options.ReferenceSpeed
		if !(ref > 0) {
			ref = geodesy.MPS(30)
		}
		m := map[string]dayCost{}
		for _, e := range it.Finding.Edges {
			for _, d := range dailyOf(p, it, patterns.EdgeKey{From: e.From, To: e.To}) {
				c := m[d.Day]
				c.trips += d.Trips
				// The same count as the finding's cost (patterns.findingEdge),
				// on every day, not only the weak ones.
				c.hours += max(0, d.DurationSum-d.StraightSum/ref) / 3600
				c.distance += d.DistanceSum
				c.straight += d.StraightSum
				c.periodIndex, c.present = pi, true
				m[d.Day] = c
			}
		}
		out[pi] = m
	}
	return out
}

// costDayHeaders are the header names of a block: day, period, then the
// cost of each period, the detour of each period and, with an opening,
// the two marks.
func (v *view) costDayHeaders(opening bool) []string {
	cols := []string{"Day", "Period"}
	for _, p := range v.periods {
		cols = append(cols, "Extra vehicle-hours, "+p.Label)
	}
	for _, p := range v.periods {
		cols = append(cols, "Detour ratio, "+p.Label)
	}
	if opening {
		cols = append(cols, schemeOpens+" (vehicle-hours)", schemeOpens+" (detour)")
	}
	return cols
}

func (b *book) costDays() {
	v := b.v
	s := b.newSheet(SheetCostDays)
	days := v.timelineDays()
	opening := ""
	if c := v.in.Comparison; c != nil {
		opening = c.Options.Opening
	}
	cols := v.costDayHeaders(opening != "")
	np := len(v.periods)
	// The intro and the block titles overflow into the empty cells to their
	// right: they do not size column A.
	label := func(c cell) { w := s.widths[1]; s.add(c); s.widths[1] = w }
	label(b.bold("Each weak link's extra vehicle-hours and detour ratio on every analysed day, one column per period; the charts show them with the scheme's opening marked."))
	s.skip(1)
	for n, it := range v.summaryOrder() {
		if n == costDaysMax {
			label(b.str(strconv.Itoa(len(v.items)-n) + " more weak links are not shown here; their days are on the Daily sheet."))
			break
		}
		title := "Rank " + strconv.Itoa(it.Finding.Rank) + " (" + v.periodOf(it) + "): " + it.Name + " (" + it.Finding.ID + ")"
		top := s.row
		label(b.bold(title))
		head := s.row
		hc := make([]cell, len(cols))
		for i, c := range cols {
			hc[i] = b.head(c)
			s.widths[i+1] = max(s.widths[i+1], headerWidth(c))
		}
		s.add(hc...)
		costs := v.costByDay(it)
		var maxHours, maxDetour float64
		for _, m := range costs {
			for _, c := range m {
				if !v.suppressed(float64(c.trips)) {
					maxHours, maxDetour = max(maxHours, c.hours), max(maxDetour, c.detour())
				}
			}
		}
		marked := false
		for _, d := range days {
			row := make([]cell, len(cols))
			row[0], row[1] = b.str(d.day), b.str(d.period)
			for pi, p := range v.periods {
				if p.Label != d.period {
					continue
				}
				c := costs[pi][d.day]
				tr := float64(c.trips)
				row[2+pi] = b.gated(tr, c.hours, b.st.dec1)
				if c.trips == 0 {
					// No trips, no cost: nothing to withhold.
					row[2+pi] = numCell(0, b.st.dec1)
				}
				if c.straight > 0 {
					row[2+np+pi] = b.gated(tr, c.detour(), b.st.dec2)
				}
			}
			if opening != "" && !marked && d.day >= opening {
				row[2+2*np], row[3+2*np] = numCell(maxHours, b.st.dec1), numCell(maxDetour, b.st.dec2)
				marked = true
			}
			s.add(row...)
		}
		if len(days) > 0 {
			b.costDayCharts(it.Name, head, len(days), len(cols), opening != "")
		}
		s.row = max(s.row+1, top+costDayRows)
	}
	s.finish()
}

// costDayCharts draws a block's two line charts, cost and detour, from the
// n rows below its header row head: one series per period and the opening
// mark as a large triangle.
func (b *book) costDayCharts(name string, head, n, ncols int, opening bool) {
	np := len(b.v.periods)
	col := func(i int) string { c, _ := excelize.ColumnNumberToName(i); return c }
	ref := func(c string) string { return columnRange(SheetCostDays, c, head+1, head+n) }
	nameOf := func(c string) string { return "'" + SheetCostDays + "'!$" + c + "$" + strconv.Itoa(head) }
	chart := func(first, mark int, title, axis string, at string) {
		var series []excelize.ChartSeries
		for pi := range np {
			c := col(first + pi)
			colour := scatterColour(b.v.periods[pi].Label, true)
			series = append(series, excelize.ChartSeries{Name: nameOf(c), Categories: ref("A"), Values: ref(c),
				Line: excelize.LineOptions{Width: 2}, Fill: excelize.Fill{Type: "pattern", Pattern: 1, Color: []string{colour}},
				Marker: excelize.ChartMarker{Symbol: "none"}})
		}
		if opening {
			fill := excelize.Fill{Type: "pattern", Pattern: 1, Color: []string{"#333333"}}
			c := col(mark)
			series = append(series, excelize.ChartSeries{Name: nameOf(c), Categories: ref("A"), Values: ref(c),
				Marker: excelize.ChartMarker{Symbol: "triangle", Size: 10, Fill: fill}, Fill: fill})
		}
		b.fail(b.f.AddChart(SheetCostDays, at, &excelize.Chart{
			Type:      excelize.Line,
			Series:    series,
			Title:     excelize.ChartTitle{Paragraph: []excelize.RichTextRun{{Text: upperFirst(name) + ": " + title}}},
			Legend:    excelize.ChartLegend{Position: "bottom"},
			XAxis:     excelize.ChartAxis{TickLabelSkip: max(n/8, 1), Alignment: excelize.Alignment{TextRotation: -45}, Font: axisFont()},
			YAxis:     excelize.ChartAxis{Title: excelize.ChartTitle{Paragraph: []excelize.RichTextRun{{Text: axis}}}, MajorGridLines: true, Font: axisFont()},
			Dimension: excelize.ChartDimension{Width: 480, Height: costChartHeight},
		}))
	}
	top := strconv.Itoa(head - 1)
	chart(3, 3+2*np, "extra vehicle-hours per day", "Extra vehicle-hours per day", col(ncols+2)+top)
	chart(3+np, 4+2*np, "detour ratio per day", "Detour ratio (travel / straight-line distance)", col(ncols+10)+top)
}
