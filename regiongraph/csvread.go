package regiongraph

import (
	"bufio"
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/csv"
	"encoding/hex"
	"errors"
	"fmt"
	"hash"
	"io"
	"os"
	"path/filepath"
	"strings"
)

const (
	chunkSize   = 1 << 20  // bytes handed to a parser at a time
	maxLineSize = 16 << 20 // a longer line is an error, not a reason to buffer the file
	sniffSize   = 64 << 10 // bytes inspected for binary content and the header
)

// csvFile is an open CSV input with its parsed header.
type csvFile struct {
	path   string
	name   string // base name for messages
	f      *os.File
	br     *bufio.Reader
	header []string
	size   int64
}

// openCSV opens path, rejects binary content and reads the header line.
func openCSV(path string) (*csvFile, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("regiongraph: %w", err)
	}
	fi, err := f.Stat()
	if err != nil {
		f.Close()
		return nil, fmt.Errorf("regiongraph: %w", err)
	}
	c := &csvFile{path: path, name: filepath.Base(path), f: f, size: fi.Size()}
	c.br = bufio.NewReaderSize(f, sniffSize)
	head, err := c.br.Peek(sniffSize)
	if err != nil && !errors.Is(err, io.EOF) && !errors.Is(err, bufio.ErrBufferFull) {
		f.Close()
		return nil, fmt.Errorf("regiongraph: %s: %w", path, err)
	}
	if err := checkText(path, head); err != nil {
		f.Close()
		return nil, err
	}
	line := head
	if i := bytes.IndexByte(head, '\n'); i >= 0 {
		line = head[:i]
	} else if len(head) == sniffSize {
		f.Close()
		return nil, fmt.Errorf("regiongraph: %s:1: header line longer than %d bytes", path, sniffSize)
	}
	line = bytes.TrimPrefix(line, []byte("\xef\xbb\xbf"))
	line = bytes.TrimSuffix(line, []byte("\r"))
	if len(bytes.TrimSpace(line)) == 0 {
		f.Close()
		return nil, fmt.Errorf("regiongraph: %s:1: empty file or empty header line (want a CSV header)", path)
	}
	r := csv.NewReader(bytes.NewReader(line))
	r.FieldsPerRecord = -1
	fields, err := r.Read()
	if err != nil {
		f.Close()
		return nil, fmt.Errorf("regiongraph: %s:1: header: %v", path, err)
	}
	for i := range fields {
		fields[i] = strings.TrimSpace(fields[i])
	}
	c.header = fields
	return c, nil
}

// checkText rejects content that is not text: a NUL byte or more than one
// control character in a hundred. Other encodings than UTF-8 (Latin-1 names
// in an unused column, say) pass: the fields read are ASCII.
func checkText(path string, head []byte) error {
	if bytes.HasPrefix(head, []byte("PAR1")) {
		return fmt.Errorf("regiongraph: %s: a Parquet file, not CSV text (read it as a trip table)", path)
	}
	if i := bytes.IndexByte(head, 0); i >= 0 {
		return fmt.Errorf("regiongraph: %s: binary data at byte %d, not CSV text", path, i)
	}
	control := 0
	for _, c := range head {
		if c < 0x20 && c != '\t' && c != '\n' && c != '\r' || c == 0x7f {
			control++
		}
	}
	if control > len(head)/100 {
		return fmt.Errorf("regiongraph: %s: binary data (%d control bytes in the first %d), not CSV text", path, control, len(head))
	}
	return nil
}

func (c *csvFile) Close() error { return c.f.Close() }

// columnIndex finds the header of a logical column: an exact match, else a
// unique case-insensitive one. It returns -1 when absent.
func (c *csvFile) columnIndex(header string) int {
	for i, h := range c.header {
		if h == header {
			return i
		}
	}
	found := -1
	for i, h := range c.header {
		if strings.EqualFold(h, header) {
			if found >= 0 {
				return -1
			}
			found = i
		}
	}
	return found
}

