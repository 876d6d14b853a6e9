package report

import (
	"bytes"
	"image"
	"image/color"
	"image/png"
	"math"
	"reflect"
	"strconv"
	"strings"
	"testing"

	"github.com/xuri/excelize/v2"
)

// tableSheets are the sheets that hold one table with its header in row 1.
var tableSheets = []string{SheetFindings, SheetEdges, SheetComparison, SheetComparisonDetail, SheetDaily, SheetTimeline, SheetScatter, SheetRegions, SheetDataQuality, SheetMethod}

// TestHeadersNameUnits checks that every header of a speed or detour
// column says its unit: km/h for speeds, "ratio" for detours (a ratio of
// distances); p-value columns are unitless.
func TestHeadersNameUnits(t *testing.T) {
	for _, in := range []Input{fxInput(), fxScanInput()} {
		f, _ := writeBook(t, in)
		for _, sh := range f.GetSheetList() {
			if sh == SheetSummary || sh == SheetMethod {
				continue
			}
			rows, err := f.GetRows(sh)
			if err != nil || len(rows) == 0 {
				t.Fatalf("%s: %v", sh, err)
			}
			for _, h := range rows[0] {
				pvalue := strings.HasSuffix(h, " p") || strings.HasSuffix(h, " p adjusted")
				switch {
				case pvalue:
				case strings.Contains(h, "Speed") && !strings.Contains(h, "km/h"):
					t.Errorf("%s header %q lacks km/h", sh, h)
				case strings.HasPrefix(h, "Detour") && !strings.HasPrefix(h, "Detour ratio"):
					t.Errorf("%s header %q does not say it is a ratio", sh, h)
				}
			}
		}
	}
}

// TestHeaderRowsShowInFull checks, for every table, that the header row is
// tall enough for each header wrapped into its column, and that no word of
// a header is wider than its column.
func TestHeaderRowsShowInFull(t *testing.T) {
	f, _ := writeBook(t, fxInput())
	for _, sh := range tableSheets {
		rows, err := f.GetRows(sh)
		if err != nil || len(rows) == 0 {
			t.Fatalf("%s: %v", sh, err)
		}
		height, err := f.GetRowHeight(sh, 1)
		if err != nil {
			t.Fatal(err)
		}
		for i, h := range rows[0] {
			col, _ := excelize.ColumnNumberToName(i + 1)
			width, err := f.GetColWidth(sh, col)
			if err != nil {
				t.Fatal(err)
			}
			if need := float64(wrappedLines(h, int(width))) * 15; height < need { // 15 pt a line of 11 pt text
				t.Errorf("%s header %q in a column %.0f wide needs %.0f pt, row is %.0f", sh, h, width, need, height)
			}
			for _, w := range strings.Fields(h) {
				if float64(len([]rune(w))) > width-1 {
					t.Errorf("%s header word %q is wider than its column (%.0f)", sh, w, width)
				}
			}
		}
	}
}

func TestWrappedLines(t *testing.T) {
	tests := []struct {
		text  string
		width int
		want  int
	}{
		// A column width w holds w-1 characters a line; worked by hand.
		{"Rank", 8, 1},
		{"Speed km/h", 12, 1},                  // 10 characters in 11
		{"Speed km/h", 10, 2},                  // "Speed" / "km/h"
		{"Extra vehicle-hours per day", 17, 3}, // "Extra" / "vehicle-hours" / "per day"
		{"Extra vehicle-hours per day", 21, 2}, // "Extra vehicle-hours" / "per day"
		{"Extra vehicle-hours per day", 28, 1}, // 27 characters in 27
		{"Days recurring before", 10, 3},       // "Days" / "recurring" / "before"
		{"Supercalifragilistic", 8, 3},         // 20 characters broken 7, 7, 6
		{"", 10, 1},
	}
	for _, tc := range tests {
		if got := wrappedLines(tc.text, tc.width); got != tc.want {
			t.Errorf("wrappedLines(%q, %d) = %d, want %d", tc.text, tc.width, got, tc.want)
		}
	}
}

