package report

import (
	"archive/zip"
	"bytes"
	"image/png"
	"io"
	"math"
	"reflect"
	"strconv"
	"strings"
	"testing"
	"unicode/utf8"

	"github.com/xuri/excelize/v2"

	"narrows/partition"
)

// writeBook writes in as a workbook and opens it; it returns the workbook
// and its bytes.
func writeBook(t *testing.T, in Input) (*excelize.File, []byte) {
	t.Helper()
	var buf bytes.Buffer
	if err := WriteWorkbook(&buf, in); err != nil {
		t.Fatalf("WriteWorkbook: %v", err)
	}
	f, err := excelize.OpenReader(bytes.NewReader(buf.Bytes()))
	if err != nil {
		t.Fatalf("reopening workbook: %v", err)
	}
	t.Cleanup(func() { f.Close() })
	return f, buf.Bytes()
}

// rowsByKey maps the value in column keyCol of each row below the header
// to the row, as a column-name to value map.
func rowsByKey(t *testing.T, f *excelize.File, sheet string, keyCol string) map[string]map[string]string {
	t.Helper()
	rows, err := f.GetRows(sheet)
	if err != nil {
		t.Fatalf("GetRows(%s): %v", sheet, err)
	}
	if len(rows) == 0 {
		t.Fatalf("sheet %s is empty", sheet)
	}
	head := rows[0]
	out := map[string]map[string]string{}
	for _, r := range rows[1:] {
		m := map[string]string{}
		for i, h := range head {
			if i < len(r) {
				m[h] = r[i]
			}
		}
		out[m[keyCol]] = m
	}
	return out
}

func TestWorkbookSheets(t *testing.T) {
	tests := []struct {
		name string
		in   Input
		want []string
	}{
		{"comparison", fxInput(), []string{"Summary", "Weak links", "Edges", "Comparison", "Comparison detail", "Comparison groups", "Daily", "Timeline", "Speed v detour", "Cost by day", "Regions", "Data quality", "Inputs", "Method"}},
		{"scan", fxScanInput(), []string{"Summary", "Weak links", "Edges", "Daily", "Timeline", "Speed v detour", "Cost by day", "Regions", "Data quality", "Inputs", "Method"}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			f, _ := writeBook(t, tc.in)
			if got := f.GetSheetList(); !reflect.DeepEqual(got, tc.want) {
				t.Errorf("sheets = %q, want %q", got, tc.want)
			}
			if got := Sheets(tc.in); !reflect.DeepEqual(got, tc.want) {
				t.Errorf("Sheets() = %q, want %q", got, tc.want)
			}
		})
	}
}

