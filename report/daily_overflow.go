package report

import (
	"encoding/csv"
	"fmt"
	"io"
	"strconv"
	"strings"

	"github.com/xuri/excelize/v2"
)

// The Daily sheet has a row per finding edge and analysed day; on a city
// over months it approaches the format's row limit (excelize.TotalRows,
// 1,048,576 rows; a real-city scenario gave 815,712). Past DailyRowCap the
// rows go to a CSV beside the workbook, with the same columns and values
// (suppressed ones as their markers), and the sheet says so. Every other
// sheet stays far below the limit except Scatter, the chart's data, which
// is cut at the limit with a note in its last row (streamRows): the chart
// cannot plot a million points legibly anyway.

// DefaultDailyRowCap is the default of Input.DailyRowCap: below the
// format's limit, with room for the header, and small enough for
// spreadsheet programs to open the sheet in reasonable time.
const DefaultDailyRowCap = 1_000_000

// dailyRowCap is the Daily sheet's cap, at most the format's limit less the
// header row.
func (v *view) dailyRowCap() int {
	limit := v.in.DailyRowCap
	if limit <= 0 {
		limit = DefaultDailyRowCap
	}
	return min(limit, excelize.TotalRows-1)
}

// dailyCSVName is the name the Daily sheet's note gives the daily CSV.
func (v *view) dailyCSVName() string {
	if v.in.DailyCSVName != "" {
		return v.in.DailyCSVName
	}
	return "daily.csv"
}

// dailyMoved writes the Daily sheet of a study whose daily rows exceed the
// cap: a note naming the CSV that holds them.
func (b *book) dailyMoved(rows, limit int) {
	s := b.newSheet(SheetDaily)
	s.para(fmt.Sprintf("The daily values have %d rows, more than this sheet holds (%d). They are in %s, beside this workbook, with the columns: %s.",
		rows, limit, b.v.dailyCSVName(), strings.Join(dailyColumns, ", ")), "L", 100)
	s.finish()
}

// DailyOverflows reports whether in's daily values exceed the Daily sheet's
// cap, so that WriteDailyCSV must write them beside the workbook.
func DailyOverflows(in Input) (bool, error) {
	v, err := newView(in)
	if err != nil {
		return false, err
	}
	b, done := csvBook(v)
	defer done()
	return len(b.dailyRows()) > v.dailyRowCap(), nil
}

// WriteDailyCSV writes the rows of the Daily sheet as CSV (RFC 4180, a
// header row, the sheet's columns), numbers rounded as the sheet shows
// them and values from too few trips as the sheet's markers.
func WriteDailyCSV(w io.Writer, in Input) error {
	return render(w, in, func(v *view, w io.Writer) error {
		b, done := csvBook(v)
		defer done()
		cw := csv.NewWriter(w)
		if err := cw.Write(dailyColumns); err != nil {
			return err
		}
		record := make([]string, len(dailyColumns))
		for _, r := range b.dailyRows() {
			for i := range record {
				record[i] = ""
				if i < len(r) {
					record[i] = b.csvText(r[i])
				}
			}
			if err := cw.Write(record); err != nil {
				return err
			}
		}
		cw.Flush()
		if b.err != nil {
			return b.err
		}
		return cw.Error()
	})
}

// csvBook is a book whose styles give the cells their number formats; its
// file is never written.
func csvBook(v *view) (*book, func()) {
	f := excelize.NewFile()
	b := &book{f: f, v: v}
	b.newStyles()
	return b, func() { f.Close() }
}

// csvText is a cell's text in the CSV: numbers with the decimals of their
// style.
func (b *book) csvText(c cell) string {
	switch c.kind {
	case kindText:
		return c.s
	case kindInt:
		return strconv.FormatInt(c.n, 10)
	case kindNumber:
		switch c.style {
		case b.st.dec1:
			return strconv.FormatFloat(c.x, 'f', 1, 64)
		case b.st.dec2:
			return strconv.FormatFloat(c.x, 'f', 2, 64)
		}
		return strconv.FormatFloat(c.x, 'f', -1, 64)
	}
	return ""
}
