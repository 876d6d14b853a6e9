package report

import (
	"archive/zip"
	"bytes"
	"io"
	"sort"
	"strings"
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
		default:
			err = copyPart(zw, zf)
		}
		if err != nil {
			return err
		}
	}
	return zw.Close()
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
// series (scatterNames) would show as "Column G" or an
// error. Delete when excelize writes numeric x values and literal series
// names.
func fixChart(data []byte) []byte {
	data = bytes.ReplaceAll(data, []byte("<xVal><strRef>"), []byte("<xVal><numRef>"))
	data = bytes.ReplaceAll(data, []byte("</strRef></xVal>"), []byte("</numRef></xVal>"))
	for _, name := range scatterNames() {
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
