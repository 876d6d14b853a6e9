package regiongraph

import (
	"errors"
	"io"

	"github.com/parquet-go/parquet-go"
	"github.com/parquet-go/parquet-go/encoding"
)

// A columnCursor reads the values of one column chunk at increasing rows,
// holding the decoded page that covers the current row. It skips pages
// without a wanted row unread when the file has an offset index.
type columnCursor struct {
	st      *stretch
	col     int
	pages   parquet.Pages
	canSeek bool

	page        parquet.Page // nil before the first page and after close
	start, stop int64        // rows of page in the row group: [start, stop)

	// Decoded values of page, by kind; a dictionary-encoded byte-array page
	// has indexes into dictStrings.
	i32     []int32
	i64     []int64
	f64     []float64
	data    []byte
	offsets []uint32
	indexes []int32

	dict        parquet.Dictionary
	dictStrings []string
	shared      map[string]string // one string per distinct value
	last        string
}

func newColumnCursor(st *stretch, col int) *columnCursor {
	cc := st.cols[col]
	oi, err := cc.OffsetIndex()
	return &columnCursor{st: st, col: col, pages: cc.Pages(), canSeek: err == nil && oi != nil && oi.NumPages() > 0}
}

func (c *columnCursor) close() {
	if c.page != nil {
		parquet.Release(c.page)
		c.page = nil
	}
	if c.pages != nil {
		c.pages.Close()
		c.pages = nil
	}
}

// seek makes the current page the one covering row r, r >= the rows
// asked for before.
func (c *columnCursor) seek(r int64) error {
	for r >= c.stop {
		if c.page != nil {
			parquet.Release(c.page)
			c.page = nil
		}
		// The page reader is at row c.stop of the row group. Without an
		// offset index a seek decodes the pages before the row, so it is
		// done once, to the stretch's first row.
		c.start = c.stop
		if r > c.start && (c.canSeek || c.start == 0) {
			if err := c.pages.SeekToRow(r); err != nil {
				return c.st.errorf(c.col, "seeking row %d: %v", r, err)
			}
			c.start = r
		}
		p, err := c.pages.ReadPage()
		if err != nil {
			if errors.Is(err, io.EOF) {
				return c.st.errorf(c.col, "no values from row %d", c.start)
			}
			return c.st.errorf(c.col, "row %d: %v", c.start, err)
		}
		c.page = p
		c.stop = c.start + p.NumRows()
		if err := c.decode(p); err != nil {
			return err
		}
	}
	return nil
}

// decode sets the typed views of page p.
func (c *columnCursor) decode(p parquet.Page) error {
	n := int(p.NumRows())
	if p.NumNulls() != 0 || int(p.NumValues()) != n || n == 0 {
		return c.st.errorf(c.col, "page at row %d has %d rows, %d values, %d nulls", c.start, n, p.NumValues(), p.NumNulls())
	}
	v := p.Data()
	want := storeColumns[c.col].kind()
	if d := p.Dictionary(); d != nil {
		if want != parquet.ByteArray || v.Kind() != encoding.Int32 {
			return c.st.errorf(c.col, "unexpected dictionary encoding")
		}
		if err := c.setDictionary(d); err != nil {
			return err
		}
		c.indexes = v.Int32()
		if len(c.indexes) != n {
			return c.st.errorf(c.col, "page at row %d: %d indexes for %d rows", c.start, len(c.indexes), n)
		}
		for _, i := range c.indexes {
			if i < 0 || int(i) >= len(c.dictStrings) {
				return c.st.errorf(c.col, "page at row %d: dictionary index %d of %d", c.start, i, len(c.dictStrings))
			}
		}
		return nil
	}
	c.indexes = nil
	var got int
	switch {
	case want == parquet.ByteArray && v.Kind() == encoding.ByteArray:
		c.data, c.offsets = v.ByteArray()
		got = len(c.offsets) - 1
		for i := 0; i < got; i++ {
			if c.offsets[i] > c.offsets[i+1] || int(c.offsets[i+1]) > len(c.data) {
				return c.st.errorf(c.col, "page at row %d: bad value offsets", c.start)
			}
		}
	case want == parquet.Int32 && v.Kind() == encoding.Int32:
		c.i32 = v.Int32()
		got = len(c.i32)
	case want == parquet.Int64 && v.Kind() == encoding.Int64:
		c.i64 = v.Int64()
		got = len(c.i64)
	case want == parquet.Double && v.Kind() == encoding.Double:
		c.f64 = v.Double()
		got = len(c.f64)
	default:
		return c.st.errorf(c.col, "page at row %d holds %v values", c.start, v.Kind())
	}
	if got != n {
		return c.st.errorf(c.col, "page at row %d: %d values for %d rows", c.start, got, n)
	}
	return nil
}