func TestWorkbookValues(t *testing.T) {
	f, _ := writeBook(t, fxInput())

	// Weak links: one row per assessment with the fixture's figures.
	findings := rowsByKey(t, f, SheetFindings, "Weak link")
	// The total rows (one per period) have no weak link of their own.
	if total, ok := findings[""]; !ok || !strings.HasPrefix(total["Rank in period"], "Total, ") {
		t.Errorf("%s: no total row: %v", SheetFindings, total)
	}
	delete(findings, "")
	want := map[string]map[string]string{
		// 40 trips at 5 m/s = 18 km/h, detour 1.8, extra 40*1.5 km, 40*0.05 h.
		"1>2":     {"Rank in period": "1", "Ranked in": "before", "Verdict": "worse", "Trips per day": "40", "Speed km/h": "18.0", "Detour ratio": "1.80", "Extra km per day": "60.0", "Extra vehicle-hours per day": "2.00", "Days weak": "10", "Share of days": "71.4%"},
		"4>5+5>6": {"Verdict": "new", "Trips per day": "30", "Regions": "4, 5, 6", "Ranked in": "after"},
		"7>8":     {"Verdict": "unchanged", "Trips per day": "25", "Speed km/h": "21.6"},
		"2>5":     {"Verdict": "eased", "Trips per day": "<10", "Speed km/h": "n<10", "Detour ratio": "n<10", "Extra km per day": "n<10"},
		"8>9":     {"Verdict": "cleared", "Focus": "yes", "Speed km/h": "16.2"},
	}
	if len(findings) != len(want) {
		t.Errorf("%s has %d rows, want %d", SheetFindings, len(findings), len(want))
	}
	for id, cols := range want {
		row, ok := findings[id]
		if !ok {
			t.Errorf("%s: no row for %s", SheetFindings, id)
			continue
		}
		for col, v := range cols {
			if row[col] != v {
				t.Errorf("%s %s %q = %q, want %q", SheetFindings, id, col, row[col], v)
			}
		}
	}
	// The new finding's trips: 18 + 12 from two edges.
	if got := findings["4>5+5>6"]["Trips per day"]; got != "30" {
		t.Errorf("new finding trips = %q, want 30", got)
	}

	// Comparison figures.
	cmp := rowsByKey(t, f, SheetComparison, "Weak link")
	for id, row := range rowsByKey(t, f, SheetComparisonDetail, "Weak link") {
		for col, v := range row {
			if got, ok := cmp[id][col]; ok && got != v {
				t.Errorf("%s and %s disagree on %s %q: %q and %q", SheetComparison, SheetComparisonDetail, id, col, got, v)
			}
			cmp[id][col] = v
		}
	}
	for id, cols := range map[string]map[string]string{
		"1>2": {"Skyline days before": "10", "Days analysed before": "14", "Fisher p adjusted": "0.8100", "Decided by": "time",
			"Cost before veh-h/day": "3.0", "Cost before CI low": "2.7", "Cost after veh-h/day": "3.4", "Cost after CI high": "3.7", "Cost adjusted change": "+0.4", "Cost adjusted CI low": "+0.1", "Comparison group change": "2.0%",
			"Travel time before min": "10.0", "Travel time adjusted change": "+1.7", "Days at the fixed bar after": "12", "Comparison pairs": "2",
			"Reason": "Decided by its travel time: significantly and materially slower per trip beyond the comparison group's change. cost 3.0 to 3.4 extra veh-h/day (raw +0.4), comparison group +2 %, adjusted +0.4 (+13 %, 95 % CI +0.1 to +0.7; Mann-Whitney p adjusted 0.0100); travel time 10.0 to 11.7 min per trip (raw +1.7), comparison group +2 %, adjusted +1.7 (+17 %, 95 % CI +1.7 to +1.7; Mann-Whitney p adjusted 0.0100) (comparison group of 2 like pairs). Explained by speed 18.0 to 14.4 km/h, detour ratio 1.80 to 1.90, trips per day 40 to 41; on the daily skyline 10 of 14 days before and 12 of 14 after (context only; Fisher p adjusted 0.8100)."},
		"8>9": {"Skyline days after": "0", "Fisher p adjusted": "0.0030", "Verdict": "cleared", "Decided by": "bar"},
		"2>5": {"Cost before veh-h/day": "n<10", "Speed before km/h": "n<10", "Fisher p adjusted": "1.0000"},
	} {
		for col, v := range cols {
			if got := cmp[id][col]; got != v {
				t.Errorf("%s %s %q = %q, want %q", SheetComparison, id, col, got, v)
			}
		}
	}

	// Verdict counts on the summary: one of each.
	rows, err := f.GetRows(SheetSummary)
	if err != nil {
		t.Fatal(err)
	}
	// Beside the map, from column D: verdict, count (in focus area), and
	// key figures with their value in column F.
	counts, figures := map[string]string{}, map[string]string{}
	for _, r := range rows {
		if len(r) >= 5 {
			counts[r[3]] = r[4]
		}
		if len(r) >= 6 {
			figures[r[3]] = r[5]
		}
	}
	for _, vd := range []string{"cleared", "eased", "unchanged", "worse", "new"} {
		if !strings.HasPrefix(counts[vd], "1 (") {
			t.Errorf("summary count of %s = %q, want 1", vd, counts[vd])
		}
	}
	if counts["Total"] != "5 (1)" {
		t.Errorf("summary total = %q, want 5 (1 in the focus area)", counts["Total"])
	}
	if figures["Analysed days before"] != strconv.Itoa(fxBeforeDays) {
		t.Errorf("analysed days before = %q, want %d", figures["Analysed days before"], fxBeforeDays)
	}

	// Data quality accounts for every row: 12000 + 300 + 45 = 12345.
	dq := rowsByKey(t, f, SheetDataQuality, "Item")
	for item, v := range map[string]string{"Rows read": "12345", "Rows used": "12000", "Rows rejected: outside area": "45", "Rows rejected: zero duration": "300", "Rows rejected, total": "345", "Read = used + rejected": "yes"} {
		if got := dq[item]["Value"]; got != v {
			t.Errorf("data quality %q = %q, want %q", item, got, v)
		}
	}

	// Regions: 9 rows; the centre region has neighbours 2, 4, 6, 8.
	regions := rowsByKey(t, f, SheetRegions, "Region")
	if len(regions) != 9 {
		t.Errorf("regions rows = %d, want 9", len(regions))
	}
	if got := regions["5"]["Neighbours"]; got != "2, 4, 6, 8" {
		t.Errorf("region 5 neighbours = %q", got)
	}
	if got := regions["5"]["Weak links"]; got != "2" { // 2>5 and 4>5+5>6
		t.Errorf("region 5 weak links = %q, want 2", got)
	}
}

