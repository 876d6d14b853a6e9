package report

import (
	"bytes"
	"image/png"
	"math"
	"strconv"

	"github.com/xuri/excelize/v2"
)

// pictureRowPixels is the height of the rows beside the map picture: 20
// pixels, 15 pt.
const pictureRowPixels = 20

// The summary is one printed landscape page: the title, the headline in
// one sentence, the network's change, the scheme, the periods and the
// cautions across the top; then the weak links with their verdict and cost
// before and after; under them the map on the left (columns A to C) and
// the verdict counts and key figures on the right (D to F). The widths
// are fixed so that the page's layout does not depend on the data.
var summaryWidths = [...]int{11, 64, 10, 18, 18, 30}

// summaryMapCols is how many columns, from A, the map picture spans.
const summaryMapCols = 3

// summaryMapHeight is the most pixels the map picture is high on the
// summary: with the rows above it, the page is then about as wide as a
// landscape page is high, so that printed on one page the text stays
// about 10 pt.
const summaryMapHeight = 420

// summaryMapScale is the scale of the map picture that makes it as wide
// as the columns it spans (a column of w characters is 7w+5 pixels wide
// in the default font) and at most summaryMapHeight high.
func summaryMapScale(width, height int) float64 {
	px := 0
	for _, w := range summaryWidths[:summaryMapCols] {
		px += 7*w + 5
	}
	return min(1, float64(px-8)/float64(max(width, 1)), summaryMapHeight/float64(max(height, 1)))
}

// summary writes the first sheet.
func (b *book) summary() {
	s := b.newSheet(SheetSummary)
	last := string(rune('A' + len(summaryWidths) - 1))
	b.summaryHeadline(s, last)
	b.summaryTable(s)
	picRow := s.row
	pic, width, height, ok := b.mapPicture()
	if !ok {
		return
	}
	scale := summaryMapScale(width, height)
	// The rows beside the picture get an explicit height: programs differ
	// in their default row height (LibreOffice uses less than 15 pt), and
	// the printed page must hold the whole picture.
	bottom := picRow + int(math.Ceil(float64(height)*scale/pictureRowPixels))
	for r := picRow; r <= bottom && b.err == nil; r++ {
		b.fail(b.f.SetRowHeight(s.name, r, pictureRowPixels*0.75))
	}
	if b.v.comparing() {
		b.verdictCounts(s)
	}
	b.keyFigures(s)
	s.row = max(s.row, bottom+1)
	for i, w := range summaryWidths {
		s.widths[i+1] = w
	}
	s.finish()
	for i, w := range summaryWidths { // finish pads widths; the page needs them exact
		name, _ := excelize.ColumnNumberToName(i + 1)
		b.fail(b.f.SetColWidth(s.name, name, name, float64(w)))
	}
	// One page: the layout above is made to fill it at a legible scale.
	one := 1
	b.fail(b.f.SetPageLayout(s.name, &excelize.PageLayoutOptions{FitToHeight: &one}))
	if b.err != nil {
		return
	}
	b.fail(b.f.AddPictureFromBytes(SheetSummary, "A"+strconv.Itoa(picRow), &excelize.Picture{
		Extension: ".png",
		File:      pic,
		// Anchored at one cell, so that its size is its own: excelize
		// computes the far corner of a two-cell anchor with 18 pixels for
		// a 15 pt (20 pixel) row, which stretches the map by a ninth.
		Format: &excelize.GraphicOptions{AltText: "Map of regions and weak links", ScaleX: scale, ScaleY: scale, OffsetX: 4, OffsetY: 4, Positioning: "oneCell"},
	}))
	b.fail(b.f.SetDefinedName(&excelize.DefinedName{Name: "_xlnm.Print_Area", RefersTo: "'" + SheetSummary + "'!$A$1:$" + last + "$" + strconv.Itoa(s.row), Scope: SheetSummary}))
}

// summaryHeadline writes the title, the headline, the network's change,
// the scheme, the periods and the cautions, each across columns A to last.
func (b *book) summaryHeadline(s *sheet, last string) {
	v := b.v
	title := v.in.Title
	if title == "" {
		title = "narrows study"
	}
	s.add(textCell(title, b.st.title))
	b.fail(b.f.SetRowHeight(s.name, 1, 24)) // room for the 16 pt title
	s.para(Headline(v.in), last, summaryChars)
	if n := NetworkChange(v.in); n != "" {
		s.para(n, last, summaryChars)
	}
	if sch := v.schemeLine(); sch != "" {
		s.para("Scheme: "+sch+".", last, summaryChars)
	}
	var ps string
	for i, p := range v.periods {
		if i > 0 {
			ps += "; "
		}
		ps += p.Label + " " + dayRange(p.Scan) + " (" + strconv.Itoa(len(p.Scan.Days)) + " analysed " + plural(len(p.Scan.Days), "day", "days") + ")"
	}
	s.para("Periods: "+ps+".", last, summaryChars)
	s.para("Cautions: "+Caution+" See the Method sheet.", last, summaryChars)
	s.skip(1)
}

