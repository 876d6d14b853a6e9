package regiongraph

import (
	"fmt"
	"strconv"
	"strings"
)

// A RowError stops a strict ingest (Options.Strict) at the first row with
// bad data. Its text is "regiongraph: file:line: reason ..." ("file:row N"
// for a Parquet trip table), the reason followed by the column and value at
// fault or by what the trip's values were.
type RowError struct {
	File   string // the input file, as given
	Line   int64  // line of the row in a CSV or GPX file, from 1; 0 for a Parquet row
	Row    int64  // row of a Parquet trip table, from 1; 0 for a CSV or GPX row
	Reason Reason
	Column string // the logical column (or GPX attribute) at fault; "" when the trip as a whole failed a check
	Value  string // the value of Column that did not parse, when known
	Detail string // what the failed check measured (a trip's speed, duration ...), or ""
	Err    error  // the CSV parser's error on a malformed record, or nil
}

func (e *RowError) Error() string {
	var b strings.Builder
	b.WriteString("regiongraph: ")
	b.WriteString(e.File)
	if e.Row > 0 {
		fmt.Fprintf(&b, ":row %d: ", e.Row)
	} else {
		fmt.Fprintf(&b, ":%d: ", e.Line)
	}
	b.WriteString(string(e.Reason))
	if e.Column != "" {
		b.WriteString(" " + e.Column)
	}
	if e.Value != "" {
		b.WriteString(" " + strconv.Quote(excerpt(e.Value, maxExcerpt)))
	}
	switch {
	case e.Err != nil:
		b.WriteString(": " + e.Err.Error())
	case e.Detail != "":
		b.WriteString(": " + e.Detail)
	}
	return b.String()
}

func (e *RowError) Unwrap() error { return e.Err }

// A fault is what a reader knows of a row with bad data; where the row is
// comes with it to at, the one place a RowError is made.
type fault struct {
	reason Reason
	column string
	value  string
	detail string
	err    error
}

// at places the fault on line (CSV, GPX) or row (Parquet) of file.
func (f fault) at(file string, line, row int64) *RowError {
	return &RowError{File: file, Line: line, Row: row, Reason: f.reason,
		Column: f.column, Value: f.value, Detail: f.detail, Err: f.err}
}

// firstFault keeps the earliest row with bad data of a file, in strict mode:
// readers that do not meet the rows in file order report the first in the
// file, as a reader in order would.
type firstFault struct {
	err *RowError
	seq int64 // the chunk of err, for readers that cut a file into chunks
}

// keep records e, read in chunk seq, if it comes before the row kept so far.
func (f *firstFault) keep(seq int64, e *RowError) {
	if f.err == nil || seq < f.seq || seq == f.seq && e.Line < f.err.Line {
		f.err, f.seq = e, seq
	}
}