func TestWorkbookTimelineAndDaily(t *testing.T) {
	f, _ := writeBook(t, fxInput())
	rows, err := f.GetRows(SheetTimeline)
	if err != nil {
		t.Fatal(err)
	}
	if got := len(rows) - 1; got != fxBeforeDays+fxAfterDays {
		t.Fatalf("timeline rows = %d, want %d", got, fxBeforeDays+fxAfterDays)
	}
	// First before day: candidates 2 (2 + 0 mod 3); weak links recurring:
	// 1>2, 8>9, 7>8 and 2>5 all start on the first day.
	if got := rows[1]; got[0] != "2026-03-02" || got[1] != "before" || got[2] != "2" || got[3] != "4" {
		t.Errorf("first timeline row = %q", got)
	}
	// 11th before day (index 10): only 1>2 ran 10 days, so none of the
	// before findings is on; candidates 2 + 10 mod 3 = 3.
	if got := rows[11]; got[0] != "2026-03-12" || got[2] != "3" || got[3] != "0" {
		t.Errorf("11th timeline row = %q", got)
	}

	// Daily: the suppressed day of 1>2 (before, 4th day, 3 trips).
	daily, err := f.GetRows(SheetDaily)
	if err != nil {
		t.Fatal(err)
	}
	found := false
	for _, r := range daily[1:] {
		if r[1] == "1>2" && r[2] == "before" && r[3] == "2026-03-05" {
			found = true
			if r[6] != "<10" || r[7] != "n<10" || r[8] != "n<10" || r[9] != "n<10" {
				t.Errorf("suppressed daily row = %q", r)
			}
		}
		if r[1] == "1>2" && r[2] == "after" && r[3] == "2026-05-04" {
			// 44 trips at 4 m/s, (4000-2500) m extra per trip.
			if r[6] != "44" || r[7] != "14.4" || r[9] != "66.0" || r[10] != "yes" || r[11] != "yes" {
				t.Errorf("after daily row = %q", r)
			}
		}
	}
	if !found {
		t.Error("no daily row for 1>2 on 2026-03-05")
	}
}

