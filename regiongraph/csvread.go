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
	quoted    bool  // data has a '"': records may span lines
	buf       []byte
}

// chunker cuts a stream into chunks at record boundaries, hashes it and
// reports progress. It runs in one goroutine.
type chunker struct {
	src      io.Reader
	hash     hash.Hash
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
			if end = recordEnd(buf[:n], bytes.IndexByte(buf[:n], '"') >= 0); end >= 0 {
				break
			}
			if len(buf) >= maxLineSize {
				return fmt.Errorf("line %d: record longer than %d bytes (unbalanced quote?)", line, maxLineSize)
			}
			buf = append(buf[:n], make([]byte, len(buf))...)
			buf = buf[:cap(buf)]
		}
		data := buf[:end]
		carry = append(carry[:0], buf[end:n]...)
		k.hash.Write(data)
		ch := chunk{seq: seq, data: data, firstLine: line, quoted: bytes.IndexByte(data, '"') >= 0, buf: buf}
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

// recordEnd returns the index after the last newline that ends a record, or
// -1. With quotes present, newlines inside quoted fields do not count.
func recordEnd(data []byte, quoted bool) int {
	if !quoted {
		i := bytes.LastIndexByte(data, '\n')
		if i < 0 {
			return -1
		}
		return i + 1
	}
	last := -1
	in := false
	for i, c := range data {
		switch c {
		case '"':
			in = !in
		case '\n':
			if !in {
				last = i
			}
		}
	}
	if last < 0 {
		return -1
	}
	return last + 1
}

// lineSplitter yields the records of a chunk with their line numbers.
type lineSplitter struct {
	data   []byte
	line   int64 // line number of the next record
	quoted bool
}

// next returns the next record without its line end, the line it starts on,
// whether it needs the quoted-field parser, and false at the end.
func (s *lineSplitter) next() (rec []byte, line int64, slow, ok bool) {
	for len(s.data) > 0 {
		line = s.line
		i := bytes.IndexByte(s.data, '\n')
		if i < 0 {
			rec, s.data = s.data, nil
		} else {
			rec, s.data = s.data[:i], s.data[i+1:]
		}
		s.line++
		if s.quoted && bytes.IndexByte(rec, '"') >= 0 {
			slow = true
			// Extend over quoted newlines until the quotes balance.
			for bytes.Count(rec, []byte{'"'})%2 == 1 && len(s.data) > 0 {
				j := bytes.IndexByte(s.data, '\n')
				if j < 0 {
					j = len(s.data)
				}
				rec = rec[:len(rec)+1+j] // rec and s.data are adjacent in the chunk
				if j < len(s.data) {
					s.data = s.data[j+1:]
				} else {
					s.data = nil
				}
				s.line++
			}
		}
		if n := len(rec); n > 0 && rec[n-1] == '\r' {
			rec = rec[:n-1]
		}
		if len(bytes.TrimSpace(rec)) == 0 {
			continue // blank lines are not rows
		}
		return rec, line, slow, true
	}
	return nil, 0, false, false
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

// splitQuoted parses a record with quoted fields through encoding/csv.
func splitQuoted(rec []byte, dst [][]byte) ([][]byte, error) {
	r := csv.NewReader(bytes.NewReader(rec))
	r.FieldsPerRecord = -1
	fields, err := r.Read()
	if err != nil {
		return dst[:0], err
	}
	dst = dst[:0]
	for _, f := range fields {
		dst = append(dst, trimSpace([]byte(f)))
	}
	return dst, nil
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
