package report

import (
	"bytes"
	"encoding/csv"
	"encoding/xml"
	"fmt"
	"regexp"
	"strings"
	"testing"

	"github.com/xuri/excelize/v2"
)

// TestSheetDimensions reads every worksheet's XML from the package and
// checks that its <dimension ref> spans exactly the cells and merged cells
// it holds, found here with encoding/xml (an independent reading): readers
// that trust the dimension (openpyxl in read-only mode) would otherwise
// see less than the sheet holds.
func TestSheetDimensions(t *testing.T) {
	for _, tc := range []struct {
		name string
		in   Input
	}{{"comparison", fxInput()}, {"scan", fxScanInput()}} {
		t.Run(tc.name, func(t *testing.T) {
			_, pkg := writeBook(t, tc.in)
			sheets := 0
			for name, data := range zipEntries(t, pkg) {
				if !strings.HasPrefix(name, "xl/worksheets/sheet") {
					continue
				}
				sheets++
				dim, want := xmlRange(t, data)
				if dim != want {
					t.Errorf("%s: dimension %q, cells span %q", name, dim, want)
				}
				if !strings.Contains(want, ":") {
					t.Errorf("%s: cells span only %q", name, want)
				}
			}
			if sheets != len(Sheets(tc.in)) {
				t.Errorf("%d worksheet parts, want %d", sheets, len(Sheets(tc.in)))
			}
		})
	}
}

// xmlRange returns a worksheet's declared dimension and the range its
// cells (c r) and merged cells (mergeCell ref) span.
func xmlRange(t *testing.T, data []byte) (dim, span string) {
	t.Helper()
	dec := xml.NewDecoder(bytes.NewReader(data))
	minC, minR, maxC, maxR := 1<<30, 1<<30, 0, 0
	see := func(ref string) {
		c, r, err := excelize.CellNameToCoordinates(ref)
		if err != nil {
			t.Fatalf("cell %q: %v", ref, err)
		}
		minC, minR, maxC, maxR = min(minC, c), min(minR, r), max(maxC, c), max(maxR, r)
	}
	for {
		tok, err := dec.Token()
		if err != nil {
			break
		}
		se, ok := tok.(xml.StartElement)
		if !ok {
			continue
		}
		for _, a := range se.Attr {
			switch {
			case se.Name.Local == "dimension" && a.Name.Local == "ref":
				dim = a.Value
			case se.Name.Local == "c" && a.Name.Local == "r":
				see(a.Value)
			case se.Name.Local == "mergeCell" && a.Name.Local == "ref":
				from, to, _ := strings.Cut(a.Value, ":")
				see(from)
				see(to)
			}
		}
	}
	from, _ := excelize.CoordinatesToCellName(minC, minR)
	to, _ := excelize.CoordinatesToCellName(maxC, maxR)
	return dim, from + ":" + to
}

// TestDailyOverCap lowers the Daily sheet's cap below the fixture's rows:
// the sheet then holds a note naming the CSV, and the CSV holds exactly
// the rows the sheet holds without a cap, value for value.
func TestDailyOverCap(t *testing.T) {
	in := fxInput()
	full, _ := writeBook(t, in)
	sheetRows, err := full.GetRows(SheetDaily)
	if err != nil {
		t.Fatal(err)
	}
	n := len(sheetRows) - 1
	if n < 10 {
		t.Fatalf("fixture has %d daily rows, too few for the test", n)
	}
	if over, err := DailyOverflows(in); err != nil || over {
		t.Fatalf("default cap: overflows %v, %v; want false", over, err)
	}

	for _, limit := range []int{n - 1, n, 1} {
		in.DailyRowCap, in.DailyCSVName = limit, "study-daily.csv"
		over, err := DailyOverflows(in)
		if err != nil || over != (n > limit) {
			t.Fatalf("cap %d, %d rows: overflows %v, %v", limit, n, over, err)
		}
		f, _ := writeBook(t, in)
		rows, err := f.GetRows(SheetDaily)
		if err != nil {
			t.Fatal(err)
		}
		if !over {
			if len(rows)-1 != n {
				t.Errorf("cap %d: %d rows in the sheet, want %d", limit, len(rows)-1, n)
			}
			continue
		}
		note := fmt.Sprintf("The daily values have %d rows, more than this sheet holds (%d). They are in study-daily.csv", n, limit)
		if len(rows) != 1 || !strings.HasPrefix(rows[0][0], note) {
			t.Errorf("cap %d: sheet holds %q, want the note %q...", limit, rows, note)
		}
	}

	var buf bytes.Buffer
	if err := WriteDailyCSV(&buf, in); err != nil {
		t.Fatal(err)
	}
	records, err := csv.NewReader(&buf).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(records) != len(sheetRows) {
		t.Fatalf("CSV has %d records, the uncapped sheet %d rows", len(records), len(sheetRows))
	}
	for i := range records {
		// The sheet's trailing empty cells are not returned by GetRows.
		got := strings.Join(records[i], "|")
		want := strings.Join(sheetRows[i], "|")
		if !strings.HasPrefix(got, want) || strings.Trim(got[len(want):], "|") != "" {
			t.Errorf("record %d: CSV %q, sheet %q", i, got, want)
		}
	}
}

// TestDailyOverCapLarge builds a daily table well over a lowered cap,
// from many findings (some sharing an edge), and checks the CSV's row
// count against the distinct edges' days: no row lost, no row twice.
func TestDailyOverCapLarge(t *testing.T) {
	days := fxDays("2026-03-02", 60)
	var findings = fxScanInput().Scan.Findings[:0:0]
	distinct := map[[2]int]bool{}
	for i := 0; i < 40; i++ {
		from, to := 1+i%9, 2+i%8
		distinct[[2]int{from, to}] = true
		findings = append(findings, fxFinding(i+1, fxEdge(from, to, 20+i, 5, 1.6, days)))
	}
	in := fxScanInput()
	in.Scan = fxScan(days, findings...)
	in.DailyRowCap = 100
	// An edge's days are shown once, with the first finding that holds it.
	want := len(distinct) * len(days)
	if want <= 100 {
		t.Fatalf("only %d daily rows", want)
	}
	var buf bytes.Buffer
	if err := WriteDailyCSV(&buf, in); err != nil {
		t.Fatal(err)
	}
	lines := regexp.MustCompile("\n").FindAllIndex(buf.Bytes(), -1)
	if len(lines) != want+1 {
		t.Errorf("CSV has %d lines, want %d rows and the header", len(lines), want)
	}
}
