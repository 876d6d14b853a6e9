package partition

import (
	"bufio"
	"bytes"
	"cmp"
	"compress/bzip2"
	"compress/gzip"
	"context"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math"
	"runtime"
	"slices"
	"strings"
	"sync"
	"unicode"

	"github.com/paulmach/orb"
	"github.com/paulmach/osm"
	"github.com/paulmach/osm/osmpbf"
	"github.com/paulmach/osm/osmxml"
)

// extract is what the partition needs from an OSM file: the chosen ways
// as lines of WGS84 points, and the bounds.
type extract struct {
	header     *orb.Bound // bounds from the file header or <bounds>, if any
	dataBound  orb.Bound  // extent of every node read
	nodes      int        // nodes read
	ways       []wayInfo  // chosen ways, in priority order (class rank, id)
	lines      []rawLine  // their geometry; a way may give several lines
	incomplete int        // chosen ways that refer to nodes the file lacks

	waters     []waterArea     // water areas, by the lines that bound them
	splitLines []rawLine       // SplitRoads lines (their ways are in ways too)
	splitDrawn map[string]bool // split road classes also in NetworkRoads
	unused     []unusedLine    // lines of barrier kinds not chosen
	network    []unusedLine    // lines of NetworkRoads, for the maps only
	places     []placeRec      // named place nodes
	placeAreas []placeArea     // named place outlines (closed ways)
	routing    *Routing        // RouteRoads ways and barriers
}

// wayInfo describes a chosen way.
type wayInfo struct {
	id    osm.WayID
	rank  int    // position of its class in Options.Roads, then Barriers
	label string // name, else ref, else "(unnamed class)"
	class string // highway class or barrier kind
	major bool   // a chosen road class (not a barrier, not a split road)
	// tunnel marks a way underground: it may bound regions but does not
	// name them, since nobody names a district after what runs beneath it.
	tunnel bool
}

// rawLine is a run of two or more consecutive distinct nodes of a way.
type rawLine struct {
	way int32 // index into extract.ways
	pts []orb.Point
}

// nodeRec is a node's id and position in units of 1e-7 degrees, OSM's own
// resolution, kept compactly (16 bytes) so that every node of a large
// extract fits in memory in one pass: about 110 MB for the 7 million
// nodes of a 50 MB PBF.
type nodeRec struct {
	id       int64
	lon, lat int32
}

// osmUnit is the resolution of OSM coordinates in degrees.
const osmUnit = 1e-7

func toOSMUnits(deg float64) int32 { return int32(math.Round(deg / osmUnit)) }

func fromOSMUnits(u int32) float64 { return float64(u) / 1e7 }

// nodeStore collects node positions. The PBF decoder hands nodes to it
// from several goroutines (through Scanner.FilterNode, so that it can
// reuse their memory), hence the lock.
type nodeStore struct {
	mu     sync.Mutex
	recs   []nodeRec
	sorted bool // ids arrived in increasing order
	bound  orb.Bound
	err    error      // the first bad node
	places []placeRec // named place nodes
}

func newNodeStore() *nodeStore {
	return &nodeStore{sorted: true, bound: orb.Bound{Min: orb.Point{math.Inf(1), math.Inf(1)}, Max: orb.Point{math.Inf(-1), math.Inf(-1)}}}
}

func (s *nodeStore) add(n *osm.Node) {
	s.mu.Lock()
	defer s.mu.Unlock()
	if s.err != nil {
		return
	}
	if math.IsNaN(n.Lon) || math.IsNaN(n.Lat) || math.Abs(n.Lon) > 180 || math.Abs(n.Lat) > 90 {
		s.err = fmt.Errorf("node %d: lon %v, lat %v is not a position on Earth", n.ID, n.Lon, n.Lat)
		return
	}
	if k := len(s.recs); k > 0 && int64(n.ID) <= s.recs[k-1].id {
		s.sorted = false
	}
	s.recs = append(s.recs, nodeRec{int64(n.ID), toOSMUnits(n.Lon), toOSMUnits(n.Lat)})
	s.bound = s.bound.Extend(orb.Point{n.Lon, n.Lat})
	if pl, ok := placeOf(n.Tags); ok {
		pl.id, pl.pt = int64(n.ID), orb.Point{n.Lon, n.Lat}
		s.places = append(s.places, pl)
	}
}

