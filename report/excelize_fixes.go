package report

import (
	"archive/zip"
	"bufio"
	"bytes"
	"fmt"
	"io"
	"sort"
	"strings"

	"github.com/xuri/excelize/v2"
)

// This file works around what excelize v2.11.1 gets wrong. Each function
// says what it repairs; delete it, and its call, once excelize does it
// right (check with the tests, which read the workbook back, and with two
// writes of the same workbook, which must be byte-identical).

// escapeHexEscapes protects text that contains the workbook format's own
// character escape, _xHHHH_ (for example a road named "_x0041_"): spreadsheet
// readers decode it, so its underscore is itself escaped as _x005F_ and the
// text reads back unchanged. excelize's SetCellStr does not do this (its
// stream writer does); delete when it does.
func escapeHexEscapes(s string) string {
	if !strings.Contains(s, "_x") {
		return s
	}
	var b strings.Builder
	for i := 0; i < len(s); i++ {
		if s[i] == '_' && i+6 < len(s) && s[i+1] == 'x' && s[i+6] == '_' && isHex4(s[i+2:i+6]) {
			b.WriteString("_x005F_")
			continue
		}
		b.WriteByte(s[i])
	}
	return b.String()
}

func isHex4(s string) bool {
	for i := 0; i < 4; i++ {
		if _, ok := hexDigit(s[i]); !ok {
			return false
		}
	}
	return true
}

// repack writes the workbook package pkg, as excelize wrote it, to w with
// what excelize leaves to chance put in order and its charts repaired:
// excelize adds the image extensions to [Content_Types].xml by ranging over
// a map, and writes stream-written sheets in map order, so two writes of the
// same workbook differ. repack rewrites [Content_Types].xml with its
// Default elements sorted, puts the parts in descending name order (the
// order excelize uses for the others) and repairs the chart parts (see
// fixChart). Every other part is copied unchanged (still compressed).
// Delete when excelize writes a package deterministically and its charts
// right.
func repack(w io.Writer, pkg []byte) error {
	zr, err := zip.NewReader(bytes.NewReader(pkg), int64(len(pkg)))
	if err != nil {
		return err
	}
	files := append([]*zip.File(nil), zr.File...)
	sort.SliceStable(files, func(i, j int) bool { return files[i].Name > files[j].Name })
	zw := zip.NewWriter(w)
	for _, zf := range files {
		var err error
		switch {
		case zf.Name == "[Content_Types].xml" || strings.HasPrefix(zf.Name, "xl/charts/chart"):
			err = rewritePart(zw, zf)
		case strings.HasPrefix(zf.Name, "xl/worksheets/sheet") && strings.HasSuffix(zf.Name, ".xml"):
			err = fixDimension(zw, zf)
		default:
			err = copyPart(zw, zf)
		}
		if err != nil {
			return err
		}
	}
	return zw.Close()
}

// fixDimension writes a worksheet part with its <dimension ref> set to the
// range its cells and merged cells use: excelize leaves it at "A1", and
// readers that trust it (openpyxl in read-only mode) then see one cell.
// The part is read twice, streaming (a sheet near the row limit is a few
// hundred megabytes of XML): once for the range, once to copy it with the
// dimension, which excelize writes near the start, replaced. Delete when
// excelize writes the dimension.
func fixDimension(zw *zip.Writer, zf *zip.File) error {
	rc, err := zf.Open()
	if err != nil {
		return err
	}
	ref, err := usedRange(rc)
	rc.Close()
	if err != nil {
		return fmt.Errorf("report: workbook part %s: %v", zf.Name, err)
	}
	if rc, err = zf.Open(); err != nil {
		return err
	}
	defer rc.Close()
	br := bufio.NewReaderSize(rc, 64<<10)
	head, err := br.Peek(64 << 10)
	if err != nil && err != io.EOF && err != bufio.ErrBufferFull {
		return err
	}
	const open = `<dimension ref="`
	i := bytes.Index(head, []byte(open))
	j := -1
	if i >= 0 {
		j = bytes.IndexByte(head[i+len(open):], '"')
	}
	if ref == "" || i < 0 || j < 0 {
		return copyPart(zw, zf)
	}
	w, err := zw.CreateHeader(&zip.FileHeader{Name: zf.Name, Method: zip.Deflate})
	if err != nil {
		return err
	}
	start, end := i+len(open), i+len(open)+j
	if _, err := w.Write(head[:start]); err != nil {
		return err
	}
	if _, err := io.WriteString(w, ref); err != nil {
		return err
	}
	if _, err := w.Write(head[end:]); err != nil {
		return err
	}
	if _, err := br.Discard(len(head)); err != nil {
		return err
	}
	_, err = io.Copy(w, br)
	return err
}