// TestWorkbookNoFormulas checks that text from data that looks like a
// formula stays a string cell holding exactly that text.
func TestWorkbookNoFormulas(t *testing.T) {
	in := fxInput()
	in.Title = "=1+1"
	in.Area = "@SUM(A1)"
	in.Inputs[0].Path = "=cmd|' /C calc'!A0"
	f, pkg := writeBook(t, in)

	regions := rowsByKey(t, f, SheetRegions, "Region")
	if got := regions["5"]["Border roads"]; got != evilRoad {
		t.Errorf("region 5 border roads = %q, want %q", got, evilRoad)
	}
	checks := []struct{ sheet, cell, want string }{
		{SheetSummary, "A1", "=1+1"},
		{SheetRegions, "D6", evilRoad}, // region 5 is the 5th data row
	}
	for _, c := range checks {
		got, err := f.GetCellValue(c.sheet, c.cell)
		if err != nil || got != c.want {
			t.Errorf("%s!%s = %q, %v; want %q", c.sheet, c.cell, got, err, c.want)
		}
		typ, err := f.GetCellType(c.sheet, c.cell)
		if err != nil || typ != excelize.CellTypeSharedString {
			t.Errorf("%s!%s type = %v, %v; want shared string", c.sheet, c.cell, typ, err)
		}
	}
	// No cell of any sheet holds a formula.
	for _, sh := range f.GetSheetList() {
		rows, err := f.GetRows(sh)
		if err != nil {
			t.Fatal(err)
		}
		for r, row := range rows {
			for c := range row {
				ref, _ := excelize.CoordinatesToCellName(c+1, r+1)
				if fm, err := f.GetCellFormula(sh, ref); err != nil || fm != "" {
					t.Errorf("%s!%s has formula %q (%v)", sh, ref, fm, err)
				}
			}
		}
	}
	// And the raw sheet XML has no formula element at all.
	for name, data := range zipEntries(t, pkg) {
		if strings.HasPrefix(name, "xl/worksheets/") && (bytes.Contains(data, []byte("<f>")) || bytes.Contains(data, []byte("<f "))) {
			t.Errorf("%s contains a formula element", name)
		}
	}
	// Every formula-looking text made it into the shared strings verbatim
	// (escaped as XML).
	ss := string(zipEntries(t, pkg)["xl/sharedStrings.xml"])
	for _, s := range []string{"=1+1", "@SUM(A1)", "=cmd|&#39; /C calc&#39;!A0", "+1 and -1 and @x and =2+2"} {
		if !strings.Contains(ss, s) && !strings.Contains(ss, strings.ReplaceAll(s, "&#39;", "'")) {
			t.Errorf("shared strings lack %q", s)
		}
	}
}

func TestWorkbookSuppression(t *testing.T) {
	f, pkg := writeBook(t, fxInput())
	edges := rowsByKey(t, f, SheetEdges, "Weak link")
	row := edges["2>5"]
	for col, want := range map[string]string{"Trips per day": "<10", "Speed km/h": "n<10", "Detour ratio": "n<10", "Extra km per day": "n<10", "Extra vehicle-hours per day": "n<10"} {
		if row[col] != want {
			t.Errorf("edge 2>5 %q = %q, want %q", col, row[col], want)
		}
	}
	// The suppressed cells carry the grey style.
	rows, _ := f.GetRows(SheetEdges)
	for r, vals := range rows {
		if len(vals) > 1 && vals[1] == "2>5" {
			ref, _ := excelize.CoordinatesToCellName(5, r+1)
			id, err := f.GetCellStyle(SheetEdges, ref)
			if err != nil {
				t.Fatal(err)
			}
			st, err := f.GetStyle(id)
			if err != nil {
				t.Fatal(err)
			}
			if st.Font == nil || !strings.EqualFold(st.Font.Color, "FF808080") && !strings.EqualFold(st.Font.Color, "808080") && !strings.EqualFold(st.Font.Color, "#808080") {
				t.Errorf("suppressed cell %s font = %+v, want grey", ref, st.Font)
			}
		}
	}
	// The hidden speed (7.77 m/s = 27.972 km/h, after: 31.572 km/h) must not
	// leak anywhere in the file, rounded or not.
	for name, data := range zipEntries(t, pkg) {
		for _, leak := range []string{"27.97", "31.57", "7.77", "8.77"} {
			if bytes.Contains(data, []byte(leak)) {
				t.Errorf("%s contains suppressed value %s", name, leak)
			}
		}
	}
	// A lower threshold publishes them.
	in := fxInput()
	in.PublicationMinTrips = 3
	f2, _ := writeBook(t, in)
	if got := rowsByKey(t, f2, SheetEdges, "Weak link")["2>5"]["Speed km/h"]; got != "28.0" {
		t.Errorf("with threshold 3, edge 2>5 speed = %q, want 28.0", got)
	}
}

