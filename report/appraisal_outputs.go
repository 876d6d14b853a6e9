package report

import (
	"fmt"
	"io"
	"time"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"
	"github.com/xuri/excelize/v2"

	"narrows/patterns/appraise"
)

// AppraisalCandidateText is the text that lists a candidate in the
// study's [appraise] candidates key (the user's way as "way/N" when it
// came from a scheme way named so, else its drawn line).
func AppraisalCandidateText(c appraise.Candidate) string {
	return appraise.FormatLine(c.Link)
}

// appraisalHeader are the columns of the Candidates sheet.
var appraisalHeader = []string{"Rank", "Candidate", "Kind", "Length (km)", "Vehicle-km saved per day",
	"Vehicle-hours saved per day", "Share of trips using it", "Detour with it", "Vehicle-hours saved per day per km",
	"Study file text (candidates key)"}

// WriteAppraisalWorkbook writes the appraisal as a workbook with one
// sheet, Candidates: the routed totals, the ranked candidates with their
// figures, the observed saving when known and the cautions. created is the
// fixed creation time (two runs give identical files).
func WriteAppraisalWorkbook(w io.Writer, place string, a *appraise.Appraisal, observed *AppraisalObserved, created time.Time) error {
	f := excelize.NewFile()
	defer f.Close()
	const sheet = "Candidates"
	var err error
	set := func(row, col int, v any) {
		if err != nil {
			return
		}
		var cell string
		if cell, err = excelize.CoordinatesToCellName(col, row); err == nil {
			err = f.SetCellValue(sheet, cell, v)
		}
	}
	if err = f.SetSheetName("Sheet1", sheet); err != nil {
		return fmt.Errorf("report: appraisal workbook: %w", err)
	}
	stamp := created.UTC().Format(time.RFC3339)
	if err = f.SetDocProps(&excelize.DocProperties{Title: "Candidate links for " + place, Creator: "narrows",
		LastModifiedBy: "narrows", Created: stamp, Modified: stamp,
		Description: "Screening estimate; see the cautions on the sheet."}); err != nil {
		return fmt.Errorf("report: appraisal workbook: %w", err)
	}
	set(1, 1, "Candidate links for "+place)
	set(2, 1, fmt.Sprintf("%d trips over %d days, %d routed; routed now %.1f vehicle-km and %.2f vehicle-hours per day at free-flow speeds (observed %.1f vehicle-km, %.2f vehicle-hours); detour %.2f.",
		a.Trips, a.Days, a.Routed, a.RoutedMetres/1000, a.RoutedSeconds/3600, a.ObservedMetres/1000, a.ObservedSeconds/3600, a.Detour))
	for c, h := range appraisalHeader {
		set(4, c+1, h)
	}
	for i, r := range a.Results {
		row := 5 + i
		for c, v := range appraisalRow(i, r) {
			set(row, c+1, v)
		}
	}
	row := 6 + len(a.Results)
	if observed != nil {
		set(row, 1, fmt.Sprintf("Observed after %s opened, on the before period's trips per day: %.1f vehicle-km and %.2f vehicle-hours saved per day.",
			observed.Name, observed.Metres/1000, observed.Seconds/3600))
		row++
	}
	for _, c := range AppraisalCautions {
		set(row, 1, "Note: "+c)
		row++
	}
	if err == nil {
		err = f.SetColWidth(sheet, "B", "B", 26)
	}
	if err != nil {
		return fmt.Errorf("report: appraisal workbook: %w", err)
	}
	buf, err := f.WriteToBuffer()
	if err != nil {
		return fmt.Errorf("report: appraisal workbook: %w", err)
	}
	if err := repack(w, buf.Bytes()); err != nil {
		return fmt.Errorf("report: appraisal workbook: %w", err)
	}
	return nil
}

// appraisalRow is one candidate's cells, in appraisalHeader's order.
func appraisalRow(i int, r appraise.Result) []any {
	kind := "yours"
	if r.Candidate.Generated {
		kind = "generated"
	}
	return []any{i + 1, r.Candidate.Link.Name, kind, roundTo(r.LengthMetres/1000, 3), roundTo(r.VehicleMetresSaved/1000, 1),
		roundTo(r.VehicleSecondsSaved/3600, 2), roundTo(r.ShareUsing, 3), roundTo(r.Detour, 3),
		roundTo(r.SecondsSavedPerMetre*1000/3600, 2), AppraisalCandidateText(r.Candidate)}
}

// WriteAppraisalGeoJSON writes the candidates as a map layer: one line
// feature per candidate with its rank and figures, and the cautions on
// the collection.
func WriteAppraisalGeoJSON(w io.Writer, place string, a *appraise.Appraisal) error {
	fc := geojson.NewFeatureCollection()
	fc.ExtraMembers = geojson.Properties{"title": "Candidate links for " + place, "cautions": AppraisalCautions}
	for i, r := range a.Results {
		line := make(orb.LineString, len(r.Candidate.Link.Line))
		for j, p := range r.Candidate.Link.Line {
			line[j] = roundPoint(p)
		}
		f := geojson.NewFeature(line)
		kind := "yours"
		if r.Candidate.Generated {
			kind = "generated"
		}
		f.Properties = geojson.Properties{
			"rank": i + 1, "name": r.Candidate.Link.Name, "kind": kind, "class": r.Candidate.Link.Class,
			"length_km":                    jsonNumber(r.LengthMetres/1000, 3),
			"vehicle_km_saved_per_day":     jsonNumber(r.VehicleMetresSaved/1000, 1),
			"vehicle_hours_saved_per_day":  jsonNumber(r.VehicleSecondsSaved/3600, 2),
			"share_using":                  jsonNumber(r.ShareUsing, 3),
			"detour_with":                  jsonNumber(r.Detour, 3),
			"vehicle_hours_per_day_per_km": jsonNumber(r.SecondsSavedPerMetre*1000/3600, 2),
			"study_text":                   AppraisalCandidateText(r.Candidate),
		}
		fc.Append(f)
	}
	return encodeGeoJSON(w, fc, "candidates")
}
