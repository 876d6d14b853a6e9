package report

import (
	"math"
	"testing"

	"github.com/xuri/excelize/v2"
)

// Both writing paths take a cell's value from cell.value: a blank gives
// nothing, or only its style to the stream writer.
func TestCellValue(t *testing.T) {
	tests := []struct {
		name   string
		c      cell
		value  any
		width  int
		stream any
	}{
		{"text", textCell("Weir Road", 3), "Weir Road", 9, excelize.Cell{StyleID: 3, Value: "Weir Road"}},
		{"int", intCell(1234, 0), int64(1234), 4, excelize.Cell{Value: int64(1234)}},
		{"int64", intCell(int64(-7), 2), int64(-7), 2, excelize.Cell{StyleID: 2, Value: int64(-7)}},
		{"number", numCell(2.5, 4), 2.5, 9, excelize.Cell{StyleID: 4, Value: 2.5}},
		{"NaN", numCell(math.NaN(), 4), nil, 0, nil},
		{"infinity", numCell(math.Inf(-1), 4), nil, 0, nil},
		{"yes", yesNo(true, 5), "yes", 3, excelize.Cell{StyleID: 5, Value: "yes"}},
		{"no", yesNo(false, 0), "no", 2, excelize.Cell{Value: "no"}},
		{"blank", cell{}, nil, 0, nil},
		{"styled blank", cell{style: 6}, nil, 0, excelize.Cell{StyleID: 6}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			v, w := tc.c.value()
			if v != tc.value || w != tc.width {
				t.Errorf("value() = %#v, %d; want %#v, %d", v, w, tc.value, tc.width)
			}
			if got := streamValues([]cell{tc.c})[0]; got != tc.stream {
				t.Errorf("stream value = %#v, want %#v", got, tc.stream)
			}
		})
	}
}