func zipEntries(t *testing.T, pkg []byte) map[string][]byte {
	t.Helper()
	zr, err := zip.NewReader(bytes.NewReader(pkg), int64(len(pkg)))
	if err != nil {
		t.Fatal(err)
	}
	out := map[string][]byte{}
	for _, zf := range zr.File {
		rc, err := zf.Open()
		if err != nil {
			t.Fatal(err)
		}
		data, err := io.ReadAll(rc)
		rc.Close()
		if err != nil {
			t.Fatal(err)
		}
		out[zf.Name] = data
	}
	return out
}

func TestWorkbookChartsAndPicture(t *testing.T) {
	_, pkg := writeBook(t, fxInput())
	z := zipEntries(t, pkg)
	for name, kind := range map[string]string{"xl/charts/chart1.xml": "<lineChart>", "xl/charts/chart2.xml": "<scatterChart>"} {
		data, ok := z[name]
		if !ok {
			t.Errorf("workbook lacks %s", name)
			continue
		}
		if !bytes.Contains(data, []byte(kind)) {
			t.Errorf("%s is not a %s", name, kind)
		}
	}
	// Scatter: one series per period and candidacy (the fixture has both
	// kinds of edge-day in both periods), with literal names and numeric x
	// values; TestScatterSeriesByPeriod checks their rows.
	sc := string(z["xl/charts/chart2.xml"])
	if n := strings.Count(sc, "<ser>"); n != 4 {
		t.Errorf("scatter chart has %d series, want 4", n)
	}
	for _, name := range []string{scatterName("before", false), scatterName("before", true), scatterName("after", false), scatterName("after", true)} {
		if !strings.Contains(sc, "<tx><v>"+name+"</v></tx>") {
			t.Errorf("scatter chart lacks the literal series name %q", name)
		}
	}
	// The x values (detour) are numbers: as a string reference they would
	// be plotted as categories 1, 2, 3...
	if n := strings.Count(sc, "<xVal><numRef>"); n != 4 || strings.Contains(sc, "<xVal><strRef>") {
		t.Errorf("scatter chart x values: %d numeric references, want 4 and no string reference", n)
	}
	// Both charts have a title and both axes a title; the timeline names
	// the periods.
	for name, wantTitles := range map[string][]string{
		"xl/charts/chart1.xml": {"Candidates and weak links per day (before: ", "Day", "Count"},
		"xl/charts/chart2.xml": {"Edge-days: speed against detour", "Detour ratio (travel / straight-line distance)", "Speed km/h"},
	} {
		for _, title := range wantTitles {
			if !strings.Contains(string(z[name]), "<a:t>"+title) {
				t.Errorf("%s lacks the title %q", name, title)
			}
		}
	}
	pic, ok := z["xl/media/image1.png"]
	if !ok {
		t.Fatal("workbook lacks the map picture")
	}
	img, err := png.Decode(bytes.NewReader(pic))
	if err != nil {
		t.Fatalf("map picture: %v", err)
	}
	// The fixture spans 0.03 degrees each way at latitude 50.015, so the
	// map (inside its padding) is cos(50.015 deg) = 0.6425 as wide as high,
	// and the height is the limiting side.
	b := img.Bounds()
	if b.Dy() != mapMaxHeight {
		t.Errorf("map picture is %v, want %d high", b, mapMaxHeight)
	}
	if ratio := float64(b.Dx()-2*mapPad) / float64(b.Dy()-2*mapPad); math.Abs(ratio-0.6425) > 0.005 {
		t.Errorf("map picture aspect %.4f, want 0.6425", ratio)
	}
}

