package report

import (
	"math"

	"github.com/xuri/excelize/v2"

	"narrows/patterns"
)

// styles holds the workbook's cell style ids.
type styles struct {
	title, bold, header, text, wrap, wrapRight, integer, intLeft, intCentre, centre, indent, mono, dec1, signed1, signed2, dec2, dec3, p4, sci, pct, supp int
	verdict                                                                                                                                               map[patterns.Verdict]int
}

// newStyles creates the workbook's styles, one per verdict present as well.
func (b *book) newStyles() {
	f := b.f
	mk := func(st *excelize.Style) int {
		if b.err != nil {
			return 0
		}
		// Everything aligns to the top, so that the cells of a row whose
		// text wraps (the reasons, the method) line up.
		if st.Alignment == nil {
			st.Alignment = &excelize.Alignment{}
		}
		if st.Alignment.Vertical == "" {
			st.Alignment.Vertical = "top"
		}
		id, err := f.NewStyle(st)
		b.fail(err)
		return id
	}
	custom := func(format string) *excelize.Style { return &excelize.Style{CustomNumFmt: &format} }
	b.st = styles{
		title:     mk(&excelize.Style{Font: font(true, 16, "")}),
		bold:      mk(&excelize.Style{Font: font(true, 0, "")}),
		header:    mk(&excelize.Style{Font: font(true, 0, ""), Fill: excelize.Fill{Type: "pattern", Pattern: 1, Color: []string{"#DDDDDD"}}, Alignment: &excelize.Alignment{WrapText: true, Vertical: "top", Horizontal: "center"}, Border: []excelize.Border{{Type: "bottom", Color: "#888888", Style: 1}}}),
		text:      mk(&excelize.Style{NumFmt: 49, Alignment: &excelize.Alignment{Indent: 1}}), // "@": text, set off from a number to its left
		wrap:      mk(&excelize.Style{NumFmt: 49, Alignment: &excelize.Alignment{WrapText: true, Vertical: "top", Horizontal: "left"}}),
		wrapRight: mk(&excelize.Style{NumFmt: 49, Alignment: &excelize.Alignment{WrapText: true, Vertical: "top", Horizontal: "right"}}),
		integer:   mk(&excelize.Style{NumFmt: 1}),
		intLeft:   mk(&excelize.Style{NumFmt: 1, Alignment: &excelize.Alignment{Horizontal: "left"}}),
		intCentre: mk(&excelize.Style{NumFmt: 1, Alignment: &excelize.Alignment{Horizontal: "center"}}),
		indent:    mk(&excelize.Style{NumFmt: 49, Alignment: &excelize.Alignment{Indent: 1}}),
		dec1:      mk(custom("0.0")),
		dec2:      mk(&excelize.Style{NumFmt: 2}),
		dec3:      mk(custom("0.000")),
		// Shifts carry their sign, so that the direction of change reads
		// at a glance.
		signed1: mk(custom("+0.0;-0.0;0.0")),
		signed2: mk(custom("+0.00;-0.00;0.00")),
		centre:  mk(&excelize.Style{NumFmt: 49, Alignment: &excelize.Alignment{Horizontal: "center"}}),
		mono:    mk(&excelize.Style{NumFmt: 49, Font: &excelize.Font{Family: "Consolas", Size: 10}}),
		p4:      mk(custom("0.0000")),
		sci:     mk(&excelize.Style{NumFmt: 11}), // 0.00E+00
		pct:     mk(custom("0.0%")),
		supp:    mk(&excelize.Style{NumFmt: 49, Font: &excelize.Font{Family: fontFamily, Size: fontSize, Color: "#808080", Italic: true}, Alignment: &excelize.Alignment{Horizontal: "right"}}),
		verdict: map[patterns.Verdict]int{},
	}
	for _, vd := range append(append([]patterns.Verdict{""}, verdictOrder[:]...), b.v.verdicts...) {
		if _, done := b.st.verdict[vd]; done {
			continue
		}
		lk := lookOf(vd)
		b.st.verdict[vd] = mk(&excelize.Style{NumFmt: 49, Alignment: &excelize.Alignment{Horizontal: "center"}, Fill: excelize.Fill{Type: "pattern", Pattern: 1, Color: []string{lk.Hex}}, Font: font(false, 0, lk.Text)})
	}
}

// The workbook's font. Styles name it explicitly: a style font without a
// family makes LibreOffice fall back to a serif face for those cells only.
const (
	fontFamily = "Calibri"
	fontSize   = 11
)

// font is the workbook font, bold or not, at size points (0 for the
// default size) in colour ("" for automatic).
func font(bold bool, size float64, colour string) *excelize.Font {
	if size == 0 {
		size = fontSize
	}
	return &excelize.Font{Family: fontFamily, Size: size, Bold: bold, Color: colour}
}

// Cells in the workbook's styles.

// str is a text cell from data, indented.
func (b *book) str(s string) cell { return textCell(s, b.st.text) }

// bold is a label.
func (b *book) bold(s string) cell { return textCell(s, b.st.bold) }

// head is a table header cell above a list that is not a filtered table.
func (b *book) head(s string) cell { return textCell(s, b.st.header) }

// count is a count in a table column.
func (b *book) count(n int) cell { return intCell(n, b.st.integer) }

// leftCount is a count in a label-value list, aligned with the text values.
func (b *book) leftCount(n int) cell { return intCell(n, b.st.intLeft) }

// pval is a p-value cell: four decimals, or scientific notation below
// 0.0001 so that very small p-values do not read as zero.
func (b *book) pval(p float64) cell {
	if finite(p) && p < 0.0001 {
		return numCell(p, b.st.sci)
	}
	return numCell(p, b.st.p4)
}

// gated returns the value cell, or the suppression marker when the value
// comes from fewer trips than the threshold.
func (b *book) gated(trips, x float64, style int) cell {
	if b.v.suppressed(trips) {
		return textCell(b.v.valueMark(), b.st.supp)
	}
	return numCell(x, style)
}

// trips returns a trip count cell, or the count marker.
func (b *book) trips(trips float64) cell {
	if b.v.suppressed(trips) {
		return textCell(b.v.countMark(), b.st.supp)
	}
	if trips == math.Trunc(trips) {
		return numCell(trips, b.st.integer)
	}
	return numCell(trips, b.st.dec1)
}

// measures are the cells of a finding's or an edge's median trips per
// day, speed, detour, extra km and extra vehicle-hours per day, each
// suppressed below the publication threshold.
func (b *book) measures(trips, speed, detour, extraKM, extraHours float64) []cell {
	return []cell{b.trips(trips), b.gated(trips, kmh(speed), b.st.dec1), b.gated(trips, detour, b.st.dec2),
		b.gated(trips, extraKM, b.st.dec1), b.gated(trips, extraHours, b.st.dec2)}
}
