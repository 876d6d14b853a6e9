package report

import (
	"archive/zip"
	"bytes"
	"fmt"
	"image/png"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"
	"time"
	"unicode/utf8"

	"github.com/xuri/excelize/v2"

	"narrows/patterns"
)

// Sheet names of the workbook, in order. SheetComparison is present only
// with a comparison.
const (
	SheetSummary     = "Summary"
	SheetFindings    = "Weak links"
	SheetEdges       = "Edges"
	SheetComparison  = "Comparison"
	SheetDaily       = "Daily"
	SheetTimeline    = "Timeline"
	SheetScatter     = "Speed v detour"
	SheetRegions     = "Regions"
	SheetDataQuality = "Data quality"
	SheetMethod      = "Method"
)

// Sheets returns the names of the sheets WriteWorkbook writes for in.
func Sheets(in Input) []string {
	s := []string{SheetSummary, SheetFindings, SheetEdges}
	if in.Comparison != nil {
		s = append(s, SheetComparison)
	}
	return append(s, SheetDaily, SheetTimeline, SheetScatter, SheetRegions, SheetDataQuality, SheetMethod)
}

// WriteWorkbook writes the study workbook (see Sheets for its sheets):
// frozen header rows, filters, number formats, native charts of the daily
// timeline and of speed against detour, and a map picture on the summary.
// Text from data is always written as a string cell, never as a formula.
// Values from fewer trips than the publication threshold are replaced by a
// grey marker such as "<10".
func WriteWorkbook(path string, in Input) error {
	v, err := newView(in)
	if err != nil {
		return err
	}
	data, err := v.workbook()
	if err != nil {
		return err
	}
	return writeFileAtomic(path, data)
}

// styles holds the workbook's cell style ids.
type styles struct {
	title, bold, header, text, wrap, integer, intLeft, intCentre, centre, indent, mono, dec1, signed1, signed2, dec2, dec3, p4, sci, pct, supp int
	verdict                                                                                                                                    map[patterns.Verdict]int
}

// cell is one value to write: a string (always a string cell), int,
// float64 (NaN and infinities are left blank), bool (yes/no) or nil.
type cell struct {
	V     any
	Style int
}