// requireColumns maps logical columns to field indexes; optional ones may be
// absent (-1).
func (c *csvFile) requireColumns(st *settings, required, optional []string) (map[string]int, error) {
	idx := make(map[string]int)
	for _, logical := range required {
		h := st.column(logical)
		i := c.columnIndex(h)
		if i < 0 {
			hint := ""
			if h == logical {
				hint = fmt.Sprintf("; if the file names it differently, map it in Columns, e.g. %s=<header>", logical)
			}
			return nil, fmt.Errorf("regiongraph: %s:1: missing column %q (the %s column)%s; header has: %s",
				c.path, h, logical, hint, listExcerpt(c.header))
		}
		idx[logical] = i
	}
	for _, logical := range optional {
		idx[logical] = c.columnIndex(st.column(logical))
	}
	return idx, nil
}

// chunk is a run of whole CSV records.
type chunk struct {
	seq       int64
	data      []byte
	firstLine int64 // line number of data's first byte
	last      bool  // the file's last chunk: its end is the end of the file
	buf       []byte
}

// chunker cuts a stream into chunks at record boundaries, hashes it and
// reports progress. It runs in one goroutine.
type chunker struct {
	src      io.Reader
	hash     hash.Hash
	limits   quoteLimits
	free     chan []byte
	out      chan chunk
	progress func(n int64)
	stop     func(seq int64) bool // true when chunks from seq on are not wanted
}

func (k *chunker) run(ctx context.Context) error {
	defer close(k.out)
	var carry []byte // the unfinished record after the last chunk
	line := int64(1)
	var seq int64
	for eof := false; !eof; seq++ {
		if err := ctx.Err(); err != nil {
			return err
		}
		var buf []byte
		select {
		case buf = <-k.free:
		case <-ctx.Done():
			return ctx.Err()
		}
		buf = buf[:cap(buf)]
		if len(buf) <= len(carry) {
			buf = make([]byte, 2*len(carry))
		}
		n := copy(buf, carry)
		end := -1
		for {
			m, err := io.ReadFull(k.src, buf[n:])
			n += m
			if err == io.EOF || err == io.ErrUnexpectedEOF {
				eof = true
				end = n
				break
			} else if err != nil {
				return err
			}
			if end = recordsEnd(buf[:n], k.limits); end >= 0 {
				break
			}
			// No record ends in the buffer: with quoted fields bounded,
			// only a line without a line end gets here.
			if len(buf) >= maxLineSize {
				return fmt.Errorf("line %d: longer than %d bytes without a line end", line, maxLineSize)
			}
			buf = append(buf[:n], make([]byte, len(buf))...)
			buf = buf[:cap(buf)]
		}
		data := buf[:end]
		carry = append(carry[:0], buf[end:n]...)
		k.hash.Write(data)
		ch := chunk{seq: seq, data: data, firstLine: line, last: eof, buf: buf}
		line += int64(bytes.Count(data, []byte{'\n'}))
		if k.progress != nil {
			k.progress(int64(len(data)))
		}
		if k.stop != nil && k.stop(seq) {
			return nil // a strict run failed in an earlier chunk
		}
		select {
		case k.out <- ch:
		case <-ctx.Done():
			return ctx.Err()
		}
	}
	return nil
}

// quoteLimits bound a quoted field: it may hold at most lines-1 line ends
// and span at most bytes bytes from its opening quote.
type quoteLimits struct {
	lines int
	bytes int64
}

func (st *settings) quoteLimits() quoteLimits {
	return quoteLimits{lines: st.opts.MaxQuotedLines, bytes: st.opts.MaxQuotedBytes}
}

// The outcomes of scanRecord.
const (
	recordWhole    = iota // a whole record
	recordBadQuote        // a quoted field that does not close within the limits, or text after a closing quote
	recordMore            // the data ends inside a record that may yet be whole
)