func TestHeaderWidth(t *testing.T) {
	tests := []struct {
		name string
		want int
	}{
		{"Rank", 4},                         // one word: its length
		{"Days recurring before", 11},       // half of 21, rounded up
		{"Weak link", 5},                    // half of 9
		{"Extra vehicle-hours per day", 14}, // half of 27
		{"Detour ratio shift CI high", 13},
		{"Supercalifragilisticexpialidocious", headerMaxWidth}, // capped
	}
	for _, tc := range tests {
		if got := headerWidth(tc.name); got != tc.want {
			t.Errorf("headerWidth(%q) = %d, want %d", tc.name, got, tc.want)
		}
	}
}

// TestSummaryOrder checks the one-page summary: the headline in one
// sentence within the first rows, the cautions, the weak links' table, and
// the map picture in column A below the table, no wider than the columns
// it spans, with the verdicts beside it from column D; the input files
// are on their own sheet.
func TestSummaryOrder(t *testing.T) {
	in := fxInput()
	f, _ := writeBook(t, in)
	rows, err := f.GetRows(SheetSummary)
	if err != nil {
		t.Fatal(err)
	}
	find := func(col int, prefix string) int {
		for i, r := range rows {
			if len(r) > col && strings.HasPrefix(r[col], prefix) {
				return i + 1
			}
		}
		t.Fatalf("summary has no cell in column %d starting %q", col+1, prefix)
		return 0
	}
	headline := find(0, Headline(in))
	if headline != 2 || strings.Count(Headline(in), ". ") > 0 {
		t.Errorf("headline at row %d (%q), want one sentence in row 2", headline, Headline(in))
	}
	cautions, table, verdicts := find(0, "Cautions: "), find(1, "Place"), find(3, "Verdict")
	if !(headline < cautions && cautions < table && table < verdicts) {
		t.Errorf("summary order: headline %d, cautions %d, table %d, verdicts %d; want them in that order", headline, cautions, table, verdicts)
	}
	for _, r := range rows {
		if len(r) > 0 && r[0] == "Input files" {
			t.Error("the input files are on the summary; want them on the Inputs sheet")
		}
	}
	pics, err := f.GetPictureCells(SheetSummary)
	if err != nil || len(pics) != 1 {
		t.Fatalf("summary pictures at %v (%v), want one", pics, err)
	}
	col, picRow, err := excelize.CellNameToCoordinates(pics[0])
	if err != nil {
		t.Fatal(err)
	}
	if col != 1 || picRow != verdicts {
		t.Errorf("map picture at %s, want A%d (beside the verdicts)", pics[0], verdicts)
	}
	pic, err := f.GetPictures(SheetSummary, pics[0])
	if err != nil || len(pic) != 1 {
		t.Fatal(err)
	}
	var px float64 // width of columns A to C in pixels, 7 a character and 5 of padding
	for _, c := range []string{"A", "B", "C"} {
		w, err := f.GetColWidth(SheetSummary, c)
		if err != nil {
			t.Fatal(err)
		}
		px += 7*w + 5
	}
	cfg, err := png.DecodeConfig(bytes.NewReader(pic[0].File))
	if err != nil {
		t.Fatal(err)
	}
	if w := float64(cfg.Width) * pic[0].Format.ScaleX; w > px {
		t.Errorf("map picture %.0f px wide, columns A to C %.0f px", w, px)
	}
	// The rows under the picture hold nothing in columns A to C, and the
	// print area reaches below the picture.
	need, pt, r := float64(cfg.Height)*pic[0].Format.ScaleY*0.75, 0.0, picRow
	for ; pt < need && r < picRow+200; r++ {
		h, err := f.GetRowHeight(SheetSummary, r)
		if err != nil {
			t.Fatal(err)
		}
		pt += h
		if r <= len(rows) {
			for c, v := range rows[r-1] {
				if c < 3 && v != "" {
					t.Errorf("row %d under the map picture holds %q", r, v)
				}
			}
		}
	}
	var area string
	for _, dn := range f.GetDefinedName() {
		if dn.Name == "_xlnm.Print_Area" && dn.Scope == SheetSummary {
			area = dn.RefersTo
		}
	}
	i := strings.LastIndex(area, "$F$")
	end, err := strconv.Atoi(area[i+3:])
	if i < 0 || err != nil || end < r-1 {
		t.Errorf("summary print area %q, want it to end in column F at row %d or below, under the picture", area, r-1)
	}
}