// sheet writes rows to one sheet, remembers column widths and keeps the
// first error so that writing code stays linear.
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
}

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
	width := 0
	switch x := c.V.(type) {
	case nil:
	case string:
		b.fail(b.f.SetCellStr(s.name, ref, escapeHexEscapes(x)))
		width = utf8.RuneCountInString(x)
	case int:
		b.fail(b.f.SetCellInt(s.name, ref, int64(x)))
		width = len(strconv.Itoa(x))
	case int64:
		b.fail(b.f.SetCellInt(s.name, ref, x))
		width = len(strconv.FormatInt(x, 10))
	case float64:
		if finite(x) {
			b.fail(b.f.SetCellFloat(s.name, ref, x, -1, 64))
			width = 9
		}
	case bool:
		t := "no"
		if x {
			t = "yes"
		}
		b.fail(b.f.SetCellStr(s.name, ref, t))
		width = 3
	default:
		b.fail(fmt.Errorf("report: sheet %s cell %s: unsupported value type %T", s.name, ref, c.V))
	}
	if c.Style != 0 {
		b.fail(b.f.SetCellStyle(s.name, ref, ref, c.Style))
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

// escapeHexEscapes protects text that contains the workbook format's own
// character escape, _xHHHH_ (for example a road named "_x0041_"): spreadsheet
// readers decode it, so its underscore is itself escaped as _x005F_ and the
// text reads back unchanged. excelize v2.11.1 does not do this itself.
func escapeHexEscapes(s string) string {
	if !strings.Contains(s, "_x") {
		return s
	}
	var b strings.Builder
	for i := 0; i < len(s); i++ {
		if s[i] == '_' && i+6 < len(s) && s[i+1] == 'x' && s[i+6] == '_' && isHex4(s[i+2:i+6]) {
			b.WriteString("_x005F_")
			continue
		}
		b.WriteByte(s[i])
	}
	return b.String()
}

func isHex4(s string) bool {
	for i := 0; i < 4; i++ {
		if _, ok := hexDigit(s[i]); !ok {
			return false
		}
	}
	return true
}

// para writes a long text across columns A to lastCol of its own row,
// wrapped, with the row tall enough for it, and moves to the next row.
func (s *sheet) para(text string, lastCol string, charsPerLine int) {
	b := s.b
	r := strconv.Itoa(s.row)
	w := s.widths[1]
	s.put(1, s.row, cell{text, b.st.wrap})
	s.widths[1] = w // the text wraps across columns: it does not size column A
	if b.err == nil {
		b.fail(b.f.MergeCell(s.name, "A"+r, lastCol+r))
	}
	lines := (utf8.RuneCountInString(text) + charsPerLine - 1) / max(charsPerLine, 1)
	if b.err == nil && lines > 1 {
		b.fail(b.f.SetRowHeight(s.name, s.row, float64(min(lines, 20))*15+2))
	}
	s.row++
}

// skip leaves n empty rows.
func (s *sheet) skip(n int) { s.row += n }

// header writes a header row, freezes the rows up to it and returns its
// row number.
func (s *sheet) header(names ...string) int {
	r := s.row
	for i, n := range names {
		prev := s.widths[i+1]
		s.put(i+1, r, cell{n, s.b.st.header})
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
	s.b.printSetup(s.name, s.headRow)
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

// Cell constructors.
func (b *book) str(s string) cell { return cell{s, b.st.text} }
func (b *book) num(x float64, style int) cell {
	if !finite(x) {
		return cell{}
	}
	return cell{x, style}
}
func (b *book) count(n int) cell { return cell{n, b.st.integer} }

// leftCount is a count in a label-value list, aligned with the text values.
func (b *book) leftCount(n int) cell { return cell{n, b.st.intLeft} }

// pval is a p-value cell: four decimals, or scientific notation below
// 0.0001 so that very small p-values do not read as zero.
func (b *book) pval(p float64) cell {
	if finite(p) && p < 0.0001 {
		return b.num(p, b.st.sci)
	}
	return b.num(p, b.st.p4)
}

// gated returns the value cell, or the suppression marker when the value
// comes from fewer trips than the threshold.
func (b *book) gated(trips, x float64, style int) cell {
	if b.v.suppressed(trips) {
		return cell{b.v.valueMark(), b.st.supp}
	}
	return b.num(x, style)
}

// trips returns a trip count cell, or the count marker.
func (b *book) trips(trips float64) cell {
	if b.v.suppressed(trips) {
		return cell{b.v.countMark(), b.st.supp}
	}
	if trips == math.Trunc(trips) {
		return cell{trips, b.st.integer}
	}
	return b.num(trips, b.st.dec1)
}

func (v *view) workbook() ([]byte, error) {
	f := excelize.NewFile()
	defer f.Close()
	b := &book{f: f, v: v}
	b.newStyles()
	created := v.created().Format(time.RFC3339)
	b.fail(f.SetDocProps(&excelize.DocProperties{
		Title:          v.in.Title,
		Subject:        "Weak links of the road network between regions",
		Creator:        "narrows",
		LastModifiedBy: "narrows",
		Description:    "Screening results; see the Method sheet and the cautions.",
		Created:        created,
		Modified:       created,
		Version:        v.in.Version,
	}))

	b.summary()
	b.findings()
	b.edges()
	if v.comparing() {
		b.comparison()
	}
	b.daily()
	b.timeline()
	b.scatter()
	b.regionsSheet()
	b.quality()
	b.methodSheet()
	if b.err != nil {
		return nil, fmt.Errorf("report: workbook: %w", b.err)
	}
	buf, err := f.WriteToBuffer()
	if err != nil {
		return nil, fmt.Errorf("report: workbook: %w", err)
	}
	data, err := sortContentTypes(buf.Bytes())
	if err != nil {
		return nil, fmt.Errorf("report: workbook: %w", err)
	}
	return data, nil
}

// sortContentTypes makes the package deterministic: excelize v2.11.1 adds
// the image extensions to [Content_Types].xml by ranging over a map, and
// writes stream-written sheets in map order, so without this two writes of
// the same workbook differ. It rewrites [Content_Types].xml with its
// Default elements sorted and puts the parts in descending name order;
// it also repairs the chart parts (see fixChart). Every other part is
// copied unchanged (still compressed).
func sortContentTypes(pkg []byte) ([]byte, error) {
	zr, err := zip.NewReader(bytes.NewReader(pkg), int64(len(pkg)))
	if err != nil {
		return nil, err
	}
	// The stream writer's sheets come first in map order; put every part in
	// the order excelize uses for the others (names descending).
	files := append([]*zip.File(nil), zr.File...)
	sort.SliceStable(files, func(i, j int) bool { return files[i].Name > files[j].Name })
	var out bytes.Buffer
	zw := zip.NewWriter(&out)
	for _, zf := range files {
		if zf.Name != "[Content_Types].xml" && !strings.HasPrefix(zf.Name, "xl/charts/chart") {
			raw, err := zf.OpenRaw()
			if err != nil {
				return nil, err
			}
			w, err := zw.CreateRaw(&zf.FileHeader)
			if err != nil {
				return nil, err
			}
			if _, err := io.Copy(w, raw); err != nil {
				return nil, err
			}
			continue
		}
		rc, err := zf.Open()
		if err != nil {
			return nil, err
		}
		data, err := io.ReadAll(rc)
		rc.Close()
		if err != nil {
			return nil, err
		}
		w, err := zw.CreateHeader(&zip.FileHeader{Name: zf.Name, Method: zip.Deflate})
		if err != nil {
			return nil, err
		}
		if zf.Name == "[Content_Types].xml" {
			data = sortElements(data, "<Default ", "</Default>")
		} else {
			data = fixChart(data)
		}
		if _, err := w.Write(data); err != nil {
			return nil, err
		}
	}
	if err := zw.Close(); err != nil {
		return nil, err
	}
	return out.Bytes(), nil
}

// fixChart repairs two things excelize v2.11.1 writes into chart parts:
// a scatter chart's x values as a string reference, which spreadsheet
// programs then plot as categories 1, 2, 3... instead of the detour ratios;
// and series names only as cell references, so that the literal names of
// the scatter series would show as "Column G" or an error.
func fixChart(data []byte) []byte {
	data = bytes.ReplaceAll(data, []byte("<xVal><strRef>"), []byte("<xVal><numRef>"))
	data = bytes.ReplaceAll(data, []byte("</strRef></xVal>"), []byte("</numRef></xVal>"))
	for _, name := range []string{scatterOthers, scatterCandidates} {
		data = bytes.ReplaceAll(data, []byte("<tx><strRef><f>"+name+"</f></strRef></tx>"), []byte("<tx><v>"+name+"</v></tx>"))
	}
	return data
}

// sortElements sorts the elements that start with open and end with close
// among the positions they occupy in data.
func sortElements(data []byte, open, close string) []byte {
	type span struct{ start, end int }
	var spans []span
	for i := 0; ; {
		s := bytes.Index(data[i:], []byte(open))
		if s < 0 {
			break
		}
		e := bytes.Index(data[i+s:], []byte(close))
		if e < 0 {
			break
		}
		spans = append(spans, span{i + s, i + s + e + len(close)})
		i += s + e + len(close)
	}
	elems := make([]string, len(spans))
	for i, sp := range spans {
		elems[i] = string(data[sp.start:sp.end])
	}
	sort.Strings(elems)
	var b bytes.Buffer
	prev := 0
	for i, sp := range spans {
		b.Write(data[prev:sp.start])
		b.WriteString(elems[i])
		prev = sp.end
	}
	b.Write(data[prev:])
	return b.Bytes()
}

// pictureRowPixels is the height of the rows under the map picture: 20
// pixels, 15 pt.
const pictureRowPixels = 20

// mapScale is the scale of the map picture on the summary sheet: at full
// size its pixel-font region ids stay crisp.
const mapScale = 1.0

// summary writes the first sheet in the order a reader needs it: the
// headline and the cautions, the study's key figures, the verdicts, the map
// (below its caption, so that it shows without scrolling sideways), then
// the input files and settings that make the study reproducible.
func (b *book) summary() {
	v := b.v
	s := b.newSheet(SheetSummary)
	title := v.in.Title
	if title == "" {
		title = "narrows study"
	}
	s.add(cell{title, b.st.title})
	b.fail(b.f.SetRowHeight(s.name, 1, 24)) // room for the 16 pt title
	s.para(Headline(v.in), "D", 90)         // long: kept out of the widths
	s.skip(1)
	s.add(cell{"Cautions", b.st.bold})
	for _, c := range v.cautions() {
		s.para(c, "D", 90)
	}
	s.skip(1)
	kv := func(k string, val cell) { s.add(cell{k, b.st.bold}, val) }
	if v.in.Area != "" {
		kv("Area", b.str(v.in.Area))
	}
	for _, p := range v.periods {
		kv("Period "+p.Label, b.str(dayRange(p.Scan)))
		kv("Analysed days "+p.Label, b.leftCount(len(p.Scan.Days)))
		kv("Weak links "+p.Label, b.leftCount(len(p.Scan.Findings)))
	}
	if w := v.periods[0].Scan.Window; w != "" {
		kv("Time window", b.str(w))
	}
	kv("Regions", b.leftCount(len(v.in.Regions.Regions)))
	kv("Publication threshold (trips)", b.leftCount(v.minTrips))
	if v.in.Version != "" {
		kv("Made by", b.str("narrows "+v.in.Version))
	}
	s.skip(1)
	if v.comparing() {
		s.add(cell{"Verdicts", b.st.bold})
		// Meaning comes last so that its long text runs on to the right
		// instead of being cut off by the next column.
		s.add(cell{"Verdict", b.st.header}, cell{"Weak links", b.st.header}, cell{"In focus area", b.st.header}, cell{"Meaning", b.st.header})
		for _, vd := range v.shownVerdicts() {
			s.add(cell{string(vd), b.st.verdict[vd]}, cell{v.counts[vd], b.st.intCentre}, cell{v.focusCounts[vd], b.st.intCentre}, cell{verdictMeaning(vd), b.st.indent})
		}
		focus := 0
		for _, n := range v.focusCounts {
			focus += n
		}
		s.add(cell{"Total", b.st.bold}, cell{len(v.items), b.st.intCentre}, cell{focus, b.st.intCentre})
		s.skip(1)
	}
	s.add(cell{"Map", b.st.bold})
	s.para(v.mapCaption(), "D", 90)
	picRow := s.row
	pic, err := v.png()
	if err != nil {
		b.fail(err)
		return
	}
	if cfg, err := png.DecodeConfig(bytes.NewReader(pic)); err == nil {
		// Leave room for the picture. The rows it covers get an explicit
		// height: programs differ in their default row height (LibreOffice
		// uses less than 15 pt), and the picture must not cover the input
		// files below it.
		n := int(math.Ceil(float64(cfg.Height)*mapScale/pictureRowPixels)) + 1
		for r := picRow; r < picRow+n && b.err == nil; r++ {
			b.fail(b.f.SetRowHeight(s.name, r, pictureRowPixels*0.75))
		}
		s.skip(n)
	}
	s.add(cell{"Input files", b.st.bold})
	// The long SHA-256 comes last and runs on to the right, so that it
	// does not widen column B for the whole sheet.
	s.add(cell{"File", b.st.header}, cell{"Trip rows", b.st.header}, cell{"SHA-256", b.st.header})
	for _, src := range v.in.Inputs {
		rows := cell{}
		if src.Rows > 0 { // only trip files have rows counted
			rows = cell{src.Rows, b.st.intLeft}
		}
		s.add(b.str(src.Path), rows, cell{src.SHA256, b.st.mono})
	}
	s.skip(1)
	s.add(cell{"Settings", b.st.bold})
	s.add(cell{"Setting", b.st.header}, cell{"Value", b.st.header})
	for _, kv := range v.in.Settings {
		s.add(b.str(kv[0]), b.str(kv[1]))
	}
	// Column B holds short values (dates, counts); longer ones, such as
	// some settings, run on into the empty columns beside them.
	s.widths[1] = min(max(s.widths[1], 30), 40)
	s.widths[2] = max(min(s.widths[2], 24), 12)
	s.widths[3] = max(min(s.widths[3], 14), 10)
	s.widths[4] = 12 // the verdict meanings run on to the right
	s.finish()
	if b.err != nil {
		return
	}
	b.fail(b.f.AddPictureFromBytes(SheetSummary, "A"+strconv.Itoa(picRow), &excelize.Picture{
		Extension: ".png",
		File:      pic,
		// Anchored at one cell, so that its size is its own: excelize
		// computes the far corner of a two-cell anchor with 18 pixels for
		// a 15 pt (20 pixel) row, which stretches the map by a ninth.
		Format: &excelize.GraphicOptions{AltText: "Map of regions and weak links", ScaleX: mapScale, ScaleY: mapScale, OffsetX: 4, OffsetY: 4, Positioning: "oneCell"},
	}))
}

func (b *book) findings() {
	v := b.v
	s := b.newSheet(SheetFindings)
	cols := append(v.rankColumns(), "Weak link", "Regions", "Edges", "Days recurring", "Share of days", "Trips per day", "Speed km/h", "Detour ratio", "Extra km per day", "Extra vehicle-hours per day")
	if v.comparing() {
		cols = append(cols, "Verdict", "Focus")
	}
	head := s.header(cols...)
	for _, it := range v.items {
		f := it.Finding
		t := totals(f)
		edges := make([]string, len(f.Edges))
		for i, e := range f.Edges {
			edges[i] = edgeLabel(e.From, e.To)
		}
		row := append(b.rankCells(it), b.str(f.ID), b.str(joinInts(f.Regions)), b.str(strings.Join(edges, ", ")),
			b.count(len(f.Days)), b.num(f.Share, b.st.pct),
			b.trips(t.Trips), b.gated(t.Trips, kmh(t.Speed), b.st.dec1), b.gated(t.Trips, t.Detour, b.st.dec2),
			b.gated(t.Trips, f.ExtraKMPerDay, b.st.dec1), b.gated(t.Trips, f.ExtraHoursPerDay, b.st.dec2),
		)
		if a := it.Assessment; a != nil {
			row = append(row, cell{string(a.Verdict), b.st.verdict[a.Verdict]}, cell{a.Focus, b.st.centre})
		}
		s.add(row...)
	}
	s.filter(head, len(cols))
	s.finish()
}

func (b *book) edges() {
	v := b.v
	s := b.newSheet(SheetEdges)
	cols := append(v.rankColumns(), "Weak link", "From", "To", "Trips per day", "Speed km/h", "Detour ratio", "Extra km per day", "Extra vehicle-hours per day", "Days with trips")
	if v.comparing() {
		cols = append(cols, "Verdict")
	}
	head := s.header(cols...)
	for _, it := range v.items {
		for _, e := range it.Finding.Edges {
			row := append(b.rankCells(it), b.str(it.Finding.ID), b.count(e.From), b.count(e.To),
				b.trips(e.TripsMedian), b.gated(e.TripsMedian, kmh(e.SpeedMedian), b.st.dec1), b.gated(e.TripsMedian, e.DetourMedian, b.st.dec2),
				b.gated(e.TripsMedian, e.ExtraKMPerDay, b.st.dec1), b.gated(e.TripsMedian, e.ExtraHoursPerDay, b.st.dec2), b.count(len(e.Daily)),
			)
			if vd := it.Verdict(); v.comparing() {
				row = append(row, cell{string(vd), b.st.verdict[vd]})
			}
			s.add(row...)
		}
	}
	s.filter(head, len(cols))
	s.finish()
}

func (b *book) comparison() {
	v := b.v
	s := b.newSheet(SheetComparison)
	cols := append(v.rankColumns(), "Weak link", "Verdict", "Focus", "Days recurring before", "Days analysed before", "Share before",
		"Days recurring after", "Days analysed after", "Share after", "Fisher p", "Fisher p adjusted",
		"Speed before km/h", "Speed after km/h", "Speed shift km/h", "Speed shift CI low km/h", "Speed shift CI high km/h", "Speed p", "Speed p adjusted",
		"Detour ratio before", "Detour ratio after", "Detour ratio shift", "Detour ratio shift CI low", "Detour ratio shift CI high", "Detour p", "Detour p adjusted", "Reason")
	head := s.header(cols...)
	share := func(days, total int) cell {
		if total <= 0 {
			return cell{}
		}
		return b.num(float64(days)/float64(total), b.st.pct)
	}
	for _, it := range v.items {
		a := it.Assessment
		t := totals(a.Finding)
		sp, dt := a.Speed, a.Detour
		g := func(x float64, style int) cell { return b.gated(t.Trips, x, style) }
		// The reason wraps in its column; the row is made tall enough.
		s.tall(wrappedLines(Reason(a), reasonWidth*9/10))
		s.add(append(b.rankCells(it), b.str(a.Finding.ID), cell{string(a.Verdict), b.st.verdict[a.Verdict]}, cell{a.Focus, b.st.centre},
			b.count(a.DaysBefore), b.count(a.TotalBefore), share(a.DaysBefore, a.TotalBefore),
			b.count(a.DaysAfter), b.count(a.TotalAfter), share(a.DaysAfter, a.TotalAfter),
			b.pval(a.FisherP), b.pval(a.FisherPAdjusted),
			g(kmh(median(sp.Before)), b.st.dec1), g(kmh(median(sp.After)), b.st.dec1),
			g(kmh(sp.Shift), b.st.signed1), g(kmh(sp.Low), b.st.signed1), g(kmh(sp.High), b.st.signed1), b.pval(sp.P), b.pval(sp.PAdjusted),
			g(median(dt.Before), b.st.dec2), g(median(dt.After), b.st.dec2),
			g(dt.Shift, b.st.signed2), g(dt.Low, b.st.signed2), g(dt.High, b.st.signed2), b.pval(dt.P), b.pval(dt.PAdjusted),
			cell{Reason(a), b.st.wrap},
		)...)
	}
	s.filter(head, len(cols))
	s.widths[len(cols)], s.maxWidth = reasonWidth, reasonWidth
	s.finish()
}

// reasonWidth is the width in characters of the Comparison sheet's Reason
// column, whose text wraps.
const reasonWidth = 60

// rankColumns are the leading columns that identify a finding's rank. In
// a comparison each period ranks its own findings, so rank 1 occurs twice
// and the period it belongs to is shown beside it.
func (v *view) rankColumns() []string {
	if v.comparing() {
		return []string{"Rank in period", "Ranked in"}
	}
	return []string{"Rank"}
}

// rankCells are the cells of rankColumns for it.
func (b *book) rankCells(it item) []cell {
	r := []cell{{it.Finding.Rank, b.st.intCentre}}
	if a := it.Assessment; a != nil {
		p := "before"
		if !a.InBefore {
			p = "after"
		}
		r = append(r, cell{p, b.st.centre})
	}
	return r
}

// median of xs (NaN when empty), without changing xs.
func median(xs []float64) float64 {
	if len(xs) == 0 {
		return math.NaN()
	}
	s := append([]float64(nil), xs...)
	sort.Float64s(s)
	n := len(s)
	if n%2 == 1 {
		return s[n/2]
	}
	return (s[n/2-1] + s[n/2]) / 2
}

// recurredDays returns the days on which the finding with id recurred in
// scan sc, or nil when it did not recur there.
func recurredDays(sc *patterns.Scan, id string) map[string]bool {
	for _, f := range sc.Findings {
		if f.ID == id {
			m := make(map[string]bool, len(f.Days))
			for _, d := range f.Days {
				m[d] = true
			}
			return m
		}
	}
	return nil
}

func (b *book) daily() {
	v := b.v
	cols := []string{"Rank", "Weak link", "Period", "Day", "From", "To", "Trips", "Speed km/h", "Detour ratio", "Extra km", "Candidate", "Weak link recurred"}
	var rows [][]cell
	for _, it := range v.items {
		for _, p := range v.periods {
			rec := recurredDays(p.Scan, it.Finding.ID)
			for _, e := range it.Finding.Edges {
				for _, d := range dailyOf(p, it, patterns.EdgeKey{From: e.From, To: e.To}) {
					tr := float64(d.Trips)
					rows = append(rows, []cell{
						{it.Finding.Rank, b.st.intCentre}, b.str(it.Finding.ID), b.str(p.Label), b.str(d.Day), b.count(e.From), b.count(e.To),
						b.trips(tr), b.gated(tr, kmh(d.Speed), b.st.dec1), b.gated(tr, d.Detour, b.st.dec2),
						b.gated(tr, (d.DistanceSum-d.StraightSum)/1000, b.st.dec1), {d.Candidate, b.st.centre}, {rec[d.Day], b.st.centre},
					})
				}
			}
		}
	}
	b.streamTable(SheetDaily, cols, rows, nil)
}

func (b *book) timeline() {
	v := b.v
	s := b.newSheet(SheetTimeline)
	cols := []string{"Day", "Period", "Candidates", "Weak links recurring"}
	head := s.header(cols...)
	type day struct {
		day, period      string
		cands, recurring int
	}
	var days []day
	for _, p := range v.periods {
		on := map[string]int{}
		for _, f := range p.Scan.Findings {
			for _, d := range f.Days {
				on[d]++
			}
		}
		for i, d := range p.Scan.Days {
			c := 0
			if i < len(p.Scan.CandidatesPerDay) {
				c = p.Scan.CandidatesPerDay[i]
			} else if i < len(p.Scan.DayCandidates) {
				c = len(p.Scan.DayCandidates[i])
			}
			days = append(days, day{d, p.Label, c, on[d]})
		}
	}
	sort.SliceStable(days, func(i, j int) bool { return days[i].day < days[j].day })
	for _, d := range days {
		s.add(b.str(d.day), b.str(d.period), b.count(d.cands), b.count(d.recurring))
	}
	s.filter(head, len(cols))
	s.finish()
	if b.err != nil || len(days) == 0 {
		return
	}
	last := strconv.Itoa(head + len(days))
	ref := func(col string) string {
		return "'" + SheetTimeline + "'!$" + col + "$" + strconv.Itoa(head+1) + ":$" + col + "$" + last
	}
	b.fail(b.f.AddChart(SheetTimeline, "F2", &excelize.Chart{
		Type: excelize.Line,
		Series: []excelize.ChartSeries{
			{Name: "'" + SheetTimeline + "'!$C$" + strconv.Itoa(head), Categories: ref("A"), Values: ref("C"), Line: excelize.LineOptions{Width: 1.5}},
			{Name: "'" + SheetTimeline + "'!$D$" + strconv.Itoa(head), Categories: ref("A"), Values: ref("D"), Line: excelize.LineOptions{Width: 2.25}},
		},
		Title:  excelize.ChartTitle{Paragraph: []excelize.RichTextRun{{Text: v.timelineTitle()}}},
		Legend: excelize.ChartLegend{Position: "bottom"},
		// About eight slanted day labels keep the dates legible; programs
		// that ignore the skip show every date, still slanted.
		XAxis:     excelize.ChartAxis{Title: excelize.ChartTitle{Paragraph: []excelize.RichTextRun{{Text: "Day"}}}, TickLabelSkip: max(len(days)/8, 1), Alignment: excelize.Alignment{TextRotation: -45}, Font: axisFont},
		YAxis:     excelize.ChartAxis{Title: excelize.ChartTitle{Paragraph: []excelize.RichTextRun{{Text: "Count"}}}, MajorGridLines: true, Font: axisFont},
		Dimension: excelize.ChartDimension{Width: 760, Height: 400},
	}))
}

// Series names of the speed-against-detour chart. excelize v2.11.1 writes
// a series name only as a cell reference; fixCharts turns these literal
// names into literal series text.
const (
	scatterOthers     = "Edge-day, not a candidate"
	scatterCandidates = "Candidate edge-day"
)

// axisFont is the font of chart axis labels: excelize's default light grey
// is hard to read on a projector.
var axisFont = excelize.Font{Color: "#333333", Size: 9}

func (b *book) scatter() {
	v := b.v
	cols := []string{"Candidate", "Period", "Day", "From", "To", "Trips", "Speed km/h", "Detour ratio"}
	type point struct {
		period int
		key    patterns.EdgeKey
		d      patterns.DailyValue
	}
	var pts []point
	for pi, p := range v.periods {
		for _, k := range sortedEdgeKeys(p.Scan.EdgeDaily) {
			for _, d := range p.Scan.EdgeDaily[k] {
				pts = append(pts, point{pi, k, d})
			}
		}
	}
	// Shown non-candidates first, then shown candidates, so that each chart
	// series is one block of rows; suppressed edge-days come last and stay
	// out of the chart (their cells hold markers, not numbers).
	block := func(pt point) int {
		switch {
		case v.suppressed(float64(pt.d.Trips)):
			return 2
		case pt.d.Candidate:
			return 1
		}
		return 0
	}
	sort.SliceStable(pts, func(i, j int) bool { return block(pts[i]) < block(pts[j]) })
	firstCand, firstSupp := len(pts), len(pts)
	rows := make([][]cell, len(pts))
	for i, pt := range pts {
		if k := block(pt); k >= 1 && firstCand == len(pts) {
			firstCand = i
		}
		if block(pt) == 2 && firstSupp == len(pts) {
			firstSupp = i
		}
		tr := float64(pt.d.Trips)
		rows[i] = []cell{{pt.d.Candidate, b.st.centre}, b.str(v.periods[pt.period].Label), b.str(pt.d.Day), b.count(pt.key.From), b.count(pt.key.To),
			b.trips(tr), b.gated(tr, kmh(pt.d.Speed), b.st.dec1), b.gated(tr, pt.d.Detour, b.st.dec2)}
	}
	detourAxisMin := 1.0
	b.streamTable(SheetScatter, cols, rows, func(head int) {
		if len(pts) == 0 || head+len(pts) > excelize.TotalRows {
			return
		}
		seriesOf := func(name, colour string, size, from, to int) excelize.ChartSeries {
			r := func(col string) string {
				return "'" + SheetScatter + "'!$" + col + "$" + strconv.Itoa(head+1+from) + ":$" + col + "$" + strconv.Itoa(head+to)
			}
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
		b.fail(b.f.AddChart(SheetScatter, "J2", &excelize.Chart{
			Type:   excelize.Scatter,
			Series: series,
			Title:  excelize.ChartTitle{Paragraph: []excelize.RichTextRun{{Text: "Edge-days: speed against detour"}}},
			Legend: excelize.ChartLegend{Position: "bottom"},
			// Detour is at least 1 (a straight line): the axis starts there.
			XAxis:     excelize.ChartAxis{Title: excelize.ChartTitle{Paragraph: []excelize.RichTextRun{{Text: "Detour ratio (travel / straight-line distance)"}}}, Minimum: &detourAxisMin, Font: axisFont},
			YAxis:     excelize.ChartAxis{Title: excelize.ChartTitle{Paragraph: []excelize.RichTextRun{{Text: "Speed km/h"}}}, MajorGridLines: true, Font: axisFont},
			Dimension: excelize.ChartDimension{Width: 640, Height: 420},
		}))
	})
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
	sw, err := b.f.NewStreamWriter(name)
	if err != nil {
		b.fail(err)
		return
	}
	// Widths as sheet.finish computes them.
	widths := make([]int, len(header))
	for i, h := range header {
		widths[i] = headerWidth(h)
	}
	for _, r := range rows {
		for i, c := range r {
			if i < len(widths) {
				widths[i] = max(widths[i], cellWidth(c))
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
	values := make([]any, len(header))
	for i, h := range header {
		values[i] = excelize.Cell{StyleID: b.st.header, Value: h}
	}
	if b.err == nil {
		b.fail(sw.SetRow("A1", values, excelize.RowOpts{Height: headerHeight(lines)}))
	}
	last := head
	for i, r := range rows {
		if b.err != nil {
			return
		}
		if head+1+i > excelize.TotalRows-1 { // keep the last row for the note
			ref, _ := excelize.CoordinatesToCellName(1, head+1+i)
			b.fail(sw.SetRow(ref, []any{excelize.Cell{StyleID: b.st.bold, Value: fmt.Sprintf("%d more rows left out: the sheet is full", len(rows)-i)}}))
			break
		}
		values := make([]any, len(r))
		for j, c := range r {
			values[j] = streamValue(c)
		}
		ref, _ := excelize.CoordinatesToCellName(1, head+1+i)
		b.fail(sw.SetRow(ref, values))
		last = head + 1 + i
	}
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

// streamValue converts a cell for the stream writer. Strings go in as
// inline strings, which the stream writer escapes itself (including the
// _xHHHH_ sequences), so they are not passed through escapeHexEscapes.
func streamValue(c cell) any {
	switch x := c.V.(type) {
	case nil:
		if c.Style == 0 {
			return nil
		}
		return excelize.Cell{StyleID: c.Style}
	case float64:
		if !finite(x) {
			return nil
		}
	case bool:
		t := "no"
		if x {
			t = "yes"
		}
		return excelize.Cell{StyleID: c.Style, Value: t}
	}
	return excelize.Cell{StyleID: c.Style, Value: c.V}
}

// cellWidth is the display width of a cell's value in characters.
func cellWidth(c cell) int {
	switch x := c.V.(type) {
	case string:
		return utf8.RuneCountInString(x)
	case int:
		return len(strconv.Itoa(x))
	case float64:
		if finite(x) {
			return 9
		}
	case bool:
		return 3
	}
	return 0
}

func (b *book) regionsSheet() {
	v := b.v
	s := b.newSheet(SheetRegions)
	cols := []string{"Region", "Area km2", "Perimeter km", "Border roads", "Border road lengths km", "Neighbours", "Weak links", "In focus"}
	head := s.header(cols...)
	touching := map[int]int{}
	for _, it := range v.items {
		for _, id := range it.Finding.Regions {
			touching[id]++
		}
	}
	for _, r := range v.in.Regions.Regions {
		names := make([]string, len(r.BorderRoads))
		lengths := make([]string, len(r.BorderRoads))
		for i, br := range r.BorderRoads {
			names[i] = br.Name
			lengths[i] = strconv.FormatFloat(roundTo(br.LengthKM, 2), 'f', 2, 64)
		}
		nb := make([]int, len(r.Neighbours))
		for i, n := range r.Neighbours {
			nb[i] = n.ID
		}
		s.add(b.count(r.ID), b.num(r.AreaKM2, b.st.dec3), b.num(r.PerimeterKM, b.st.dec2), b.str(strings.Join(names, "; ")),
			b.str(strings.Join(lengths, "; ")), b.str(joinInts(nb)), b.count(touching[r.ID]), cell{v.focus[r.ID], b.st.centre})
	}
	s.filter(head, len(cols))
	s.widths[4] = min(s.widths[4], 50)
	s.finish()
}

func (b *book) quality() {
	v := b.v
	s := b.newSheet(SheetDataQuality)
	head := s.header("Item", "Value", "Note")
	m := v.in.Store
	if m == nil {
		s.add(b.str("Day-graph store"), b.str("not given"), b.str("no data quality figures available"))
	} else {
		q := m.Quality
		var rejected int64
		reasons := make([]string, 0, len(q.Rejected))
		for r, n := range q.Rejected {
			reasons = append(reasons, r)
			rejected += n
		}
		sort.Strings(reasons)
		s.add(b.str("Rows read"), cell{q.Read, b.st.integer}, b.str("every row of the trip files"))
		s.add(b.str("Rows used"), cell{q.Used, b.st.integer}, cell{})
		for _, r := range reasons {
			s.add(b.str("Rows rejected: "+r), cell{q.Rejected[r], b.st.integer}, cell{})
		}
		s.add(b.str("Rows rejected, total"), cell{rejected, b.st.integer}, cell{})
		s.add(b.str("Read = used + rejected"), cell{q.Read == q.Used+rejected, 0}, b.str("every row is accounted for"))
		s.add(b.str("Time zone"), b.str(m.TimeZone), cell{})
		for _, w := range m.Windows {
			s.add(b.str("Time window "+w.Name), b.str(clock(w.StartMinute)+" to "+clock(w.EndMinute)), cell{})
		}
		s.add(b.str("Regions SHA-256"), b.str(m.RegionsSHA256), b.str("of the regions the day graphs were built on"))
		for _, src := range m.Sources {
			s.add(b.str("Trip file "+src.Path), cell{src.Rows, b.st.integer}, b.str("SHA-256 "+src.SHA256))
		}
	}
	if p := v.in.Regions; p != nil {
		if p.Source != "" {
			s.add(b.str("Regions built from"), b.str(p.Source), cell{})
		}
		for _, w := range p.Warnings {
			s.add(b.str("Regions warning"), b.str(w), cell{})
		}
	}
	s.filter(head, 3)
	s.widths[1] = min(s.widths[1], 40)
	s.widths[2] = min(s.widths[2], 40)
	s.finish()
}

func clock(minute int) string {
	return fmt.Sprintf("%02d:%02d", minute/60, minute%60)
}

func (b *book) methodSheet() {
	v := b.v
	s := b.newSheet(SheetMethod)
	head := s.header("Term", "Definition")
	add := func(term, text string) {
		// Programs do not all grow a row for wrapped text on opening, so
		// the row gets the height of its lines.
		s.tall(wrappedLines(text, methodWidth*9/10))
		s.add(cell{term, b.st.bold}, cell{text, b.st.wrap})
	}
	for _, d := range v.method() {
		add(d.Term, d.Text)
	}
	for _, c := range v.cautions() {
		add("Caution", c)
	}
	s.filter(head, 2)
	s.widths[1] = min(s.widths[1], 28)
	s.widths[2], s.maxWidth = methodWidth-3, methodWidth
	s.finish()
}

// methodWidth is the width of the Method sheet's definition column.
const methodWidth = 100

// tall makes the next row tall enough for lines lines of text.
func (s *sheet) tall(lines int) {
	if lines > 1 && s.b.err == nil {
		s.b.fail(s.b.f.SetRowHeight(s.name, s.row, float64(min(lines, 25))*15+2))
	}
}
