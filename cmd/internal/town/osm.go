package town

import (
	"bufio"
	"encoding/xml"
	"io"
	"strconv"
)

// WriteOSM writes the town as OSM XML 0.6: the bounds, then every node
// ascending by id, then every way ascending by id. With withLink the new
// river crossing (Town.Link and its nodes) is included: that is the "after"
// network. Node and way ids of everything else are the same in both files.
func (t *Town) WriteOSM(w io.Writer, withLink bool) error {
	bw := bufio.NewWriterSize(w, 1<<16)
	var buf []byte
	buf = append(buf, `<?xml version="1.0" encoding="UTF-8"?>`+"\n"...)
	buf = append(buf, `<osm version="0.6" generator="narrows town">`+"\n"...)
	buf = append(buf, `  <bounds minlat="`...)
	buf = appendCoord(buf, t.bound.Min[1])
	buf = append(buf, `" minlon="`...)
	buf = appendCoord(buf, t.bound.Min[0])
	buf = append(buf, `" maxlat="`...)
	buf = appendCoord(buf, t.bound.Max[1])
	buf = append(buf, `" maxlon="`...)
	buf = appendCoord(buf, t.bound.Max[0])
	buf = append(buf, "\"/>\n"...)
	writeNode := func(n *osmNode) {
		buf = append(buf, `  <node id="`...)
		buf = strconv.AppendInt(buf, n.ID, 10)
		buf = append(buf, `" version="1" lat="`...)
		buf = appendCoord(buf, n.Point[1])
		buf = append(buf, `" lon="`...)
		buf = appendCoord(buf, n.Point[0])
		if len(n.Tags) == 0 {
			buf = append(buf, "\"/>\n"...)
			return
		}
		buf = append(buf, "\">\n"...)
		buf = appendTags(buf, n.Tags)
		buf = append(buf, "  </node>\n"...)
	}
	writeWay := func(wy *Way) {
		buf = append(buf, `  <way id="`...)
		buf = strconv.AppendInt(buf, wy.id, 10)
		buf = append(buf, "\" version=\"1\">\n"...)
		for _, id := range wy.nodes {
			buf = append(buf, `    <nd ref="`...)
			buf = strconv.AppendInt(buf, id, 10)
			buf = append(buf, "\"/>\n"...)
		}
		buf = appendTags(buf, wy.tags)
		buf = append(buf, "  </way>\n"...)
	}
	flush := func() error {
		if len(buf) < 1<<15 {
			return nil
		}
		_, err := bw.Write(buf)
		buf = buf[:0]
		return err
	}
	for i := range t.nodes {
		writeNode(&t.nodes[i])
		if err := flush(); err != nil {
			return err
		}
	}
	if withLink {
		for i := range t.linkNodes {
			writeNode(&t.linkNodes[i])
		}
	}
	for i := range t.ways {
		writeWay(&t.ways[i])
		if err := flush(); err != nil {
			return err
		}
	}
	if withLink && t.Link != nil {
		writeWay(t.Link)
	}
	buf = append(buf, "</osm>\n"...)
	if _, err := bw.Write(buf); err != nil {
		return err
	}
	return bw.Flush()
}

func appendCoord(b []byte, v float64) []byte { return strconv.AppendFloat(b, v, 'f', 7, 64) }

func appendTags(b []byte, tags []tag) []byte {
	for _, tg := range tags {
		b = append(b, `    <tag k="`...)
		b = appendEscaped(b, tg.Key)
		b = append(b, `" v="`...)
		b = appendEscaped(b, tg.Value)
		b = append(b, "\"/>\n"...)
	}
	return b
}

type byteAppender struct{ b []byte }

func (a *byteAppender) Write(p []byte) (int, error) { a.b = append(a.b, p...); return len(p), nil }

func appendEscaped(b []byte, s string) []byte {
	a := byteAppender{b}
	_ = xml.EscapeText(&a, []byte(s)) // writes to memory; cannot fail
	return a.b
}