// setDictionary makes the strings of dictionary d current.
func (c *columnCursor) setDictionary(d parquet.Dictionary) error {
	if d == c.dict {
		return nil
	}
	v := d.Page().Data()
	if v.Kind() != encoding.ByteArray {
		return c.st.errorf(c.col, "dictionary of %v values", v.Kind())
	}
	data, offsets := v.ByteArray()
	if len(offsets) == 0 {
		return c.st.errorf(c.col, "empty dictionary")
	}
	c.dict = d
	c.dictStrings = c.dictStrings[:0]
	for i := 0; i+1 < len(offsets); i++ {
		if offsets[i] > offsets[i+1] || int(offsets[i+1]) > len(data) {
			return c.st.errorf(c.col, "dictionary: bad value offsets")
		}
		c.dictStrings = append(c.dictStrings, c.intern(data[offsets[i]:offsets[i+1]]))
	}
	return nil
}

// intern returns b as a string shared by every equal value the cursor
// reads: a store repeats its few day and window names on every row.
func (c *columnCursor) intern(b []byte) string {
	if string(b) == c.last {
		return c.last
	}
	s, ok := c.shared[string(b)]
	if !ok {
		if c.shared == nil {
			c.shared = make(map[string]string)
		}
		s = string(b)
		c.shared[s] = s
	}
	c.last = s
	return s
}

// each calls set(i, j) for the i-th wanted row and its value's index j in
// the current page. The wanted rows are rows, or [a, b) if rows is nil.
func (c *columnCursor) each(a, b int64, rows []int32, set func(i, j int)) error {
	if rows == nil {
		for r := a; r < b; {
			if err := c.seek(r); err != nil {
				return err
			}
			end := min(b, c.stop)
			for j, i := int(r-c.start), int(r-a); r < end; r, i, j = r+1, i+1, j+1 {
				set(i, j)
			}
		}
		return nil
	}
	for i, r := range rows {
		if r64 := int64(r); r64 >= c.stop {
			if err := c.seek(r64); err != nil {
				return err
			}
		}
		set(i, int(int64(r)-c.start))
	}
	return nil
}

func (c *columnCursor) strings(a, b int64, rows []int32, out []string) error {
	return c.each(a, b, rows, func(i, j int) {
		if c.indexes != nil {
			out[i] = c.dictStrings[c.indexes[j]]
		} else {
			out[i] = c.intern(c.data[c.offsets[j]:c.offsets[j+1]])
		}
	})
}

func (c *columnCursor) int32s(a, b int64, rows []int32, out []int32) error {
	if rows == nil {
		return c.copyRange(a, b, func(i, j, n int) { copy(out[i:i+n], c.i32[j:j+n]) })
	}
	return c.each(a, b, rows, func(i, j int) { out[i] = c.i32[j] })
}

func (c *columnCursor) int64s(a, b int64, rows []int32, out []int64) error {
	if rows == nil {
		return c.copyRange(a, b, func(i, j, n int) { copy(out[i:i+n], c.i64[j:j+n]) })
	}
	return c.each(a, b, rows, func(i, j int) { out[i] = c.i64[j] })
}

func (c *columnCursor) float64s(a, b int64, rows []int32, out []float64) error {
	if rows == nil {
		return c.copyRange(a, b, func(i, j, n int) { copy(out[i:i+n], c.f64[j:j+n]) })
	}
	return c.each(a, b, rows, func(i, j int) { out[i] = c.f64[j] })
}

// copyRange calls span(i, j, n) for runs of n rows of [a, b) that start at
// the i-th row and value j of the current page.
func (c *columnCursor) copyRange(a, b int64, span func(i, j, n int)) error {
	for r := a; r < b; {
		if err := c.seek(r); err != nil {
			return err
		}
		n := min(b, c.stop) - r
		span(int(r-a), int(r-c.start), int(n))
		r += n
	}
	return nil
}