// TestPrintSetup checks that every sheet prints landscape, one page wide,
// and that table sheets repeat their header row on each page.
func TestPrintSetup(t *testing.T) {
	f, _ := writeBook(t, fxInput())
	titles := map[string]string{}
	for _, dn := range f.GetDefinedName() {
		if dn.Name == "_xlnm.Print_Titles" {
			titles[dn.Scope] = dn.RefersTo
		}
	}
	for _, sh := range f.GetSheetList() {
		pl, err := f.GetPageLayout(sh)
		if err != nil {
			t.Fatal(err)
		}
		if pl.Orientation == nil || *pl.Orientation != "landscape" || pl.FitToWidth == nil || *pl.FitToWidth != 1 {
			t.Errorf("%s page layout = %+v, want landscape one page wide", sh, pl)
		}
		props, err := f.GetSheetProps(sh)
		if err != nil {
			t.Fatal(err)
		}
		if props.FitToPage == nil || !*props.FitToPage {
			t.Errorf("%s does not fit to page", sh)
		}
	}
	for _, sh := range tableSheets {
		if want := "'" + sh + "'!$1:$1"; titles[sh] != want {
			t.Errorf("%s print titles = %q, want %q", sh, titles[sh], want)
		}
	}
}

// TestStylesNameTheFont checks that every font of the workbook names its
// family and size: without them LibreOffice shows those cells in a
// different (serif) face.
func TestStylesNameTheFont(t *testing.T) {
	_, pkg := writeBook(t, fxInput())
	styles := string(zipEntries(t, pkg)["xl/styles.xml"])
	start, end := strings.Index(styles, "<fonts"), strings.Index(styles, "</fonts>")
	if start < 0 || end < start {
		t.Fatal("styles have no font list")
	}
	fonts := strings.Split(styles[start:end], "<font>")[1:]
	if len(fonts) < 3 {
		t.Fatalf("styles have %d fonts, want several", len(fonts))
	}
	body := 0
	for i, ft := range fonts {
		if strings.Contains(ft, `<name val="`+fontFamily+`"`) {
			body++
		}
		if !strings.Contains(ft, `<name val="`) || !strings.Contains(ft, "<sz val=") {
			t.Errorf("font %d lacks family or size: %s", i, ft)
		}
	}
	if body < len(fonts)-1 { // all but the one for the SHA-256 digests
		t.Errorf("%d of %d fonts are %s, want all but one", body, len(fonts), fontFamily)
	}
}

func TestGlyphsDistinct(t *testing.T) {
	seen := map[[glyphH]uint8]rune{}
	for r, g := range glyphs {
		if other, dup := seen[g]; dup {
			t.Errorf("glyphs %q and %q are identical", r, other)
		}
		seen[g] = r
		for row, bits := range g {
			if bits >= 1<<glyphW {
				t.Errorf("glyph %q row %d is wider than %d pixels", r, row, glyphW)
			}
		}
	}
	for _, r := range "0123456789-" {
		if _, ok := glyphs[r]; !ok {
			t.Errorf("no glyph for %q", r)
		}
	}
}

func TestDrawRegionLabel(t *testing.T) {
	ink := color.RGBA{85, 85, 85, 255}
	tests := []struct {
		id    int
		chars int
	}{{7, 1}, {42, 2}, {-3, 2}, {1234, 4}}
	for _, tc := range tests {
		img := image.NewRGBA(image.Rect(0, 0, 60, 30))
		drawRegionLabel(img, tc.id, 30, 10, ink)
		// Oracle: the ink pixels are exactly the glyph pixels, placed from
		// the centre outwards.
		want := map[image.Point]bool{}
		w := tc.chars*(glyphW+glyphGap) - glyphGap
		for _, p := range labelPixels(strconv.Itoa(tc.id), int(math.Floor(30-float64(w)/2)), 14) {
			want[p] = true
		}
		got, white := 0, 0
		for y := 0; y < 30; y++ {
			for x := 0; x < 60; x++ {
				c := img.RGBAAt(x, y)
				switch {
				case c == ink:
					got++
					if !want[image.Pt(x, y)] {
						t.Errorf("id %d: ink at %d,%d outside the glyphs", tc.id, x, y)
					}
				case c == color.RGBA{255, 255, 255, 255}:
					white++
				}
			}
		}
		if got != len(want) || got == 0 {
			t.Errorf("id %d: %d ink pixels, want %d", tc.id, got, len(want))
		}
		if white == 0 {
			t.Errorf("id %d: no halo drawn", tc.id)
		}
	}
	// Off the picture: nothing drawn, no panic.
	img := image.NewRGBA(image.Rect(0, 0, 10, 10))
	drawRegionLabel(img, 99, -1e9, math.NaN(), ink)
	drawRegionLabel(img, 99, 1e18, 5, ink)
}