// summaryChars is about how many characters of 11 pt text a line across
// the summary's table holds.
const summaryChars = 150

// summaryTable writes the weak links with their verdict and cost before
// and after (each with its 95 % interval) and the adjusted change.
func (b *book) summaryTable(s *sheet) {
	v := b.v
	cols := v.summaryColumns()
	r := s.row
	for i, n := range cols {
		s.put(i+1, r, textCell(n, b.st.header))
	}
	b.fail(b.f.SetRowHeight(s.name, r, headerHeight(2)))
	s.row++
	rows, verdicts, more := v.summaryRows()
	for k, row := range rows {
		cells := make([]cell, len(row))
		for i, t := range row {
			cells[i] = textCell(t, b.st.wrapRight)
		}
		cells[0] = textCell(row[0], b.st.centre)
		cells[1] = textCell(row[1], b.st.wrap)
		if v.comparing() {
			cells[2] = textCell(row[2], b.st.verdict[verdicts[k]])
		}
		s.tall(wrappedLines(row[1], summaryWidths[1]))
		s.add(cells...)
	}
	if len(rows) == 0 {
		s.add(b.str("No weak link recurred."))
	}
	if more > 0 {
		s.add(b.str("and " + strconv.Itoa(more) + " more on the " + SheetFindings + " sheet"))
	}
	s.skip(1)
}

// keyFigures writes the study's key figures as label-value pairs.
func (b *book) keyFigures(s *sheet) {
	v := b.v
	kv := func(k string, val cell) { b.besideMap(s, b.bold(k), cell{}, val) }
	if v.in.Area != "" {
		kv("Area", b.str(v.in.Area))
	}
	for _, p := range v.periods {
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
	kv("Inputs and settings", b.str("on the "+SheetInputs+" sheet"))
}

// verdictCounts writes the table of verdicts with their counts, overall
// and in the focus area, beside the map.
func (b *book) verdictCounts(s *sheet) {
	v := b.v
	b.besideMap(s, b.head("Verdict"), b.head("Weak links (in focus area)"), b.head("Meaning"))
	b.fail(b.f.SetRowHeight(s.name, s.row-1, headerHeight(2)))
	focus := 0
	for _, vd := range v.shownVerdicts() {
		b.besideMap(s, textCell(string(vd), b.st.verdict[vd]), textCell(strconv.Itoa(v.counts[vd])+" ("+strconv.Itoa(v.focusCounts[vd])+")", b.st.centre), textCell(verdictShort(vd), b.st.wrap))
		focus += v.focusCounts[vd]
	}
	b.besideMap(s, b.bold("Total"), textCell(strconv.Itoa(len(v.items))+" ("+strconv.Itoa(focus)+")", b.st.centre))
	s.skip(1)
}

// besideMap writes a row of cells from column D, right of the map.
func (b *book) besideMap(s *sheet, cells ...cell) {
	for i, c := range cells {
		s.put(summaryMapCols+1+i, s.row, c)
	}
	s.row++
}

// mapPicture draws the map picture and returns it with its size in
// pixels. It reports false when the picture cannot be drawn.
func (b *book) mapPicture() (pic []byte, width, height int, ok bool) {
	pic, err := b.v.png()
	if err != nil {
		b.fail(err)
		return nil, 0, 0, false
	}
	cfg, err := png.DecodeConfig(bytes.NewReader(pic))
	if err != nil {
		b.fail(err)
		return nil, 0, 0, false
	}
	return pic, cfg.Width, cfg.Height, true
}

// inputsSheet writes the input files with their SHA-256, the study's
// settings and how to read the map.
func (b *book) inputsSheet() {
	s := b.newSheet(SheetInputs)
	s.add(b.bold("Input files"))
	// The long SHA-256 comes last and runs on to the right, so that it
	// does not widen column B for the whole sheet.
	s.add(b.head("File"), b.head("Trip rows"), b.head("SHA-256"))
	for _, src := range b.v.in.Inputs {
		rows := cell{}
		if src.Rows > 0 { // only trip files have rows counted
			rows = intCell(src.Rows, b.st.intLeft)
		}
		s.add(b.str(src.Path), rows, textCell(src.SHA256, b.st.mono))
	}
	s.skip(1)
	s.add(b.bold("Settings"))
	s.add(b.head("Setting"), b.head("Value"))
	for _, kv := range b.v.in.Settings {
		s.add(b.str(kv[0]), b.str(kv[1]))
	}
	s.skip(1)
	s.add(b.bold("Map"))
	s.para(b.v.mapCaption(), "D", 90)
	s.widths[1] = min(max(s.widths[1], 30), 40)
	s.widths[2] = max(min(s.widths[2], 24), 12)
	s.finish()
}