func TestWorkbookFrozenAndFiltered(t *testing.T) {
	f, _ := writeBook(t, fxInput())
	for _, sh := range []string{SheetFindings, SheetEdges, SheetComparison, SheetComparisonDetail, SheetDaily, SheetTimeline, SheetScatter, SheetRegions, SheetDataQuality, SheetMethod} {
		p, err := f.GetPanes(sh)
		if err != nil {
			t.Fatal(err)
		}
		if !p.Freeze || p.YSplit != 1 {
			t.Errorf("%s panes = %+v, want the header row frozen", sh, p)
		}
	}
	// Autofilters are stored as hidden defined names _xlnm._FilterDatabase.
	filtered := map[string]bool{}
	for _, dn := range f.GetDefinedName() {
		if dn.Name == "_xlnm._FilterDatabase" {
			filtered[dn.Scope] = true
		}
	}
	for _, sh := range []string{SheetFindings, SheetComparison, SheetComparisonDetail, SheetDaily, SheetRegions} {
		if !filtered[sh] {
			t.Errorf("%s has no autofilter", sh)
		}
	}
}

func TestWorkbookDeterministic(t *testing.T) {
	var a, b bytes.Buffer
	for _, w := range []*bytes.Buffer{&a, &b} {
		if err := WriteWorkbook(w, fxInput()); err != nil {
			t.Fatal(err)
		}
	}
	da, db := a.Bytes(), b.Bytes()
	if !bytes.Equal(da, db) {
		t.Error("two writes of the same input differ")
	}
	// The creation time is the day after the last analysed day.
	core := string(zipEntries(t, da)["docProps/core.xml"])
	if !strings.Contains(core, "2026-05-18T00:00:00Z") {
		t.Errorf("core properties lack the fixed creation time: %s", core)
	}
}

func TestCautionsEverywhere(t *testing.T) {
	in := fxInput()
	v, err := newView(in)
	if err != nil {
		t.Fatal(err)
	}
	f, _ := writeBook(t, in)
	html := renderHTML(t, v)
	for _, sh := range []string{SheetSummary, SheetMethod} {
		rows, err := f.GetRows(sh)
		if err != nil {
			t.Fatal(err)
		}
		var all strings.Builder
		for _, r := range rows {
			all.WriteString(strings.Join(r, "\t") + "\n")
		}
		for _, key := range []string{"not all traffic", "qualified", "suppressed"} {
			if !strings.Contains(all.String(), key) {
				t.Errorf("%s lacks the caution about %q", sh, key)
			}
		}
	}
	for _, key := range []string{"not all traffic", "qualified", "suppressed"} {
		if !bytes.Contains(html, []byte(key)) {
			t.Errorf("HTML lacks the caution about %q", key)
		}
	}
}

