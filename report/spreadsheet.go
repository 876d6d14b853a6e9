package report

import (
	"fmt"
	"sort"
	"strconv"
	"strings"
	"unicode/utf8"

	"github.com/xuri/excelize/v2"
)

// This file is a small spreadsheet writer on top of excelize: one cell
// model, sheets written row by row (put, add, para, header, filter,
// finish) or, for the large sheets, through excelize's stream writer
// (streamTable). Both paths take their values from cell.value.

// kind is what a cell holds.
type kind uint8

const (
	kindBlank  kind = iota // no value; a style, if any, still applies
	kindText               // a string cell, never a formula
	kindInt                // a whole number
	kindNumber             // a finite floating-point number
)

// cell is one value to write with its style id (0 for none).
type cell struct {
	kind  kind
	s     string
	n     int64
	x     float64
	style int
}

// textCell is a string cell: text from data never becomes a formula.
func textCell(s string, style int) cell { return cell{kind: kindText, s: s, style: style} }

// intCell is a whole-number cell.
func intCell[T int | int64](n T, style int) cell {
	return cell{kind: kindInt, n: int64(n), style: style}
}

// numCell is a number cell, or a blank one for NaN and infinities, which the
// format cannot hold.
func numCell(x float64, style int) cell {
	if !finite(x) {
		return cell{}
	}
	return cell{kind: kindNumber, x: x, style: style}
}

// yesNo is a yes/no text cell.
func yesNo(b bool, style int) cell {
	if b {
		return textCell("yes", style)
	}
	return textCell("no", style)
}

// value returns the cell's value as excelize takes it, in the cell-by-cell
// and the stream path alike (nil for a blank), and its display width in
// characters, from which column widths follow.
func (c cell) value() (v any, width int) {
	switch c.kind {
	case kindText:
		return c.s, utf8.RuneCountInString(c.s)
	case kindInt:
		return c.n, len(strconv.FormatInt(c.n, 10))
	case kindNumber:
		return c.x, 9
	}
	return nil, 0
}

// book is a workbook being written. It keeps the first error so that
// writing code stays linear.
type book struct {
	f   *excelize.File
	st  styles
	err error
	v   *view
}

func (b *book) fail(err error) {
	if err != nil && b.err == nil {
		b.err = err
	}
}

// sheet writes rows to one sheet cell by cell and remembers column widths.
type sheet struct {
	b        *book
	name     string
	row      int // next row, 1-based
	widths   map[int]int
	maxWidth int // widest column in characters; below 60 means 60
	// headRow and headNames are the table header, whose row height
	// finish sets so that every wrapped header shows in full.
	headRow   int
	headNames []string
	// maxRow and maxCol are the last row and column written (merged
	// cells included), the sheet's dimension that finish declares.
	maxRow, maxCol int
}

func (b *book) newSheet(name string) *sheet {
	if b.err == nil {
		if name == SheetSummary {
			b.fail(b.f.SetSheetName("Sheet1", name))
		} else {
			_, err := b.f.NewSheet(name)
			b.fail(err)
		}
	}
	return &sheet{b: b, name: name, row: 1, widths: map[int]int{}}
}

// put writes c at column col (1-based) of row r.
func (s *sheet) put(col, r int, c cell) {
	b := s.b
	if b.err != nil {
		return
	}
	if r > excelize.TotalRows {
		b.fail(fmt.Errorf("report: sheet %s needs more than %d rows", s.name, excelize.TotalRows))
		return
	}
	ref, err := excelize.CoordinatesToCellName(col, r)
	if err != nil {
		b.fail(err)
		return
	}
	s.maxRow, s.maxCol = max(s.maxRow, r), max(s.maxCol, col)
	v, width := c.value()
	if c.kind == kindText {
		v = escapeHexEscapes(c.s)
	}
	if v != nil {
		b.fail(b.f.SetCellValue(s.name, ref, v))
	}
	if c.style != 0 {
		b.fail(b.f.SetCellStyle(s.name, ref, ref, c.style))
	}
	if width > s.widths[col] {
		s.widths[col] = width
	}
}

// add writes a row of cells from column A and moves to the next row.
func (s *sheet) add(cells ...cell) {
	for i, c := range cells {
		s.put(i+1, s.row, c)
	}
	s.row++
}

// para writes a long text across columns A to lastCol of its own row,
// wrapped, with the row tall enough for it, and moves to the next row.
func (s *sheet) para(text string, lastCol string, charsPerLine int) {
	b := s.b
	r := strconv.Itoa(s.row)
	w := s.widths[1]
	s.put(1, s.row, textCell(text, b.st.wrap))
	s.widths[1] = w // the text wraps across columns: it does not size column A
	if b.err == nil {
		b.fail(b.f.MergeCell(s.name, "A"+r, lastCol+r))
		last, err := excelize.ColumnNameToNumber(lastCol)
		b.fail(err)
		s.maxCol = max(s.maxCol, last)
	}
	lines := (utf8.RuneCountInString(text) + charsPerLine - 1) / max(charsPerLine, 1)
	if b.err == nil && lines > 1 {
		b.fail(b.f.SetRowHeight(s.name, s.row, float64(min(lines, 20))*15+2))
	}
	s.row++
}