// usedRange returns the range ("A1:L238") spanned by the cell references
// (<c r="...">) and merged ranges (<mergeCell ref="...">) of a worksheet's
// XML, or "" when it has none.
func usedRange(r io.Reader) (string, error) {
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 0, 64<<10), 4<<20) // a cell's text is at most 32,767 characters
	sc.Split(splitAtTag)
	minCol, minRow, maxCol, maxRow := 0, 0, 0, 0
	see := func(ref string) {
		col, row, err := excelize.CellNameToCoordinates(ref)
		if err != nil {
			return
		}
		if maxCol == 0 {
			minCol, minRow, maxCol, maxRow = col, row, col, row
			return
		}
		minCol, minRow = min(minCol, col), min(minRow, row)
		maxCol, maxRow = max(maxCol, col), max(maxRow, row)
	}
	for sc.Scan() {
		tok := sc.Bytes()
		switch {
		case bytes.HasPrefix(tok, []byte(`c r="`)):
			if q := bytes.IndexByte(tok[5:], '"'); q >= 0 {
				see(string(tok[5 : 5+q]))
			}
		case bytes.HasPrefix(tok, []byte(`mergeCell ref="`)):
			rest := tok[len(`mergeCell ref="`):]
			if q := bytes.IndexByte(rest, '"'); q >= 0 {
				a, b, _ := strings.Cut(string(rest[:q]), ":")
				see(a)
				if b != "" {
					see(b)
				}
			}
		}
	}
	if err := sc.Err(); err != nil {
		return "", err
	}
	if maxCol == 0 {
		return "", nil
	}
	from, _ := excelize.CoordinatesToCellName(minCol, minRow)
	to, _ := excelize.CoordinatesToCellName(maxCol, maxRow)
	if from == to {
		return from, nil
	}
	return from + ":" + to, nil
}

// splitAtTag splits XML into the pieces that follow each '<', so that each
// token starts with an element's name.
func splitAtTag(data []byte, atEOF bool) (advance int, token []byte, err error) {
	start := bytes.IndexByte(data, '<')
	if start < 0 {
		if atEOF {
			return len(data), nil, nil
		}
		return len(data), nil, nil
	}
	end := bytes.IndexByte(data[start+1:], '<')
	if end < 0 {
		if atEOF {
			return len(data), data[start+1:], nil
		}
		if start > 0 {
			return start, nil, nil
		}
		return 0, nil, nil
	}
	return start + 1 + end, data[start+1 : start+1+end], nil
}

// copyPart copies a part as it is, still compressed.
func copyPart(zw *zip.Writer, zf *zip.File) error {
	raw, err := zf.OpenRaw()
	if err != nil {
		return err
	}
	w, err := zw.CreateRaw(&zf.FileHeader)
	if err != nil {
		return err
	}
	_, err = io.Copy(w, raw)
	return err
}

// rewritePart writes [Content_Types].xml with its Default elements sorted,
// or a chart part repaired.
func rewritePart(zw *zip.Writer, zf *zip.File) error {
	rc, err := zf.Open()
	if err != nil {
		return err
	}
	data, err := io.ReadAll(rc)
	rc.Close()
	if err != nil {
		return err
	}
	w, err := zw.CreateHeader(&zip.FileHeader{Name: zf.Name, Method: zip.Deflate})
	if err != nil {
		return err
	}
	if zf.Name == "[Content_Types].xml" {
		data = sortElements(data, "<Default ", "</Default>")
	} else {
		data = fixChart(data)
	}
	_, err = w.Write(data)
	return err
}

// fixChart repairs two things excelize writes into chart parts: a scatter
// chart's x values as a string reference, which spreadsheet programs then
// plot as categories 1, 2, 3... instead of the detour ratios; and series
// names only as cell references, so that the literal names of the scatter
// series (scatterOthers, scatterCandidates) would show as "Column G" or an
// error. Delete when excelize writes numeric x values and literal series
// names.
func fixChart(data []byte) []byte {
	data = bytes.ReplaceAll(data, []byte("<xVal><strRef>"), []byte("<xVal><numRef>"))
	data = bytes.ReplaceAll(data, []byte("</strRef></xVal>"), []byte("</numRef></xVal>"))
	for _, name := range []string{scatterOthers, scatterCandidates} {
		data = bytes.ReplaceAll(data, []byte("<tx><strRef><f>"+name+"</f></strRef></tx>"), []byte("<tx><v>"+name+"</v></tx>"))
	}
	return data
}

// sortElements sorts the elements that start with open and end with close
// among the positions they occupy in data.
func sortElements(data []byte, open, close string) []byte {
	type span struct{ start, end int }
	var spans []span
	for i := 0; ; {
		s := bytes.Index(data[i:], []byte(open))
		if s < 0 {
			break
		}
		e := bytes.Index(data[i+s:], []byte(close))
		if e < 0 {
			break
		}
		spans = append(spans, span{i + s, i + s + e + len(close)})
		i += s + e + len(close)
	}
	elems := make([]string, len(spans))
	for i, sp := range spans {
		elems[i] = string(data[sp.start:sp.end])
	}
	sort.Strings(elems)
	var b bytes.Buffer
	prev := 0
	for i, sp := range spans {
		b.Write(data[prev:sp.start])
		b.WriteString(elems[i])
		prev = sp.end
	}
	b.Write(data[prev:])
	return b.Bytes()
}
