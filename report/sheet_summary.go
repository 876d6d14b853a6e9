package report

import (
	"bytes"
	"image/png"
	"math"
	"strconv"

	"github.com/xuri/excelize/v2"
)

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
	s := b.newSheet(SheetSummary)
	b.summaryHeadline(s)
	b.keyFigures(s)
	if b.v.comparing() {
		b.verdictCounts(s)
	}
	picRow, pic, ok := b.mapSpace(s)
	if !ok {
		return
	}
	b.inputsAndSettings(s)
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

// summaryHeadline writes the title, the headline and the cautions.
func (b *book) summaryHeadline(s *sheet) {
	title := b.v.in.Title
	if title == "" {
		title = "narrows study"
	}
	s.add(textCell(title, b.st.title))
	b.fail(b.f.SetRowHeight(s.name, 1, 24)) // room for the 16 pt title
	s.para(Headline(b.v.in), "D", 90)       // long: kept out of the widths
	s.skip(1)
	s.add(b.bold("Cautions"))
	for _, c := range b.v.cautions() {
		s.para(c, "D", 90)
	}
	s.skip(1)
}

// keyFigures writes the study's key figures as label-value pairs.
func (b *book) keyFigures(s *sheet) {
	v := b.v
	kv := func(k string, val cell) { s.add(b.bold(k), val) }
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
}

// verdictCounts writes the table of verdicts with their counts, overall
// and in the focus area.
func (b *book) verdictCounts(s *sheet) {
	v := b.v
	s.add(b.bold("Verdicts"))
	// Meaning comes last so that its long text runs on to the right
	// instead of being cut off by the next column.
	s.add(b.head("Verdict"), b.head("Weak links"), b.head("In focus area"), b.head("Meaning"))
	for _, vd := range v.shownVerdicts() {
		s.add(textCell(string(vd), b.st.verdict[vd]), intCell(v.counts[vd], b.st.intCentre), intCell(v.focusCounts[vd], b.st.intCentre), textCell(verdictMeaning(vd), b.st.indent))
	}
	focus := 0
	for _, n := range v.focusCounts {
		focus += n
	}
	s.add(b.bold("Total"), intCell(len(v.items), b.st.intCentre), intCell(focus, b.st.intCentre))
	s.skip(1)
}

// mapSpace writes the map's caption and leaves rows for the map picture,
// which is returned with its row; summary places it once the columns have
// their widths. It reports false when the picture cannot be drawn.
func (b *book) mapSpace(s *sheet) (picRow int, pic []byte, ok bool) {
	s.add(b.bold("Map"))
	s.para(b.v.mapCaption(), "D", 90)
	picRow = s.row
	pic, err := b.v.png()
	if err != nil {
		b.fail(err)
		return 0, nil, false
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
	return picRow, pic, true
}

// inputsAndSettings writes the input files with their SHA-256 and the
// study's settings.
func (b *book) inputsAndSettings(s *sheet) {
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
}