// skip leaves n empty rows.
func (s *sheet) skip(n int) { s.row += n }

// tall makes the next row tall enough for lines lines of text.
func (s *sheet) tall(lines int) {
	if lines > 1 && s.b.err == nil {
		s.b.fail(s.b.f.SetRowHeight(s.name, s.row, float64(min(lines, 25))*15+2))
	}
}

// header writes a header row, freezes the rows up to it and returns its
// row number.
func (s *sheet) header(names ...string) int {
	r := s.row
	for i, n := range names {
		prev := s.widths[i+1]
		s.put(i+1, r, textCell(n, s.b.st.header))
		s.widths[i+1] = max(prev, headerWidth(n))
	}
	s.row++
	s.headRow, s.headNames = r, names
	if s.b.err == nil {
		s.b.fail(s.b.f.SetPanes(s.name, &excelize.Panes{Freeze: true, YSplit: r, TopLeftCell: "A" + strconv.Itoa(r+1), ActivePane: "bottomLeft"}))
	}
	return r
}

// filter puts an autofilter on the table whose header is at row head and
// has cols columns.
func (s *sheet) filter(head, cols int) {
	if s.b.err != nil {
		return
	}
	last := max(s.row-1, head)
	end, err := excelize.CoordinatesToCellName(cols, min(last, excelize.TotalRows))
	if err != nil {
		s.b.fail(err)
		return
	}
	s.b.fail(s.b.f.AutoFilter(s.name, "A"+strconv.Itoa(head)+":"+end, nil))
}

// finish sets column widths from the widest value, within limits, makes
// the header row tall enough for its wrapped names and sets the sheet up
// for printing.
func (s *sheet) finish() {
	cols := make([]int, 0, len(s.widths))
	for c := range s.widths {
		cols = append(cols, c)
	}
	sort.Ints(cols)
	final := map[int]int{}
	for _, c := range cols {
		if s.b.err != nil {
			return
		}
		name, err := excelize.ColumnNumberToName(c)
		s.b.fail(err)
		w := colWidth(s.widths[c], max(s.maxWidth, 60))
		final[c] = w
		s.b.fail(s.b.f.SetColWidth(s.name, name, name, float64(w)))
	}
	if s.headRow > 0 && s.b.err == nil {
		lines := 1
		for i, n := range s.headNames {
			lines = max(lines, wrappedLines(n, final[i+1]))
		}
		s.b.fail(s.b.f.SetRowHeight(s.name, s.headRow, headerHeight(lines)))
	}
	s.b.declareDimension(s.name, s.maxCol, s.maxRow)
	s.b.printSetup(s.name, s.headRow)
}

// declareDimension sets the used range a sheet declares, A1 to the last
// column and row written: excelize leaves it at A1 otherwise, and readers
// that trust it (openpyxl in read-only mode) then see one cell.
func (b *book) declareDimension(name string, lastCol, lastRow int) {
	if b.err != nil || lastCol < 1 || lastRow < 1 {
		return
	}
	end, err := excelize.CoordinatesToCellName(lastCol, lastRow)
	if err != nil {
		b.fail(err)
		return
	}
	b.fail(b.f.SetSheetDimension(name, "A1:"+end))
}

// colWidth is the column width for values up to chars characters wide,
// at most limit. Widths count in digit widths of the default font; ids
// such as "18>24+24>18" and names are a little wider than digits, hence
// the tenth added, and three characters of padding (text is indented).
func colWidth(chars, limit int) int { return min(max(chars+chars/10+3, 8), limit) }

// Header cells wrap at word boundaries. A header counts towards its
// column's width only up to about half its length, so that long names take
// two or three short lines rather than one wide column; the header row is
// then made tall enough for the most lines any header needs.
const headerMaxWidth = 16

// headerWidth is the width in characters a header asks of its column.
func headerWidth(name string) int {
	longest := 0
	for _, w := range strings.Fields(name) {
		longest = max(longest, utf8.RuneCountInString(w))
	}
	half := (utf8.RuneCountInString(name) + 1) / 2
	return min(max(longest, half), headerMaxWidth)
}

// wrappedLines counts the lines name takes when wrapped at spaces into a
// column width characters wide. A cell holds about width-1 characters of
// the default font a line (the rest is padding); a word longer than that
// is broken.
func wrappedLines(name string, width int) int {
	perLine := max(width-1, 1)
	lines, used := 1, 0
	for _, w := range strings.Fields(name) {
		n := utf8.RuneCountInString(w)
		switch {
		case used == 0:
			used = n
		case used+1+n <= perLine:
			used += 1 + n
		default:
			lines++
			used = n
		}
		for used > perLine {
			lines++
			used -= perLine
		}
	}
	return lines
}

// headerHeight is the row height in points for lines of bold 11 pt text.
func headerHeight(lines int) float64 { return float64(max(lines, 2))*15 + 2 }

