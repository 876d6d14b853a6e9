package report

import (
	"strconv"
	"strings"

	"github.com/xuri/excelize/v2"

	"narrows/patterns"
)

// The workbook's native charts, drawn from the rows of their sheets.

// axisFont is the font of chart axis labels: excelize's default light grey
// is hard to read on a projector.
func axisFont() excelize.Font { return excelize.Font{Color: "#333333", Size: 9} }

// timelineChart draws the Timeline sheet's line chart of candidates and
// weak links per day, from the n rows below the header row head.
// With opening, column E marks the day the scheme opened: one point, drawn
// as a large triangle above the lines.
func (b *book) timelineChart(head, n int, opening bool) {
	ref := func(col string) string { return columnRange(SheetTimeline, col, head+1, head+n) }
	series := []excelize.ChartSeries{
		{Name: "'" + SheetTimeline + "'!$C$" + strconv.Itoa(head), Categories: ref("A"), Values: ref("C"), Line: excelize.LineOptions{Width: 1.5}},
		{Name: "'" + SheetTimeline + "'!$D$" + strconv.Itoa(head), Categories: ref("A"), Values: ref("D"), Line: excelize.LineOptions{Width: 2.25}},
	}
	if opening {
		fill := excelize.Fill{Type: "pattern", Pattern: 1, Color: []string{"#333333"}}
		series = append(series, excelize.ChartSeries{Name: "'" + SheetTimeline + "'!$E$" + strconv.Itoa(head), Categories: ref("A"), Values: ref("E"),
			Marker: excelize.ChartMarker{Symbol: "triangle", Size: 10, Fill: fill}, Fill: fill})
	}
	b.fail(b.f.AddChart(SheetTimeline, "F2", &excelize.Chart{
		Type:   excelize.Line,
		Series: series,
		Title:  excelize.ChartTitle{Paragraph: []excelize.RichTextRun{{Text: b.v.timelineTitle()}}},
		Legend: excelize.ChartLegend{Position: "bottom"},
		// About eight slanted day labels keep the dates legible; programs
		// that ignore the skip show every date, still slanted.
		XAxis:     excelize.ChartAxis{Title: excelize.ChartTitle{Paragraph: []excelize.RichTextRun{{Text: "Day"}}}, TickLabelSkip: max(n/8, 1), Alignment: excelize.Alignment{TextRotation: -45}, Font: axisFont()},
		YAxis:     excelize.ChartAxis{Title: excelize.ChartTitle{Paragraph: []excelize.RichTextRun{{Text: "Count"}}}, MajorGridLines: true, Font: axisFont()},
		Dimension: excelize.ChartDimension{Width: 760, Height: 400},
	}))
}

// scatterName is the literal name of a series of the speed-against-detour
// chart: the edge-days of one period, candidates or not. excelize v2.11.1
// writes a series name only as a cell reference; fixChart turns these
// literal names (scatterNames) into literal series text.
func scatterName(period string, candidate bool) string {
	if candidate {
		return upperFirst(period) + ", candidate edge-day"
	}
	return upperFirst(period) + ", edge-day not a candidate"
}

// scatterPeriods are the period labels a scatter series can carry.
var scatterPeriods = []string{"before", "after", "study"}

// scatterNames lists every literal series name the scatter chart can use.
func scatterNames() []string {
	var names []string
	for _, p := range scatterPeriods {
		names = append(names, scatterName(p, false), scatterName(p, true))
	}
	return names
}

// scatterColour is the marker colour of a scatter series: greys and the
// worse colour before (or in a single study), blues after, so that before
// and after read apart even in print.
func scatterColour(period string, candidate bool) string {
	switch {
	case period == "after" && candidate:
		return "#08519C"
	case period == "after":
		return "#9ECAE1"
	case candidate:
		return lookOf(patterns.Worse).Hex
	}
	return "#999999"
}

// scatterBlock is a run of rows of the Speed v detour sheet that makes one
// chart series: rows from to to (0-based below the header).
type scatterBlock struct {
	period    string
	candidate bool
	from, to  int
}

// scatterChart draws the speed-against-detour chart of the Speed v detour
// sheet, one series per block of rows below the header row head: each
// period's non-candidate and candidate edge-days. Suppressed edge-days
// stay out of the chart.
//
// notes, when the sheet lists only a sample of the non-candidate
// edge-days, go under the title ("before every 5th of 46829 non-candidate
// edge-days"); every candidate edge-day is always listed.
func (b *book) scatterChart(head int, blocks []scatterBlock, notes []string) {
	var series []excelize.ChartSeries
	for _, bl := range blocks {
		r := func(col string) string { return columnRange(SheetScatter, col, head+1+bl.from, head+bl.to) }
		size := 4
		if bl.candidate {
			size = 6
		}
		fill := excelize.Fill{Type: "pattern", Pattern: 1, Color: []string{scatterColour(bl.period, bl.candidate)}}
		series = append(series, excelize.ChartSeries{Name: scatterName(bl.period, bl.candidate), Categories: r("H"), Values: r("G"),
			Marker: excelize.ChartMarker{Symbol: "circle", Size: size, Fill: fill}, Fill: fill})
	}
	if len(series) == 0 {
		return
	}
	title := []excelize.RichTextRun{{Text: "Edge-days: speed against detour"}}
	if len(notes) > 0 {
		title = append(title, excelize.RichTextRun{Text: "\nlisted: all candidates; " + strings.Join(notes, "; "), Font: &excelize.Font{Size: 9}})
	}
	detourAxisMin := 1.0
	b.fail(b.f.AddChart(SheetScatter, "J2", &excelize.Chart{
		Type:   excelize.Scatter,
		Series: series,
		Title:  excelize.ChartTitle{Paragraph: title},
		Legend: excelize.ChartLegend{Position: "bottom"},
		// Detour is at least 1 (a straight line): the axis starts there.
		XAxis:     excelize.ChartAxis{Title: excelize.ChartTitle{Paragraph: []excelize.RichTextRun{{Text: "Detour ratio (travel / straight-line distance)"}}}, Minimum: &detourAxisMin, Font: axisFont()},
		YAxis:     excelize.ChartAxis{Title: excelize.ChartTitle{Paragraph: []excelize.RichTextRun{{Text: "Speed km/h"}}}, MajorGridLines: true, Font: axisFont()},
		Dimension: excelize.ChartDimension{Width: 640, Height: 420},
	}))
}
