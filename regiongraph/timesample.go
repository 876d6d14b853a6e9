package regiongraph

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"io"
	"os"
	"strings"
)

// TimeSample is what SampleTimes found of a trip or GPS point file's
// times without reading it all: the times of the complete rows in its
// first and last SampleBytes, which for a file in time order (as exports
// are) hold its first and last time.
type TimeSample struct {
	// Format is the file's format (resolved when given as FormatAuto).
	Format Format
	// Column is the header of the time column read (start_time, time).
	Column string
	// Times counts the times parsed; Unparsed those that did not parse.
	Times, Unparsed int64
	// FirstMS and LastMS are the earliest and latest time parsed, Unix ms.
	FirstMS, LastMS int64
	// OffsetTimes and OffsetMismatch count the times with a numeric UTC
	// offset and those whose offset is not the time zone's (see Quality).
	OffsetTimes, OffsetMismatch int64
	// Whole is set when the sample was the whole file.
	Whole bool
}

// SampleBytes is how much of each end of a file SampleTimes reads.
const SampleBytes = 1 << 20

// SampleTimes reads the times of the rows at the start and end of a CSV
// trip or point file (see TimeSample), in opts' time zone and column
// names. A GPX or Parquet file is not sampled: its TimeSample has Times 0
// and its Format set.
func SampleTimes(path string, format Format, opts Options) (TimeSample, error) {
	st, err := opts.settings()
	if err != nil {
		return TimeSample{}, err
	}
	if format == FormatAuto {
		if format, err = detectFormat(path, st); err != nil {
			return TimeSample{}, err
		}
	}
	ts := TimeSample{Format: format}
	if format == FormatGPX || isParquet(path) {
		return ts, nil
	}
	ts.Column = st.column(colStartTime)
	if format == FormatPoints {
		ts.Column = st.column(colTime)
	}
	f, err := os.Open(path)
	if err != nil {
		return ts, fmt.Errorf("regiongraph: %w", err)
	}
	defer f.Close()
	fi, err := f.Stat()
	if err != nil {
		return ts, fmt.Errorf("regiongraph: %w", err)
	}
	head := make([]byte, min(fi.Size(), SampleBytes))
	if _, err := io.ReadFull(f, head); err != nil {
		return ts, fmt.Errorf("regiongraph: %s: %w", path, err)
	}
	headerLine, rest, found := bytes.Cut(head, []byte("\n"))
	if !found && int64(len(head)) < fi.Size() {
		return ts, fmt.Errorf("regiongraph: %s:1: header line longer than %d bytes", path, SampleBytes)
	}
	header, err := csv.NewReader(bytes.NewReader(bytes.TrimPrefix(headerLine, []byte("\xef\xbb\xbf")))).Read()
	if err != nil {
		return ts, fmt.Errorf("regiongraph: %s:1: header: %v", path, err)
	}
	col := -1
	for i, h := range header {
		if strings.EqualFold(strings.TrimSpace(h), ts.Column) {
			col = i
			break
		}
	}
	if col < 0 {
		return ts, fmt.Errorf("regiongraph: %s:1: missing column %q; header has: %s", path, ts.Column, listExcerpt(header))
	}
	z := newZoneCache(st.loc)
	first := true
	sample := func(data []byte, whole bool) {
		if !whole {
			// The data ends inside a row: drop it.
			if i := bytes.LastIndexByte(data, '\n'); i >= 0 {
				data = data[:i+1]
			} else {
				data = nil
			}
		}
		r := csv.NewReader(bytes.NewReader(data))
		r.FieldsPerRecord = -1
		r.ReuseRecord = true
		for {
			rec, err := r.Read()
			if err == io.EOF {
				return
			}
			if err != nil || col >= len(rec) {
				continue
			}
			ms, err := parseTime([]byte(strings.TrimSpace(rec[col])), z)
			if err != nil {
				ts.Unparsed++
				continue
			}
			ts.Times++
			if first || ms < ts.FirstMS {
				ts.FirstMS = ms
			}
			if first || ms > ts.LastMS {
				ts.LastMS = ms
			}
			first = false
		}
	}
	ts.Whole = fi.Size() <= 2*SampleBytes
	if ts.Whole {
		all, err := io.ReadAll(io.MultiReader(bytes.NewReader(rest), f))
		if err != nil {
			return ts, fmt.Errorf("regiongraph: %s: %w", path, err)
		}
		sample(all, true)
	} else {
		sample(rest, false)
		tail := make([]byte, SampleBytes)
		if _, err := f.ReadAt(tail, fi.Size()-SampleBytes); err != nil {
			return ts, fmt.Errorf("regiongraph: %s: %w", path, err)
		}
		// The tail starts inside a row: begin at the next line.
		if i := bytes.IndexByte(tail, '\n'); i >= 0 {
			tail = tail[i+1:]
		}
		sample(tail, true)
	}
	ts.OffsetTimes, ts.OffsetMismatch = z.offsetTimes, z.offsetMismatch
	return ts, nil
}