// finish sorts the nodes by id (then position, so that a repeated id
// resolves the same way whatever order parallel decoding gave).
func (s *nodeStore) finish() []nodeRec {
	slices.SortFunc(s.places, func(a, b placeRec) int { return cmp.Compare(a.id, b.id) })
	if !s.sorted {
		slices.SortFunc(s.recs, func(a, b nodeRec) int {
			return cmp.Or(cmp.Compare(a.id, b.id), cmp.Compare(a.lon, b.lon), cmp.Compare(a.lat, b.lat))
		})
	}
	return s.recs
}

// maxNesting limits compression layers (a gzip inside a bzip2 is fine; a
// deeper stack is not an OSM extract).
const maxNesting = 2

// openOSM detects the format of r from its first bytes and returns a
// scanner for it and the format's name.
func openOSM(ctx context.Context, r io.Reader, depth int) (osm.Scanner, *osmpbf.Scanner, string, error) {
	br := bufio.NewReaderSize(r, 64<<10)
	head, err := br.Peek(4096)
	if err != nil && !errors.Is(err, io.EOF) {
		if depth > 0 {
			return nil, nil, "", fmt.Errorf("compressed data is truncated or corrupt: %v", err)
		}
		return nil, nil, "", err
	}
	if len(head) == 0 {
		if depth > 0 {
			return nil, nil, "", errors.New("empty file (the compressed stream holds no data)")
		}
		return nil, nil, "", errors.New("empty file")
	}
	switch {
	case len(head) >= 2 && head[0] == 0x1f && head[1] == 0x8b:
		if depth >= maxNesting {
			return nil, nil, "", errors.New("too many layers of compression")
		}
		in := &countingReader{r: br}
		zr, err := gzip.NewReader(in)
		if err != nil {
			return nil, nil, "", fmt.Errorf("gzip data is truncated or corrupt: %v", err)
		}
		return openOSM(ctx, &expansionGuard{r: zr, in: in}, depth+1)
	case bytes.HasPrefix(head, []byte("BZh")):
		if depth >= maxNesting {
			return nil, nil, "", errors.New("too many layers of compression")
		}
		in := &countingReader{r: br}
		return openOSM(ctx, &expansionGuard{r: bzip2.NewReader(in), in: in}, depth+1)
	case isPBF(head):
		sc := osmpbf.New(ctx, newPBFGuard(br), min(runtime.GOMAXPROCS(0), 4))
		sc.SkipRelations = true
		return sc, sc, "PBF", nil
	case len(head) < 15 && len(head) > 5 && head[4] == 0x0a && bytes.HasPrefix([]byte("OSMHeader"), head[6:]):
		return nil, nil, "", errors.New("truncated PBF: the file ends inside its first header")
	}
	if root, isXML, found := xmlRoot(head); isXML {
		switch {
		case found && root == "osm":
			return osmxml.New(ctx, newXMLGuard(br)), nil, "XML", nil
		case found:
			return nil, nil, "", fmt.Errorf("XML, but not OpenStreetMap: the root element is <%s>, want <osm>", printable([]byte(root), 40))
		default:
			return nil, nil, "", errors.New("XML without an <osm> root element in its first 4 kB (truncated, or not OpenStreetMap)")
		}
	}
	return nil, nil, "", fmt.Errorf("not an OpenStreetMap file: neither PBF nor OSM XML (starts with %q)", printable(head, 16))
}

// isPBF reports whether head starts like an OSM PBF file: a 4-byte
// big-endian BlobHeader length, then the BlobHeader with type "OSMHeader".
func isPBF(head []byte) bool {
	if len(head) < 15 {
		return false
	}
	n := binary.BigEndian.Uint32(head)
	return n > 0 && n < 64<<10 && head[4] == 0x0a && head[5] == 9 && string(head[6:15]) == "OSMHeader"
}