// scanRecord finds the record at the start of data, which starts a line,
// and returns its length with its line end and its outcome. A quote opens a
// quoted field only as the first byte of a field (elsewhere it is text, so
// that an inch mark 12" is read as written); inside, "" is a quote, and the
// closing quote must be followed by a comma or the line end. A record with
// a quote fault is its first line alone: reading resumes on the next line.
// atEOF says that data ends where the file does. The work is linear: each
// byte is looked at a bounded number of times, whatever the quotes.
func scanRecord(data []byte, atEOF bool, lim quoteLimits) (n, outcome int) {
	bad := func() (int, int) {
		if i := bytes.IndexByte(data, '\n'); i >= 0 {
			return i + 1, recordBadQuote
		}
		if atEOF {
			return len(data), recordBadQuote
		}
		return 0, recordMore
	}
	i, fieldStart := 0, true
	for {
		if i >= len(data) {
			if atEOF {
				return len(data), recordWhole
			}
			return 0, recordMore
		}
		switch c := data[i]; {
		case c == '\n':
			return i + 1, recordWhole
		case c == ',':
			fieldStart = true
			i++
			continue
		case c != '"' || !fieldStart:
			fieldStart = false
			i++
			continue
		}
		// A quoted field opens at i.
		open := i
		i++
		lineEnds := 0
		for {
			rest := data[i:]
			q := bytes.IndexByte(rest, '"')
			span := rest
			if q >= 0 {
				span = rest[:q]
			}
			if int64(i+len(span)-open) > lim.bytes {
				span = span[:max(0, int(lim.bytes)-(i-open))]
				q = -2 // over the byte limit
			}
			lineEnds += bytes.Count(span, []byte{'\n'})
			if lineEnds > lim.lines-1 || q == -2 {
				return bad()
			}
			if q < 0 {
				if atEOF {
					return bad() // never closes
				}
				return 0, recordMore
			}
			k := i + q // the quote
			if k+1 == len(data) {
				if atEOF {
					return len(data), recordWhole
				}
				return 0, recordMore
			}
			switch data[k+1] {
			case '"':
				i = k + 2
				continue
			case ',':
				i, fieldStart = k+2, true
			case '\n':
				return k + 2, recordWhole
			case '\r':
				if k+2 == len(data) {
					if atEOF {
						return len(data), recordWhole
					}
					return 0, recordMore
				}
				if data[k+2] == '\n' {
					return k + 3, recordWhole
				}
				return bad()
			default:
				return bad()
			}
			break
		}
	}
}

// recordsEnd returns the index after the last whole record of data, which
// starts a record, or -1 when no record ends in data. Lines without a quote
// before the next quote are records of their own.
func recordsEnd(data []byte, lim quoteLimits) int {
	end := -1
	for pos := 0; pos < len(data); {
		q := bytes.IndexByte(data[pos:], '"')
		if q < 0 {
			if nl := bytes.LastIndexByte(data[pos:], '\n'); nl >= 0 {
				return pos + nl + 1
			}
			return end
		}
		ls := pos + bytes.LastIndexByte(data[pos:pos+q], '\n') + 1 // the start of the quote's line
		if ls > pos {
			end = ls
		}
		n, outcome := scanRecord(data[ls:], false, lim)
		if outcome == recordMore {
			return end
		}
		pos = ls + n
		end = pos
	}
	return end
}

// lineSplitter yields the records of a chunk with their line numbers.
type lineSplitter struct {
	data   []byte
	line   int64 // line number of the next record
	atEOF  bool  // data ends where the file does
	limits quoteLimits
}

// The kinds of record next returns.
const (
	plainRecord  = iota // no quote: split at commas
	quotedRecord        // quotes: split by splitQuoted
	badQuote            // a quote fault (see scanRecord): the record is one line, not to be split
)