// TestMapPictureHasRegionIDs checks that the workbook's map picture carries
// the region ids: every region gets a placed label, and the label colour
// appears inside each label's box.
func TestMapPictureHasRegionIDs(t *testing.T) {
	in := fxInput()
	v, err := newView(in)
	if err != nil {
		t.Fatal(err)
	}
	data, err := v.png()
	if err != nil {
		t.Fatal(err)
	}
	img, err := png.Decode(bytes.NewReader(data))
	if err != nil {
		t.Fatal(err)
	}
	boxes := map[int]labelBox{}
	for _, l := range v.mapLabels(v.projection()) {
		if l.Kind == labelRegion {
			boxes[l.Region] = l.Box
		}
	}
	for _, r := range in.Regions.Regions {
		bx, ok := boxes[r.ID]
		if !ok {
			t.Errorf("region %d has no label", r.ID)
			continue
		}
		ink := 0
		for y := int(bx.Y); y <= int(bx.Y+bx.H); y++ {
			for x := int(bx.X); x <= int(bx.X+bx.W); x++ {
				if c := color.RGBAModel.Convert(img.At(x, y)).(color.RGBA); c == (color.RGBA{68, 68, 68, 255}) {
					ink++
				}
			}
		}
		if ink < 5 {
			t.Errorf("region %d: %d label pixels in its box %v, want its id drawn", r.ID, ink, bx)
		}
	}
}

// TestHTMLOrder checks that the page puts the cautions right after the
// headline, before the verdicts and the map, that the map has its caption,
// and that in a comparison each rank names its period.
func TestHTMLOrder(t *testing.T) {
	for _, tc := range []struct {
		name string
		in   Input
	}{{"comparison", fxInput()}, {"scan", fxScanInput()}} {
		t.Run(tc.name, func(t *testing.T) {
			v, err := newView(tc.in)
			if err != nil {
				t.Fatal(err)
			}
			s := string(renderHTML(t, v))
			at := func(sub string) int {
				i := strings.Index(s, sub)
				if i < 0 {
					t.Fatalf("page lacks %q", sub)
				}
				return i
			}
			headline, cautions, mapAt, findings := at(`class="headline"`), at(`id="cautions"`), at("<h2>Map</h2>"), at(`id="findings"`)
			if !(headline < cautions && cautions < mapAt && mapAt < findings) {
				t.Errorf("page order: headline %d, cautions %d, map %d, weak links %d", headline, cautions, mapAt, findings)
			}
			if tc.in.Comparison != nil && cautions > at(`id="verdicts"`) {
				t.Error("the cautions come after the verdict table")
			}
			if !strings.Contains(s, "from its origin region to its destination region") {
				t.Error("the map lacks its caption")
			}
			comparing := tc.in.Comparison != nil
			if got := strings.Contains(s, "<th>Rank (period)</th>"); got != comparing {
				t.Errorf("rank header names the period: %v, want %v", got, comparing)
			}
			if comparing && !strings.Contains(s, "1 (before)</td>") {
				t.Error("no rank cell names its period")
			}
			if !strings.Contains(s, "<th>Detour ratio") && !strings.Contains(s, "detour ratio before, after") {
				t.Error("the detour header does not say it is a ratio")
			}
			// The weak links' table keeps to its key columns (it must read
			// at 1400 px); the reason and details fold away beneath each row.
			table := s[findings:]
			table = table[:strings.Index(table, "</tr>")]
			if n := strings.Count(table, "<th>"); comparing && n > 7 {
				t.Errorf("the weak links' table has %d columns, want at most 7", n)
			}
			if comparing && strings.Count(s, `<details class="reason">`) != len(tc.in.Comparison.Assessments) {
				t.Errorf("%d reasons folded away, want one per weak link (%d)", strings.Count(s, `<details class="reason">`), len(tc.in.Comparison.Assessments))
			}
			// The summary of the weak links comes before the cautions.
			if sum := strings.Index(s, `id="summary"`); sum < 0 || sum > cautions {
				t.Errorf("the summary table is at %d, want it before the cautions (%d)", sum, cautions)
			}
		})
	}
}

