package report

import (
	"html"
	"regexp"
	"sort"
	"strconv"
	"strings"
	"testing"

	"github.com/xuri/excelize/v2"
)

// chartSeries is one series of a chart part as written in the package.
type chartSeries struct {
	name       string // literal name, or the cell reference of the name
	categories string // range of the categories (line) or x values (scatter)
	values     string
}

var (
	serRE   = regexp.MustCompile(`(?s)<ser>.*?</ser>`)
	nameRE  = regexp.MustCompile(`<tx>(?:<v>([^<]*)</v>|<strRef><f>([^<]*)</f>)`)
	catRE   = regexp.MustCompile(`<(?:cat|xVal)><(?:str|num)Ref><f>([^<]*)</f>`)
	valRE   = regexp.MustCompile(`<(?:val|yVal)><numRef><f>([^<]*)</f>`)
	titleRE = regexp.MustCompile(`(?s)<title>.*?<a:t>([^<]*)</a:t>`)
	rangeRE = regexp.MustCompile(`^'([^']+)'!\$([A-Z]+)\$(\d+):\$([A-Z]+)\$(\d+)$`)
)

// seriesOf parses the series of a chart part.
func seriesOf(t *testing.T, part []byte) []chartSeries {
	t.Helper()
	var out []chartSeries
	for _, s := range serRE.FindAllString(string(part), -1) {
		var c chartSeries
		if m := nameRE.FindStringSubmatch(s); m != nil {
			c.name = html.UnescapeString(m[1] + m[2])
		}
		if m := catRE.FindStringSubmatch(s); m != nil {
			c.categories = html.UnescapeString(m[1])
		}
		if m := valRE.FindStringSubmatch(s); m != nil {
			c.values = html.UnescapeString(m[1])
		}
		out = append(out, c)
	}
	return out
}

// chartParts returns the chart parts of a workbook package by their title.
func chartParts(t *testing.T, pkg []byte) map[string][]byte {
	t.Helper()
	out := map[string][]byte{}
	for name, data := range zipEntries(t, pkg) {
		if !strings.HasPrefix(name, "xl/charts/chart") {
			continue
		}
		m := titleRE.FindSubmatch(data)
		if m == nil {
			t.Errorf("%s has no title", name)
			continue
		}
		out[html.UnescapeString(string(m[1]))] = data
	}
	return out
}

// parseRange splits 'Sheet'!$C$4:$C$9 into sheet, column and rows.
func parseRange(t *testing.T, ref string) (sheet, col string, from, to int) {
	t.Helper()
	m := rangeRE.FindStringSubmatch(ref)
	if m == nil || m[2] != m[4] {
		t.Fatalf("range %q is not one column", ref)
	}
	from, _ = strconv.Atoi(m[3])
	to, _ = strconv.Atoi(m[5])
	return m[1], m[2], from, to
}

func cellValue(t *testing.T, f *excelize.File, sheet, col string, row int) string {
	t.Helper()
	v, err := f.GetCellValue(sheet, col+strconv.Itoa(row))
	if err != nil {
		t.Fatal(err)
	}
	return v
}

// TestScatterSeriesByPeriod: every row a scatter series covers is of the
// series' period and candidacy, and the series together cover every shown
// edge-day once.
func TestScatterSeriesByPeriod(t *testing.T) {
	f, pkg := writeBook(t, fxInput())
	sc, ok := chartParts(t, pkg)["Edge-days: speed against detour"]
	if !ok {
		t.Fatal("no scatter chart")
	}
	covered := 0
	periods := map[string]bool{}
	for _, s := range seriesOf(t, sc) {
		period, rest, _ := strings.Cut(s.name, ", ")
		period = strings.ToLower(period)
		periods[period] = true
		wantCand := "no"
		if rest == "candidate edge-day" {
			wantCand = "yes"
		}
		sheet, col, from, to := parseRange(t, s.values)
		_, xcol, xfrom, xto := parseRange(t, s.categories)
		if sheet != SheetScatter || col != "G" || xcol != "H" || xfrom != from || xto != to {
			t.Errorf("series %q: values %s, x %s, want G and H of the same rows of %s", s.name, s.values, s.categories, SheetScatter)
		}
		for r := from; r <= to; r++ {
			if got := cellValue(t, f, sheet, "B", r); got != period {
				t.Errorf("series %q: row %d is of period %q", s.name, r, got)
			}
			if got := cellValue(t, f, sheet, "A", r); got != wantCand {
				t.Errorf("series %q: row %d candidate %q, want %q", s.name, r, got, wantCand)
			}
			if _, err := strconv.ParseFloat(cellValue(t, f, sheet, "G", r), 64); err != nil {
				t.Errorf("series %q: row %d speed is not a number (suppressed?)", s.name, r)
			}
		}
		covered += to - from + 1
	}
	if !periods["before"] || !periods["after"] {
		t.Errorf("scatter periods %v, want before and after as separate series", periods)
	}
	rows, err := f.GetRows(SheetScatter)
	if err != nil {
		t.Fatal(err)
	}
	shown := 0
	for _, r := range rows[1:] {
		if len(r) > 6 {
			if _, err := strconv.ParseFloat(r[6], 64); err == nil {
				shown++
			}
		}
	}
	if covered != shown {
		t.Errorf("scatter series cover %d rows, %d edge-days are shown", covered, shown)
	}
}

