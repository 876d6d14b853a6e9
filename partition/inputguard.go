package partition

import (
	"fmt"
	"io"
)

// Bounds on what an extract may make the reader hold or expand. A real
// extract compresses about 10 to 20 times (gzip or bzip2 of OSM XML; from
// memory, not measured here); a decompression bomb, a few megabytes that
// expand to gigabytes of repeated nodes or one endless comment, far more.
const (
	// maxExpansion is the largest ratio of decompressed to compressed
	// bytes read so far, checked once expansionGrace bytes have come out.
	maxExpansion   = 100
	expansionGrace = 64 << 20
	// maxXMLToken is the longest XML token (tag, comment, text, CDATA) an
	// extract may hold: OSM tags are short; encoding/xml holds a whole
	// token in memory.
	maxXMLToken = 1 << 20
	// maxXMLDepth is the deepest nesting of XML elements (OSM needs three).
	maxXMLDepth = 64
)

// countingReader counts the bytes read through it.
type countingReader struct {
	r io.Reader
	n int64
}

func (c *countingReader) Read(p []byte) (int, error) {
	n, err := c.r.Read(p)
	c.n += int64(n)
	return n, err
}

// expansionGuard fails a decompressed stream that expands more than
// maxExpansion times the compressed bytes read beneath it.
type expansionGuard struct {
	r   io.Reader
	in  *countingReader
	out int64
}

func (g *expansionGuard) Read(p []byte) (int, error) {
	n, err := g.r.Read(p)
	g.out += int64(n)
	if g.out > expansionGrace && g.out > maxExpansion*g.in.n {
		return n, fmt.Errorf("decompressed data grows more than %d times its compressed size (%d bytes from %d): not an OSM extract", maxExpansion, g.out, g.in.n)
	}
	return n, err
}

// errXMLToken and errXMLDepth are the XML guard's errors.
var (
	errXMLToken = fmt.Errorf("an XML token is longer than %d bytes (not an OSM extract)", maxXMLToken)
	errXMLDepth = fmt.Errorf("XML elements nest deeper than %d levels (not an OSM extract)", maxXMLDepth)
)

// xmlGuard passes XML through while lexing it just enough to bound the
// length of each token and the depth of elements, which the XML decoder
// would otherwise hold in memory without limit.
type xmlGuard struct {
	r       io.Reader
	state   int // xmlText, xmlTag, ...
	run     int // bytes in the current token
	depth   int
	prev    [2]byte // the last two bytes, for "-->" and "]]>"
	tagKind byte    // first byte after '<' ('/', '!', '?' or a name)
	slash   bool    // the tag's last byte before '>' was '/'
	opened  int     // bytes since '<' of the current tag
	err     error
}

const (
	xmlText = iota
	xmlTag
	xmlComment
	xmlCDATA
)

func newXMLGuard(r io.Reader) *xmlGuard { return &xmlGuard{r: r} }

func (g *xmlGuard) Read(p []byte) (int, error) {
	if g.err != nil {
		return 0, g.err
	}
	n, err := g.r.Read(p)
	for _, b := range p[:n] {
		if e := g.step(b); e != nil {
			g.err = e
			return 0, e
		}
	}
	return n, err
}

func (g *xmlGuard) step(b byte) error {
	g.run++
	if g.run > maxXMLToken {
		return errXMLToken
	}
	switch g.state {
	case xmlText:
		if b == '<' {
			g.state, g.run, g.opened, g.tagKind, g.slash = xmlTag, 1, 1, 0, false
		}
	case xmlTag:
		g.opened++
		if g.opened == 2 {
			g.tagKind = b
		}
		if g.tagKind == '!' && g.opened == 4 && g.prev[0] == '!' && g.prev[1] == '-' && b == '-' {
			g.state = xmlComment
		} else if g.tagKind == '!' && g.opened == 3 && b == '[' {
			g.state = xmlCDATA
		} else if b == '>' {
			switch {
			case g.tagKind == '/':
				g.depth--
			case g.tagKind == '!' || g.tagKind == '?' || g.slash:
			default:
				g.depth++
				if g.depth > maxXMLDepth {
					return errXMLDepth
				}
			}
			g.state, g.run = xmlText, 0
		}
		g.slash = b == '/'
	case xmlComment:
		if b == '>' && g.prev == [2]byte{'-', '-'} {
			g.state, g.run = xmlText, 0
		}
	case xmlCDATA:
		if b == '>' && g.prev == [2]byte{']', ']'} {
			g.state, g.run = xmlText, 0
		}
	}
	g.prev = [2]byte{g.prev[1], b}
	return nil
}