func TestFmtInterval(t *testing.T) {
	tests := []struct {
		x, lo, hi     float64
		d             int
		shift, within string
	}{
		{2.06, 1.78, 2.31, 1, "+2.1", "(1.8 to 2.3)"},
		{-0.0177, -0.87, 0.73, 1, "0.0", "(-0.9 to 0.7)"}, // no "+0.0" nor "-0.0"
		{-2.39, -2.42, -2.35, 2, "-2.39", "(-2.42 to -2.35)"},
		{0.5, math.NaN(), 1, 1, "+0.5", ""},
		{math.NaN(), 0, 1, 1, "n/a", ""},
	}
	for _, tc := range tests {
		shift, within := fmtInterval(tc.x, tc.lo, tc.hi, tc.d)
		if shift != tc.shift || within != tc.within {
			t.Errorf("fmtInterval(%v, %v, %v, %d) = %q, %q; want %q, %q", tc.x, tc.lo, tc.hi, tc.d, shift, within, tc.shift, tc.within)
		}
	}
}

// TestComparisonColumns: the Comparison sheet holds the key columns a
// reader needs, in reading order, and prints one page wide with its header
// repeated; the Comparison detail sheet holds every other column once,
// keyed by rank, place and weak link.
func TestComparisonColumns(t *testing.T) {
	f, _ := writeBook(t, fxInput())
	header := func(sheet string) []string {
		rows, err := f.GetRows(sheet)
		if err != nil || len(rows) == 0 {
			t.Fatalf("%s: %v", sheet, err)
		}
		return rows[0]
	}
	key := header(SheetComparison)
	want := []string{"Rank in period", "Ranked in", "Place", "Weak link", "Verdict",
		"Cost before veh-h/day", "Cost before CI low", "Cost before CI high", "Cost after veh-h/day", "Cost after CI low", "Cost after CI high",
		"Cost adjusted change", "Cost adjusted CI low", "Cost adjusted CI high", "Reason"}
	if !reflect.DeepEqual(key, want) {
		t.Errorf("%s columns\n%q\nwant\n%q", SheetComparison, key, want)
	}
	detail := header(SheetComparisonDetail)
	if !reflect.DeepEqual(detail[:4], want[:4]) {
		t.Errorf("%s starts with %q, want the keys %q", SheetComparisonDetail, detail[:4], want[:4])
	}
	seen := map[string]int{}
	for _, c := range append(key[4:], detail[4:]...) {
		seen[c]++
	}
	for c, n := range seen {
		if n > 1 {
			t.Errorf("column %q is on both sheets", c)
		}
	}
	// Every statistic per measure is still in the workbook.
	for _, c := range []string{"Decided by", "Focus", "Cost raw change", "Comparison group change", "Cost p adjusted", "Travel time before min",
		"Travel time adjusted CI high", "Speed before km/h", "Detour ratio after", "Days with trips after", "Comparison pairs", "Fisher p adjusted"} {
		if seen[c] != 1 {
			t.Errorf("column %q is on neither comparison sheet", c)
		}
	}
	titles := map[string]string{}
	for _, dn := range f.GetDefinedName() {
		if dn.Name == "_xlnm.Print_Titles" {
			titles[dn.Scope] = dn.RefersTo
		}
	}
	for _, sh := range []string{SheetComparison, SheetComparisonDetail} {
		pl, err := f.GetPageLayout(sh)
		if err != nil {
			t.Fatal(err)
		}
		if pl.Orientation == nil || *pl.Orientation != "landscape" || pl.FitToWidth == nil || *pl.FitToWidth != 1 || pl.FitToHeight == nil || *pl.FitToHeight != 0 {
			t.Errorf("%s page layout %+v, want landscape, one page wide, as tall as needed", sh, pl)
		}
		if want := "'" + sh + "'!$1:$1"; titles[sh] != want {
			t.Errorf("%s print titles %q, want %q", sh, titles[sh], want)
		}
	}
}