// TestWorkbookTextRoundTrip writes awkward road names and reads them back.
func TestWorkbookTextRoundTrip(t *testing.T) {
	tests := []struct{ name, want string }{
		{"=SUM(A1:A9)", "=SUM(A1:A9)"},
		{"+44 Road", "+44 Road"},
		{"-Ring", "-Ring"},
		{"@ring", "@ring"},
		{"_x0041_ Lane", "_x0041_ Lane"}, // the format's own escape must stay literal
		{"a_x005F_b", "a_x005F_b"},
		{"Straße am Wehr", "Straße am Wehr"},
		{"tab\tand\nnewline", "tab\tand\nnewline"},
		{"  spaced  ", "  spaced  "},
		{"bell\x07", "bell\ufffd"}, // XML cannot hold it: replaced, not dropped
	}
	in := fxInput()
	in.Regions.Regions[4].BorderRoads = nil
	for _, tc := range tests {
		in.Regions.Regions[4].BorderRoads = append(in.Regions.Regions[4].BorderRoads, partition.BorderRoad{Name: tc.name, LengthKM: 0.1})
	}
	f, _ := writeBook(t, in)
	got, err := f.GetCellValue(SheetRegions, "D6")
	if err != nil {
		t.Fatal(err)
	}
	parts := strings.Split(got, "; ")
	if len(parts) != len(tests) {
		t.Fatalf("border roads cell = %q, want %d names", got, len(tests))
	}
	for i, tc := range tests {
		if parts[i] != tc.want {
			t.Errorf("road %q read back as %q, want %q", tc.name, parts[i], tc.want)
		}
	}

	// The same through the stream-written Daily sheet (finding ids).
	for _, tc := range tests {
		in := fxInput()
		in.Comparison.Assessments[0].Finding.ID = tc.name
		f, _ := writeBook(t, in)
		got, err := f.GetCellValue(SheetDaily, "B2")
		if err != nil || got != tc.want {
			t.Errorf("Daily finding id %q read back as %q (%v), want %q", tc.name, got, err, tc.want)
		}
		if fm, _ := f.GetCellFormula(SheetDaily, "B2"); fm != "" {
			t.Errorf("Daily finding id %q became formula %q", tc.name, fm)
		}
	}
}

// xmlSafe is the oracle for how text reads back from the workbook: every
// byte of invalid UTF-8 and every character XML cannot hold becomes U+FFFD.
func xmlSafe(s string) string {
	var b strings.Builder
	for i, w := 0, 0; i < len(s); i += w {
		r, size := utf8.DecodeRuneInString(s[i:])
		w = size
		if r == utf8.RuneError && size == 1 || !xmlChar(r) {
			r = utf8.RuneError
		}
		b.WriteRune(r)
	}
	return b.String()
}

// FuzzWorkbookText writes an arbitrary text through both paths of the
// spreadsheet writer (cell by cell, as the Regions sheet's road names, and
// streamed, as the Daily sheet's) and reads it back: the workbook must be
// written, the cell must be a string equal to the text (up to characters
// XML cannot hold) and never a formula. The workbook holds only the two
// cells, so that each input takes milliseconds; TestWorkbookTextRoundTrip
// puts names through the whole report.
func FuzzWorkbookText(f *testing.F) {
	for _, s := range []string{"Mill Lane", evilRoad, "_x0041_", "a\r\nb", "\x00", "\xff", " lead", "=1", "@A1", "-2+3", "+1"} {
		f.Add(s)
	}
	v, err := newView(fxInput()) // the styles need a view: made once
	if err != nil {
		f.Fatal(err)
	}
	f.Fuzz(func(t *testing.T, name string) {
		if utf8.RuneCountInString(name) > 1000 {
			t.Skip("long names are not the point here")
		}
		wb := excelize.NewFile()
		b := &book{f: wb, v: v}
		b.newStyles()
		s := b.newSheet(SheetRegions)
		s.add(b.str(name))
		s.finish()
		b.streamTable(SheetDaily, []string{"Name"}, [][]cell{{b.str(name)}}, nil)
		if b.err != nil {
			t.Fatal(b.err)
		}
		var raw, buf bytes.Buffer
		if err := wb.Write(&raw); err != nil {
			t.Fatal(err)
		}
		wb.Close()
		if err := repack(&buf, raw.Bytes()); err != nil {
			t.Fatal(err)
		}
		back, err := excelize.OpenReader(&buf)
		if err != nil {
			t.Fatal(err)
		}
		defer back.Close()
		for _, at := range []struct{ sheet, cell string }{{SheetRegions, "A1"}, {SheetDaily, "A2"}} {
			got, err := back.GetCellValue(at.sheet, at.cell)
			if err != nil {
				t.Fatal(err)
			}
			if want := xmlSafe(name); got != want {
				t.Errorf("%s: %q read back as %q, want %q", at.sheet, name, got, want)
			}
			if fm, _ := back.GetCellFormula(at.sheet, at.cell); fm != "" {
				t.Errorf("%s: %q became formula %q", at.sheet, name, fm)
			}
		}
	})
}
