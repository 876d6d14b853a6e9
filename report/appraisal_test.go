package report

import (
	"bytes"
	"strings"
	"testing"
	"time"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"
	"github.com/xuri/excelize/v2"

	"narrows/partition/route"
	"narrows/patterns/appraise"
)

// fxAppraisal is an appraisal of two candidates for the fixture's first
// weak link: the best saves 7,200 vehicle-seconds a day on 1 km.
func fxAppraisal(in Input, bestSaves float64) *Appraisal {
	r := in.Regions.Regions
	a, b := r[0].Point, r[1].Point
	mid := orb.Point{(a[0] + b[0]) / 2, (a[1] + b[1]) / 2}
	return &Appraisal{FindingID: "F1", Place: "the fixture crossing", Result: &appraise.Appraisal{
		Trips: 100, Routed: 98, Days: 5, RoutedMetres: 50000, RoutedSeconds: 6000, ObservedMetres: 48000, ObservedSeconds: 7000, Detour: 2.5,
		Speeds: appraise.SpeedsFreeFlow, PaceFactor: 1,
		Results: []appraise.Result{
			{Candidate: appraise.Candidate{Link: route.Link{Name: "New bridge", Class: "secondary", Crossing: true, Line: orb.LineString{a, mid}}},
				LengthMetres: 1000, VehicleMetresSaved: 20000, VehicleSecondsSaved: bestSaves, ShareUsing: 0.8, Detour: 1.4, SecondsSavedPerMetre: bestSaves / 1000},
			{Candidate: appraise.Candidate{Generated: true, Link: route.Link{Name: "G1", Class: "secondary", Line: orb.LineString{mid, b}}},
				LengthMetres: 2000, VehicleMetresSaved: 1000, VehicleSecondsSaved: 0, ShareUsing: 0, Detour: 2.5},
		}}}
}

// TestAppraisalInReport: an appraisal adds the candidates sheet (after
// the cost by day), the best candidate on the SVG and PNG maps with its
// legend entry and caption, the page's table with the speeds sentence and
// cautions, and a layer whose figures are the result's in report units;
// a best candidate saving nothing is not drawn.
func TestAppraisalInReport(t *testing.T) {
	in := fxInput()
	in.Appraisal = fxAppraisal(in, 7200)
	sheets := Sheets(in)
	if i := indexOf(sheets, SheetCandidates); i < 0 || sheets[i-1] != SheetCostDays {
		t.Fatalf("sheets %v: want %q after %q", sheets, SheetCandidates, SheetCostDays)
	}
	var book bytes.Buffer
	if err := WriteWorkbook(&book, in); err != nil {
		t.Fatal(err)
	}
	f, err := excelize.OpenReader(&book)
	if err != nil {
		t.Fatal(err)
	}
	if got := f.GetSheetList(); strings.Join(got, "|") != strings.Join(sheets, "|") {
		t.Errorf("workbook sheets %v, Sheets says %v", got, sheets)
	}
	rows, err := f.GetRows(SheetCandidates)
	if err != nil {
		t.Fatal(err)
	}
	var found bool
	for _, r := range rows {
		if len(r) >= 9 && r[1] == "New bridge" {
			found = true
			// 7,200 veh-s = 2 veh-h per day, on 1 km: 2 per km; 20 veh-km.
			if r[0] != "1" || r[2] != "yours" || r[4] != "20.0" || r[5] != "2.00" || r[8] != "2.00" {
				t.Errorf("sheet row %q", r)
			}
		}
	}
	if !found {
		t.Errorf("no New bridge row in %q", rows)
	}
	v, err := newView(in)
	if err != nil {
		t.Fatal(err)
	}
	svg := v.svg()
	for _, want := range []string{`<g id="best-candidate"`, "best candidate link: New bridge, 2.00 vehicle-hours saved per day", `data-layer="best-candidate"`} {
		if !strings.Contains(svg, want) {
			t.Errorf("map: no %q", want)
		}
	}
	if !strings.Contains(v.mapCaption(), "not a built road") {
		t.Errorf("caption %q does not explain the candidate", v.mapCaption())
	}
	page := string(renderHTML(t, v))
	for _, want := range []string{`<table id="candidates">`, "New bridge (on the map)", "at free-flow speeds", "not a traffic forecast", "qualified, licensed engineers"} {
		if !strings.Contains(page, want) {
			t.Errorf("page: no %q", want)
		}
	}
	var layer bytes.Buffer
	if err := WriteCandidatesGeoJSON(&layer, in); err != nil {
		t.Fatal(err)
	}
	fc, err := geojson.UnmarshalFeatureCollection(layer.Bytes())
	if err != nil {
		t.Fatal(err)
	}
	if len(fc.Features) != 2 || fc.Features[0].Properties["best"] != true || fc.Features[1].Properties["best"] != false ||
		fc.Features[0].Properties["vehicle_hours_saved_per_day"] != 2.0 || fc.ExtraMembers["speeds"] != "free-flow" {
		t.Errorf("layer %s", layer.String())
	}
	// The map without a useful candidate, and the PNG with and without.
	pngWith, err := v.png()
	if err != nil {
		t.Fatal(err)
	}
	in.Appraisal = fxAppraisal(in, 0)
	v0, err := newView(in)
	if err != nil {
		t.Fatal(err)
	}
	if strings.Contains(v0.svg(), "best-candidate") || strings.Contains(v0.mapCaption(), "candidate") {
		t.Error("a candidate that saves nothing is drawn")
	}
	pngWithout, err := v0.png()
	if err != nil {
		t.Fatal(err)
	}
	if bytes.Equal(pngWith, pngWithout) {
		t.Error("the PNG map does not show the best candidate")
	}
	// The appraisal workbook alone: the same sheet, first and only.
	var alone bytes.Buffer
	if err := WriteAppraisalWorkbook(&alone, *fxAppraisal(in, 7200), time.Date(2026, 1, 1, 0, 0, 0, 0, time.UTC)); err != nil {
		t.Fatal(err)
	}
	g, err := excelize.OpenReader(&alone)
	if err != nil {
		t.Fatal(err)
	}
	if l := g.GetSheetList(); len(l) != 1 || l[0] != SheetCandidates {
		t.Errorf("appraisal workbook sheets %v", l)
	}
	rows2, _ := g.GetRows(SheetCandidates)
	if strings.Join(flat(rows2), "|") != strings.Join(flat(rows), "|") {
		t.Errorf("appraisal workbook's sheet differs from the report's")
	}
}

func indexOf(s []string, x string) int {
	for i, v := range s {
		if v == x {
			return i
		}
	}
	return -1
}

func flat(rows [][]string) []string {
	var out []string
	for _, r := range rows {
		out = append(out, strings.Join(r, ","))
	}
	return out
}