// printSetup makes a sheet print legibly: landscape, one page wide, the
// header row (headRow, 0 for none) repeated on every page.
func (b *book) printSetup(name string, headRow int) {
	if b.err != nil {
		return
	}
	landscape := "landscape"
	wide, tall := 1, 0 // one page wide, as many pages tall as needed
	fit := true
	b.fail(b.f.SetSheetProps(name, &excelize.SheetPropsOptions{FitToPage: &fit}))
	b.fail(b.f.SetPageLayout(name, &excelize.PageLayoutOptions{Orientation: &landscape, FitToWidth: &wide, FitToHeight: &tall}))
	if headRow > 0 && b.err == nil {
		r := strconv.Itoa(headRow)
		b.fail(b.f.SetDefinedName(&excelize.DefinedName{Name: "_xlnm.Print_Titles", RefersTo: "'" + name + "'!$" + r + ":$" + r, Scope: name}))
	}
}

// columnRange is the absolute reference to rows from to to of column col
// of sheet name, as charts take their series: 'Daily'!$C$2:$C$9.
func columnRange(name, col string, from, to int) string {
	return "'" + name + "'!$" + col + "$" + strconv.Itoa(from) + ":$" + col + "$" + strconv.Itoa(to)
}

// streamTable writes a sheet of a header row and rows through excelize's
// stream writer, which is several times faster than cell-by-cell writing
// for the large sheets. Column widths come from the rows (known before
// writing, as the stream writer needs), the header row is frozen and
// filtered, and extra, if not nil, runs after the rows and before the
// sheet is closed, with the header's row number. Rows beyond the format's
// limit are left out and a note says so.
func (b *book) streamTable(name string, header []string, rows [][]cell, extra func(head int)) {
	if b.err != nil {
		return
	}
	if _, err := b.f.NewSheet(name); err != nil {
		b.fail(err)
		return
	}
	// The stream writer takes the sheet's properties and page setup when
	// it is created, so they are set first.
	const head = 1
	b.printSetup(name, head)
	// The stream writer writes the dimension before the rows, so it is
	// declared from the rows to come: the header, the rows and, past the
	// format's limit, the note in the last row (see streamRows).
	b.declareDimension(name, len(header), min(head+len(rows), excelize.TotalRows))
	sw, err := b.f.NewStreamWriter(name)
	if err != nil {
		b.fail(err)
		return
	}
	b.streamHeader(sw, header, rows)
	last := b.streamRows(sw, head, rows)
	if b.err != nil {
		return
	}
	end, _ := excelize.CoordinatesToCellName(len(header), last)
	b.fail(b.f.AutoFilter(name, "A1:"+end, nil))
	if extra != nil && b.err == nil {
		extra(head)
	}
	if b.err == nil {
		b.fail(sw.Flush())
	}
}

// streamHeader sets the column widths of a streamed sheet as sheet.finish
// computes them, freezes the header row and writes it, tall enough for the
// wrapped names.
func (b *book) streamHeader(sw *excelize.StreamWriter, header []string, rows [][]cell) {
	widths := make([]int, len(header))
	for i, h := range header {
		widths[i] = headerWidth(h)
	}
	for _, r := range rows {
		for i, c := range r {
			if i < len(widths) {
				_, w := c.value()
				widths[i] = max(widths[i], w)
			}
		}
	}
	lines := 1
	for i, w := range widths {
		w = colWidth(w, 60)
		lines = max(lines, wrappedLines(header[i], w))
		b.fail(sw.SetColWidth(i+1, i+1, float64(w)))
	}
	b.fail(sw.SetPanes(&excelize.Panes{Freeze: true, YSplit: 1, TopLeftCell: "A2", ActivePane: "bottomLeft"}))
	cells := make([]cell, len(header))
	for i, h := range header {
		cells[i] = textCell(h, b.st.header)
	}
	if b.err == nil {
		b.fail(sw.SetRow("A1", streamValues(cells), excelize.RowOpts{Height: headerHeight(lines)}))
	}
}

// streamRows writes rows below the header row head and returns the last
// row written.
func (b *book) streamRows(sw *excelize.StreamWriter, head int, rows [][]cell) (last int) {
	last = head
	for i, r := range rows {
		if b.err != nil {
			return last
		}
		ref, _ := excelize.CoordinatesToCellName(1, head+1+i)
		if head+1+i > excelize.TotalRows-1 { // keep the last row for the note
			note := textCell(fmt.Sprintf("%d more rows left out: the sheet is full", len(rows)-i), b.st.bold)
			b.fail(sw.SetRow(ref, streamValues([]cell{note})))
			break
		}
		b.fail(sw.SetRow(ref, streamValues(r)))
		last = head + 1 + i
	}
	return last
}

// streamValues converts cells for the stream writer. Strings go in as
// inline strings, which the stream writer escapes itself (including the
// _xHHHH_ sequences), so they are not passed through escapeHexEscapes.
func streamValues(cells []cell) []any {
	values := make([]any, len(cells))
	for i, c := range cells {
		if v, _ := c.value(); v != nil || c.style != 0 {
			values[i] = excelize.Cell{StyleID: c.style, Value: v}
		}
	}
	return values
}
