package report

import (
	"strconv"

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

// Series names of the speed-against-detour chart. excelize v2.11.1 writes
// a series name only as a cell reference; fixChart turns these literal
// names into literal series text.
const (
	scatterOthers     = "Edge-day, not a candidate"
	scatterCandidates = "Candidate edge-day"
)

// scatterChart draws the speed-against-detour chart of the Speed v detour
// sheet, whose rows below the header row head hold the shown
// non-candidates, then from firstCand the shown candidates, then from
// firstSupp the suppressed edge-days, which stay out of the chart.
func (b *book) scatterChart(head, firstCand, firstSupp int) {
	seriesOf := func(name, colour string, size, from, to int) excelize.ChartSeries {
		r := func(col string) string { return columnRange(SheetScatter, col, head+1+from, head+to) }
		fill := excelize.Fill{Type: "pattern", Pattern: 1, Color: []string{colour}}
		return excelize.ChartSeries{Name: name, Categories: r("H"), Values: r("G"),
			Marker: excelize.ChartMarker{Symbol: "circle", Size: size, Fill: fill}, Fill: fill}
	}
	var series []excelize.ChartSeries
	if firstCand > 0 {
		series = append(series, seriesOf(scatterOthers, "#999999", 4, 0, firstCand))
	}
	if firstCand < firstSupp {
		series = append(series, seriesOf(scatterCandidates, lookOf(patterns.Worse).Hex, 6, firstCand, firstSupp))
	}
	if len(series) == 0 {
		return
	}
	detourAxisMin := 1.0
	b.fail(b.f.AddChart(SheetScatter, "J2", &excelize.Chart{
		Type:   excelize.Scatter,
		Series: series,
		Title:  excelize.ChartTitle{Paragraph: []excelize.RichTextRun{{Text: "Edge-days: speed against detour"}}},
		Legend: excelize.ChartLegend{Position: "bottom"},
		// Detour is at least 1 (a straight line): the axis starts there.
		XAxis:     excelize.ChartAxis{Title: excelize.ChartTitle{Paragraph: []excelize.RichTextRun{{Text: "Detour ratio (travel / straight-line distance)"}}}, Minimum: &detourAxisMin, Font: axisFont()},
		YAxis:     excelize.ChartAxis{Title: excelize.ChartTitle{Paragraph: []excelize.RichTextRun{{Text: "Speed km/h"}}}, MajorGridLines: true, Font: axisFont()},
		Dimension: excelize.ChartDimension{Width: 640, Height: 420},
	}))
}