// xmlRoot finds the name of the root element of the XML document that
// starts in head. isXML reports whether head looks like XML at all, found
// whether the root's start tag is in head.
func xmlRoot(head []byte) (root string, isXML, found bool) {
	h := bytes.TrimPrefix(head, []byte("\xef\xbb\xbf"))
	h = bytes.TrimLeft(h, " \t\r\n")
	if !bytes.HasPrefix(h, []byte("<")) {
		return "", false, false
	}
	// Skip the declaration, comments, doctype and processing instructions.
	for {
		var end []byte
		switch {
		case bytes.HasPrefix(h, []byte("<?")):
			end = []byte("?>")
		case bytes.HasPrefix(h, []byte("<!--")):
			end = []byte("-->")
		case bytes.HasPrefix(h, []byte("<!")):
			end = []byte(">")
		case bytes.HasPrefix(h, []byte("<")):
			name := h[1:]
			i := bytes.IndexAny(name, " \t\r\n/>")
			if i <= 0 {
				return "", true, false
			}
			return string(name[:i]), true, true
		default:
			return "", true, false
		}
		i := bytes.Index(h, end)
		if i < 0 {
			return "", true, false
		}
		h = bytes.TrimLeft(h[i+len(end):], " \t\r\n")
	}
}

func printable(b []byte, n int) string {
	if len(b) > n {
		b = b[:n]
	}
	return strings.Map(func(r rune) rune {
		if unicode.IsControl(r) || r == 0xfffd || (r >= 0x202a && r <= 0x202e) || (r >= 0x2066 && r <= 0x2069) {
			return '.'
		}
		return r
	}, string(b))
}

// readOSM reads the chosen ways and the nodes they use from r. It keeps
// every node's position compactly (one pass, any reader) and resolves the
// ways at the end, so nodes may come after ways.
func readOSM(ctx context.Context, r io.Reader, o *Options) (*extract, error) {
	sc, pbf, format, err := openOSM(ctx, r, 0)
	if err != nil {
		return nil, err
	}
	defer sc.Close()
	ex := &extract{}
	rd := newElementReader(o)
	if pbf != nil {
		if err := rd.preparePBF(pbf, ex); err != nil {
			return nil, err
		}
	}
	count, err := rd.scan(ctx, sc, ex)
	if err != nil {
		return nil, err
	}
	if err := sc.Err(); err != nil {
		return nil, scanError(err, format, pbf != nil, count)
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	nodes := rd.store.finish()
	ex.nodes, ex.dataBound = len(nodes), rd.store.bound
	if len(nodes) == 0 && len(rd.ways) == 0 && ex.header == nil {
		return nil, fmt.Errorf("the %s file holds no OSM nodes or ways", format)
	}
	rd.resolve(nodes, ex)
	ex.routing = rd.resolveRouting(nodes)
	return ex, nil
}

// scanError explains an error the scanner stopped with.
func scanError(err error, format string, isPBF bool, count int) error {
	if errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded) {
		return err
	}
	if errors.Is(err, io.ErrUnexpectedEOF) {
		inside := "an element"
		if isPBF {
			inside = "a data block"
		}
		return fmt.Errorf("%s is truncated: it ends inside %s, after %d elements", format, inside, count)
	}
	return fmt.Errorf("reading %s after %d elements: %v", format, count, err)
}

// label is how a way is named in border road lists.
// Motorways and trunks go by their ref ("I 83"), as signed and as
// locals say, rather than a long official name.
// A value listing several ("I 95;US 40") gives its first, the one
// signed first (OSM's ";" separator, common practice).
func label(tags osm.Tags, class string) string {
	if class == "motorway" || class == "trunk" {
		if r := firstValue(tags.Find("ref")); r != "" {
			return r
		}
	}
	if n := firstValue(tags.Find("name")); n != "" {
		return n
	}
	if r := firstValue(tags.Find("ref")); r != "" {
		return r
	}
	return "(unnamed " + class + ")"
}

// firstValue returns the first of the ";"-separated values of a tag,
// trimmed.
func firstValue(v string) string {
	if i := strings.IndexByte(v, ';'); i >= 0 {
		v = v[:i]
	}
	v = strings.TrimSpace(v)
	if strings.EqualFold(v, "fixme") { // a mapper's note, not a name
		return ""
	}
	return v
}

// isTunnel reports whether tags put a way underground.
func isTunnel(tags osm.Tags) bool {
	t := tags.Find("tunnel")
	return t != "" && t != "no"
}

func osmBound(b *osm.Bounds) orb.Bound {
	return orb.Bound{Min: orb.Point{b.MinLon, b.MinLat}, Max: orb.Point{b.MaxLon, b.MaxLat}}
}