// TestCostDayCharts: each weak link has a cost and a detour chart on the
// Cost by day sheet, with before and after as separate series over the
// same days and the opening marked on the first day from the opening.
func TestCostDayCharts(t *testing.T) {
	in := fxInput()
	const opening = "2026-05-04" // the first after day of the fixture
	in.Comparison.Options.Opening = opening
	f, pkg := writeBook(t, in)
	charts := chartParts(t, pkg)
	var titles []string
	for title := range charts {
		if strings.HasSuffix(title, ": extra vehicle-hours per day") || strings.HasSuffix(title, ": detour ratio per day") {
			titles = append(titles, title)
		}
	}
	sort.Strings(titles)
	if len(titles) != 2*len(in.Comparison.Assessments) {
		t.Fatalf("cost-by-day charts %q, want two for each of %d weak links", titles, len(in.Comparison.Assessments))
	}
	for _, title := range titles {
		series := seriesOf(t, charts[title])
		unit := "Extra vehicle-hours"
		mark := schemeOpens + " (vehicle-hours)"
		if strings.HasSuffix(title, "detour ratio per day") {
			unit, mark = "Detour ratio", schemeOpens+" (detour)"
		}
		want := []string{unit + ", before", unit + ", after", mark}
		if len(series) != len(want) {
			t.Fatalf("%s: %d series, want %q", title, len(series), want)
		}
		for i, s := range series {
			nameSheet, nameCol, nameRow, _ := parseRange(t, s.name+":"+s.name[strings.LastIndex(s.name, "!")+1:])
			if got := cellValue(t, f, nameSheet, nameCol, nameRow); got != want[i] {
				t.Errorf("%s: series %d named %q, want %q", title, i, got, want[i])
			}
			sheet, col, from, to := parseRange(t, s.values)
			_, dayCol, dfrom, dto := parseRange(t, s.categories)
			if sheet != SheetCostDays || dayCol != "A" || dfrom != from || dto != to || from != nameRow+1 {
				t.Errorf("%s: series %q: values %s, days %s, want the rows below its header", title, want[i], s.values, s.categories)
			}
			if n := to - from + 1; n != fxBeforeDays+fxAfterDays {
				t.Errorf("%s: series %q spans %d days, want %d", title, want[i], n, fxBeforeDays+fxAfterDays)
			}
			marks := 0
			for r := from; r <= to; r++ {
				day, period, v := cellValue(t, f, sheet, "A", r), cellValue(t, f, sheet, "B", r), cellValue(t, f, sheet, col, r)
				switch i {
				case 0, 1: // values only on the days of the series' period; a
					// cost on each of them (0 without trips), a detour where
					// there were trips
					own := period == []string{"before", "after"}[i]
					if (!own && v != "") || (own && v == "" && unit == "Extra vehicle-hours") {
						t.Errorf("%s: %q on %s (%s) holds %q", title, want[i], day, period, v)
					}
				case 2:
					if v != "" {
						marks++
						if day != opening {
							t.Errorf("%s: opening marked on %s, want %s", title, day, opening)
						}
					}
				}
			}
			if i == 2 && marks != 1 {
				t.Errorf("%s: %d opening marks, want 1", title, marks)
			}
		}
	}
	// Values of the costliest weak link 1>2 on its first before day, by
	// hand from the fixture: 40 trips of 4000 m at 5 m/s (32000 s) against
	// 2500 m straight at the 30 km/h reference (12000 s): 20000 s = 5.6
	// vehicle-hours; detour 4000 / 2500 = 1.60.
	rows, err := f.GetRows(SheetCostDays)
	if err != nil {
		t.Fatal(err)
	}
	for i, r := range rows {
		if len(r) > 0 && strings.HasSuffix(r[0], "(1>2)") {
			got := rows[i+2]
			if got[0] != "2026-03-02" || got[2] != "5.6" || got[4] != "1.60" {
				t.Errorf("1>2 first day %q, want 2026-03-02, 5.6 vehicle-hours, detour 1.60", got)
			}
			return
		}
	}
	t.Error("no block for 1>2")
}