// next returns the next record without its line end, the line it starts
// on, its kind, and false at the end.
func (s *lineSplitter) next() (rec []byte, line int64, kind int, ok bool) {
	for len(s.data) > 0 {
		line = s.line
		i := bytes.IndexByte(s.data, '\n')
		if i < 0 {
			rec = s.data
		} else {
			rec = s.data[:i]
		}
		kind = plainRecord
		n := len(rec) + 1
		if bytes.IndexByte(rec, '"') >= 0 {
			var outcome int
			n, outcome = scanRecord(s.data, true, s.limits)
			rec = s.data[:n]
			if outcome == recordBadQuote {
				kind = badQuote
			} else {
				kind = quotedRecord
			}
			rec = bytes.TrimSuffix(rec, []byte{'\n'})
		}
		s.line += int64(bytes.Count(rec, []byte{'\n'})) + 1
		s.data = s.data[min(n, len(s.data)):]
		if n := len(rec); n > 0 && rec[n-1] == '\r' {
			rec = rec[:n-1]
		}
		if len(bytes.TrimSpace(rec)) == 0 {
			continue // blank lines are not rows
		}
		return rec, line, kind, true
	}
	return nil, 0, 0, false
}

// quoteFault says what is wrong with a record of kind badQuote.
func quoteFault(lim quoteLimits) fault {
	detail := fmt.Sprintf("a quoted field opened on this line does not close within %d line(s) and %d bytes, or has text after its closing quote; reading resumes on the next line",
		lim.lines, lim.bytes)
	return fault{reason: ReasonUnbalancedQuote, detail: detail}
}

// splitFields cuts an unquoted record at commas into dst, trimming spaces
// and tabs. Fields of trip tables are short, so one pass over the bytes is
// faster than a search per field.
func splitFields(rec []byte, dst [][]byte) [][]byte {
	dst = dst[:0]
	start := 0
	for i, c := range rec {
		if c == ',' {
			dst = append(dst, trimSpace(rec[start:i]))
			start = i + 1
		}
	}
	return append(dst, trimSpace(rec[start:]))
}

var errQuote = errors.New("text after a closing quote")

// splitQuoted cuts a record with quotes, whole by scanRecord, into fields:
// a field opening with a quote runs to its closing quote, "" inside it
// being a quote. Unquoted values are kept in buf, which is returned for
// reuse; the fields point into rec and buf.
func splitQuoted(rec []byte, dst [][]byte, buf []byte) ([][]byte, []byte, error) {
	dst = dst[:0]
	if cap(buf) < len(rec) {
		buf = make([]byte, 0, len(rec)) // no growth below: fields keep pointing into it
	}
	buf = buf[:0]
	for i := 0; ; i++ { // i is at a field's start
		if i < len(rec) && rec[i] == '"' {
			start := len(buf)
			closed := false
			for i++; i < len(rec); i++ {
				if rec[i] == '"' {
					if i+1 < len(rec) && rec[i+1] == '"' {
						buf = append(buf, '"')
						i++
						continue
					}
					i++
					closed = true
					break
				}
				buf = append(buf, rec[i])
			}
			if !closed || i < len(rec) && rec[i] != ',' {
				return dst[:0], buf, errQuote
			}
			dst = append(dst, trimSpace(buf[start:len(buf):len(buf)]))
		} else {
			j := bytes.IndexByte(rec[i:], ',')
			if j < 0 {
				return append(dst, trimSpace(rec[i:])), buf, nil
			}
			dst = append(dst, trimSpace(rec[i:i+j]))
			i += j
		}
		if i >= len(rec) {
			return dst, buf, nil
		}
	}
}

func trimSpace(b []byte) []byte {
	for len(b) > 0 && (b[0] == ' ' || b[0] == '\t') {
		b = b[1:]
	}
	for len(b) > 0 && (b[len(b)-1] == ' ' || b[len(b)-1] == '\t') {
		b = b[:len(b)-1]
	}
	return b
}

func hexSum(h hash.Hash) string { return hex.EncodeToString(h.Sum(nil)) }

func newHash() hash.Hash { return sha256.New() }
