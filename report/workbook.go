package report

import (
	"fmt"
	"io"
	"time"

	"github.com/xuri/excelize/v2"
)

// Sheet names of the workbook, in order. SheetComparison and
// SheetComparisonDetail are present only with a comparison.
const (
	SheetSummary    = "Summary"
	SheetFindings   = "Weak links"
	SheetEdges      = "Edges"
	SheetComparison = "Comparison"
	// SheetComparisonDetail holds the Comparison sheet's statistics per
	// measure, so that the Comparison sheet itself prints legibly.
	SheetComparisonDetail = "Comparison detail"
	SheetDaily            = "Daily"
	SheetTimeline         = "Timeline"
	SheetScatter          = "Speed v detour"
	SheetRegions          = "Regions"
	SheetDataQuality      = "Data quality"
	SheetInputs           = "Inputs"
	SheetMethod           = "Method"
)

// Sheets returns the names of the sheets WriteWorkbook writes for in.
func Sheets(in Input) []string {
	s := []string{SheetSummary, SheetFindings, SheetEdges}
	if in.Comparison != nil {
		s = append(s, SheetComparison, SheetComparisonDetail, SheetComparisonGroups)
	}
	s = append(s, SheetDaily, SheetTimeline, SheetScatter, SheetCostDays)
	if in.Appraisal != nil {
		s = append(s, SheetCandidates)
	}
	return append(s, SheetRegions, SheetDataQuality, SheetInputs, SheetMethod)
}

// WriteWorkbook writes the study workbook (.xlsx; see Sheets for its
// sheets) to w: frozen header rows, filters, number formats, native charts
// of the daily timeline and of speed against detour, and a map picture on
// the summary. Text from data is always written as a string cell, never as
// a formula. Values from fewer trips than the publication threshold are
// replaced by a grey marker such as "<10". Nothing is written to w when in
// is not valid.
func WriteWorkbook(w io.Writer, in Input) error {
	return render(w, in, (*view).workbook)
}

// workbook writes the sheets, each in its own file, and packs the workbook
// into w.
func (v *view) workbook(w io.Writer) error {
	f := excelize.NewFile()
	defer f.Close()
	f.SetZipWriter(newZipWriter)
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

	// The Speed v detour sheet's rows, most of the workbook's cells, are
	// made while the sheets before it are written.
	scatter := make(chan scatterTable, 1)
	go func() { scatter <- b.scatterRows() }()
	b.summary()
	b.findings()
	b.edges()
	if v.comparing() {
		b.comparison()
		b.comparisonGroups()
	}
	b.daily()
	b.timeline()
	b.scatter(<-scatter)
	b.costDays()
	if v.in.Appraisal != nil {
		b.candidatesSheet(v.in.Appraisal)
	}
	b.regionsSheet()
	b.quality()
	b.inputsSheet()
	b.methodSheet()
	if b.err != nil {
		return fmt.Errorf("report: workbook: %w", b.err)
	}
	buf, err := f.WriteToBuffer()
	if err != nil {
		return fmt.Errorf("report: workbook: %w", err)
	}
	if err := repack(w, buf.Bytes()); err != nil {
		return fmt.Errorf("report: workbook: %w", err)
	}
	return nil
}
