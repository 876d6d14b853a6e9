package partition

import (
	"bufio"
	"bytes"
	"compress/zlib"
	"context"
	"encoding/binary"
	"fmt"
	"io"
	"math"
	"os"
	"runtime"
	"runtime/debug"
	"runtime/metrics"
	"slices"
	"testing"
	"time"

	"github.com/paulmach/orb"
	"github.com/paulmach/osm"
	"github.com/paulmach/osm/osmpbf"
)

// A small OSM PBF encoder for tests, after fileformat.proto and
// osmformat.proto of the OSM PBF format: an OSMHeader blob, then OSMData
// blobs, zlib-compressed, each a PrimitiveBlock of one PrimitiveGroup of
// dense nodes or of ways. The protobuf wire encoding is written by hand.

// pbfInfo is the metadata of an element (Info / DenseInfo).
type pbfInfo struct {
	version   int32
	timestamp int64 // seconds since 1970
	changeset int64
	uid       int32
	user      string
}

// pbfNode is a node; lat and lon are in units of 1e-7 degrees.
type pbfNode struct {
	id       int64
	lat, lon int32
	tags     []string // key, value, key, value...
	info     pbfInfo
}

type pbfWay struct {
	id   int64
	refs []int64
	tags []string
	info pbfInfo
}

// pbfEntitiesPerBlock is about what common writers put in a block.
const pbfEntitiesPerBlock = 8000

// pbfWriter writes nodes, then ways, as an OSM PBF. The caller must not
// change the slices of an element after handing it over.
type pbfWriter struct {
	w     *bufio.Writer
	nodes []pbfNode
	ways  []pbfWay
	err   error

	strIndex map[string]uint64
	strList  []string
	block    []byte // PrimitiveBlock being encoded
	scratch  [9][]byte
	zbuf     bytes.Buffer
	zw       *zlib.Writer
}

// Wire types.
const (
	wireVarint = 0
	wireBytes  = 2
)

func appendKey(b []byte, field, wire int) []byte {
	return binary.AppendUvarint(b, uint64(field<<3|wire))
}

func appendVarintField(b []byte, field int, v uint64) []byte {
	return binary.AppendUvarint(appendKey(b, field, wireVarint), v)
}

func appendBytesField(b []byte, field int, data []byte) []byte {
	b = binary.AppendUvarint(appendKey(b, field, wireBytes), uint64(len(data)))
	return append(b, data...)
}

// appendPackedField writes a packed repeated field unless it is empty.
func appendPackedField(b []byte, field int, packed []byte) []byte {
	if len(packed) == 0 {
		return b
	}
	return appendBytesField(b, field, packed)
}

func appendSint(b []byte, v int64) []byte { return binary.AppendUvarint(b, zigzag(v)) }

// newPBFWriter writes the header block with bound as its bbox.
func newPBFWriter(w io.Writer, bound orb.Bound) (*pbfWriter, error) {
	pw := &pbfWriter{w: bufio.NewWriterSize(w, 1<<20), strIndex: map[string]uint64{}}
	pw.zw = zlib.NewWriter(&pw.zbuf)
	nano := func(deg float64) uint64 { return zigzag(int64(deg*1e9 + 0.5*sign(deg))) }
	var bbox []byte
	bbox = appendVarintField(bbox, 1, nano(bound.Min[0])) // left
	bbox = appendVarintField(bbox, 2, nano(bound.Max[0])) // right
	bbox = appendVarintField(bbox, 3, nano(bound.Max[1])) // top
	bbox = appendVarintField(bbox, 4, nano(bound.Min[1])) // bottom
	var head []byte
	head = appendBytesField(head, 1, bbox)
	head = appendBytesField(head, 4, []byte("OsmSchema-V0.6"))
	head = appendBytesField(head, 4, []byte("DenseNodes"))
	head = appendBytesField(head, 16, []byte("narrows partition tests"))
	pw.writeBlob("OSMHeader", head)
	return pw, pw.err
}

func sign(v float64) float64 {
	if v < 0 {
		return -1
	}
	return 1
}

func (pw *pbfWriter) node(n pbfNode) {
	if len(pw.ways) > 0 {
		pw.err = fmt.Errorf("node %d after ways", n.id)
		return
	}
	pw.nodes = append(pw.nodes, n)
	if len(pw.nodes) == pbfEntitiesPerBlock {
		pw.flush()
	}
}

func (pw *pbfWriter) way(w pbfWay) {
	if len(pw.nodes) > 0 {
		pw.flush()
	}
	pw.ways = append(pw.ways, w)
	if len(pw.ways) == pbfEntitiesPerBlock {
		pw.flush()
	}
}

// close writes the last block and flushes the output.
func (pw *pbfWriter) close() error {
	pw.flush()
	if pw.err != nil {
		return pw.err
	}
	return pw.w.Flush()
}

// str returns the string table index of s; index 0 is the empty string,
// reserved as the key list delimiter of dense nodes.
func (pw *pbfWriter) str(s string) uint64 {
	if i, ok := pw.strIndex[s]; ok {
		return i
	}
	i := uint64(len(pw.strList))
	pw.strIndex[s] = i
	pw.strList = append(pw.strList, s)
	return i
}

// flush encodes the pending nodes or ways as one OSMData block.
func (pw *pbfWriter) flush() {
	if pw.err != nil || len(pw.nodes)+len(pw.ways) == 0 {
		return
	}
	clear(pw.strIndex)
	pw.strList = pw.strList[:0]
	pw.str("")
	s := &pw.scratch
	for i := range s {
		s[i] = s[i][:0]
	}
	var group []byte
	if len(pw.nodes) > 0 {
		// ids, lats, lons, keys_vals; DenseInfo: versions, timestamps,
		// changesets, uids, user_sids. All but versions and keys_vals are
		// delta coded.
		var prev pbfNode
		var prevSid int64
		hasTags := false
		for _, n := range pw.nodes {
			s[0] = appendSint(s[0], n.id-prev.id)
			s[1] = appendSint(s[1], int64(n.lat)-int64(prev.lat))
			s[2] = appendSint(s[2], int64(n.lon)-int64(prev.lon))
			for _, t := range n.tags {
				s[3] = binary.AppendUvarint(s[3], pw.str(t))
				hasTags = true
			}
			s[3] = append(s[3], 0)
			s[4] = binary.AppendUvarint(s[4], uint64(n.info.version))
			s[5] = appendSint(s[5], n.info.timestamp-prev.info.timestamp)
			s[6] = appendSint(s[6], n.info.changeset-prev.info.changeset)
			s[7] = appendSint(s[7], int64(n.info.uid)-int64(prev.info.uid))
			sid := int64(pw.str(n.info.user))
			s[8] = appendSint(s[8], sid-prevSid)
			prev, prevSid = n, sid
		}
		var info []byte
		info = appendPackedField(info, 1, s[4])
		info = appendPackedField(info, 2, s[5])
		info = appendPackedField(info, 3, s[6])
		info = appendPackedField(info, 4, s[7])
		info = appendPackedField(info, 5, s[8])
		var dense []byte
		dense = appendPackedField(dense, 1, s[0])
		dense = appendBytesField(dense, 5, info)
		dense = appendPackedField(dense, 8, s[1])
		dense = appendPackedField(dense, 9, s[2])
		if hasTags {
			dense = appendPackedField(dense, 10, s[3])
		}
		group = appendBytesField(group, 2, dense)
		pw.nodes = pw.nodes[:0]
	} else {
		var way, info []byte
		for _, w := range pw.ways {
			keys, vals, refs := s[0][:0], s[1][:0], s[2][:0]
			for i := 0; i+1 < len(w.tags); i += 2 {
				keys = binary.AppendUvarint(keys, pw.str(w.tags[i]))
				vals = binary.AppendUvarint(vals, pw.str(w.tags[i+1]))
			}
			var prev int64
			for _, r := range w.refs {
				refs = appendSint(refs, r-prev)
				prev = r
			}
			info = appendVarintField(info[:0], 1, uint64(w.info.version))
			info = appendVarintField(info, 2, uint64(w.info.timestamp))
			info = appendVarintField(info, 3, uint64(w.info.changeset))
			info = appendVarintField(info, 4, uint64(w.info.uid))
			info = appendVarintField(info, 5, pw.str(w.info.user))
			way = appendVarintField(way[:0], 1, uint64(w.id))
			way = appendPackedField(way, 2, keys)
			way = appendPackedField(way, 3, vals)
			way = appendBytesField(way, 4, info)
			way = appendPackedField(way, 8, refs)
			group = appendBytesField(group, 3, way)
			s[0], s[1], s[2] = keys, vals, refs
		}
		pw.ways = pw.ways[:0]
	}
	var table []byte
	for _, str := range pw.strList {
		table = appendBytesField(table, 1, []byte(str))
	}
	b := appendBytesField(pw.block[:0], 1, table)
	b = appendBytesField(b, 2, group)
	b = appendVarintField(b, 17, 100)  // granularity, nanodegrees
	b = appendVarintField(b, 18, 1000) // date_granularity, milliseconds
	pw.block = b
	pw.writeBlob("OSMData", b)
}

// writeBlob writes one file block: the BlobHeader size, the BlobHeader and
// the Blob with data zlib-compressed.
func (pw *pbfWriter) writeBlob(kind string, data []byte) {
	if pw.err != nil {
		return
	}
	pw.zbuf.Reset()
	pw.zw.Reset(&pw.zbuf)
	if _, err := pw.zw.Write(data); err != nil {
		pw.err = err
		return
	}
	if err := pw.zw.Close(); err != nil {
		pw.err = err
		return
	}
	var blob []byte
	blob = appendVarintField(blob, 2, uint64(len(data))) // raw_size
	blob = appendBytesField(blob, 3, pw.zbuf.Bytes())    // zlib_data
	var head []byte
	head = appendBytesField(head, 1, []byte(kind))
	head = appendVarintField(head, 3, uint64(len(blob)))
	var size [4]byte
	binary.BigEndian.PutUint32(size[:], uint32(len(head)))
	for _, part := range [][]byte{size[:], head, blob} {
		if _, err := pw.w.Write(part); err != nil {
			pw.err = err
			return
		}
	}
}

func TestPBFWriterRoundTrip(t *testing.T) {
	// Enough nodes for two dense blocks and ways for two way blocks, with
	// negative coordinates, id gaps, tags and metadata, so that every
	// delta and the block split are exercised.
	info := func(i int) pbfInfo {
		return pbfInfo{version: int32(1 + i%3), timestamp: 1_600_000_000 + int64(i)*37, changeset: 9000 + int64(i/5), uid: int32(100 + i%7), user: fmt.Sprintf("mapper%d", i%7)}
	}
	var nodes []pbfNode
	id := int64(0)
	for i := range pbfEntitiesPerBlock + 123 {
		id += 1 + int64(i%4)
		n := pbfNode{id: id, lat: 400000000 + int32(i*37%5000) - 2500, lon: -300000000 - int32(i*91%7000), info: info(i)}
		if i%10 == 0 {
			n.tags = []string{"amenity", "bench", "name", fmt.Sprintf("Seat %d", i)}
		}
		nodes = append(nodes, n)
	}
	var ways []pbfWay
	for i := range pbfEntitiesPerBlock + 5 {
		w := pbfWay{id: int64(1000 + 2*i), info: info(i)}
		for k := range 2 + i%5 {
			w.refs = append(w.refs, nodes[(i*13+k*101)%len(nodes)].id)
		}
		if i%3 > 0 {
			w.tags = []string{"highway", []string{"primary", "residential"}[i%3-1]}
		}
		ways = append(ways, w)
	}
	bound := orb.Bound{Min: orb.Point{-30.0007, 39.9997}, Max: orb.Point{-29.9999, 40.0003}}
	var buf bytes.Buffer
	pw, err := newPBFWriter(&buf, bound)
	if err != nil {
		t.Fatal(err)
	}
	for _, n := range nodes {
		pw.node(n)
	}
	for _, w := range ways {
		pw.way(w)
	}
	if err := pw.close(); err != nil {
		t.Fatal(err)
	}

	sc := osmpbf.New(context.Background(), bytes.NewReader(buf.Bytes()), 1)
	defer sc.Close()
	h, err := sc.Header()
	if err != nil {
		t.Fatal(err)
	}
	if h.Bounds == nil || !near(h.Bounds.MinLon, bound.Min[0]) || !near(h.Bounds.MaxLon, bound.Max[0]) ||
		!near(h.Bounds.MinLat, bound.Min[1]) || !near(h.Bounds.MaxLat, bound.Max[1]) {
		t.Errorf("header bounds %+v, want %v", h.Bounds, bound)
	}
	if !slices.Equal(h.RequiredFeatures, []string{"OsmSchema-V0.6", "DenseNodes"}) {
		t.Errorf("required features %q", h.RequiredFeatures)
	}
	var gotNodes, gotWays int
	for sc.Scan() {
		switch o := sc.Object().(type) {
		case *osm.Node:
			if gotNodes >= len(nodes) {
				t.Fatalf("more than %d nodes", len(nodes))
			}
			want := nodes[gotNodes]
			gotNodes++
			if int64(o.ID) != want.id || toOSMUnits(o.Lat) != want.lat || toOSMUnits(o.Lon) != want.lon {
				t.Fatalf("node %d at %v,%v, want %d at %d,%d", o.ID, o.Lat, o.Lon, want.id, want.lat, want.lon)
			}
			checkTags(t, fmt.Sprintf("node %d", o.ID), o.Tags, want.tags)
			checkInfo(t, fmt.Sprintf("node %d", o.ID), o.Version, o.ChangesetID, o.UserID, o.User, o.Timestamp, want.info)
		case *osm.Way:
			if gotWays >= len(ways) {
				t.Fatalf("more than %d ways", len(ways))
			}
			want := ways[gotWays]
			gotWays++
			refs := make([]int64, len(o.Nodes))
			for i, wn := range o.Nodes {
				refs[i] = int64(wn.ID)
			}
			if int64(o.ID) != want.id || !slices.Equal(refs, want.refs) {
				t.Fatalf("way %d refs %v, want %d refs %v", o.ID, refs, want.id, want.refs)
			}
			checkTags(t, fmt.Sprintf("way %d", o.ID), o.Tags, want.tags)
			checkInfo(t, fmt.Sprintf("way %d", o.ID), o.Version, o.ChangesetID, o.UserID, o.User, o.Timestamp, want.info)
		default:
			t.Fatalf("unexpected %T", o)
		}
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	if gotNodes != len(nodes) || gotWays != len(ways) {
		t.Errorf("read %d nodes and %d ways, wrote %d and %d", gotNodes, gotWays, len(nodes), len(ways))
	}

	// The partition reader, with its block checks, takes the file too.
	o := DefaultOptions()
	ex, err := readOSM(context.Background(), bytes.NewReader(buf.Bytes()), &o)
	if err != nil {
		t.Fatal(err)
	}
	if ex.nodes != len(nodes) || ex.header == nil || *ex.header != bound {
		t.Errorf("partition reader: %d nodes, header %v; want %d, %v", ex.nodes, ex.header, len(nodes), bound)
	}
}

func near(a, b float64) bool { return a-b < 1e-9 && b-a < 1e-9 }

func checkTags(t *testing.T, what string, got osm.Tags, want []string) {
	t.Helper()
	var flat []string
	for _, tag := range got {
		flat = append(flat, tag.Key, tag.Value)
	}
	if !slices.Equal(flat, want) {
		t.Fatalf("%s: tags %q, want %q", what, flat, want)
	}
}

func checkInfo(t *testing.T, what string, version int, cs osm.ChangesetID, uid osm.UserID, user string, ts time.Time, want pbfInfo) {
	t.Helper()
	if version != int(want.version) || int64(cs) != want.changeset || int32(uid) != want.uid || user != want.user || ts.Unix() != want.timestamp {
		t.Fatalf("%s: info %d %d %d %q %v, want %+v", what, version, cs, uid, user, ts.Unix(), want)
	}
}

// writePBFFile writes a PBF with write to a new file in dir.
func writePBFFile(tb testing.TB, dir string, bound orb.Bound, write func(*pbfWriter)) string {
	tb.Helper()
	path := dir + string(os.PathSeparator) + "city.osm.pbf"
	f, err := os.Create(path)
	if err != nil {
		tb.Fatal(err)
	}
	defer f.Close()
	pw, err := newPBFWriter(f, bound)
	if err != nil {
		tb.Fatal(err)
	}
	write(pw)
	if err := pw.close(); err != nil {
		tb.Fatal(err)
	}
	if err := f.Close(); err != nil {
		tb.Fatal(err)
	}
	return path
}

// syntheticCity is a deterministic street grid for memory measurements:
// grid×grid junctions about 100 m apart, perturbed; every majorEvery-th
// street is primary or secondary, the rest residential; each block holds
// buildings of 4, 6 or 8 corners and a tagged point, so that most nodes,
// as in real extracts, lie on no road.
type syntheticCity struct {
	grid, majorEvery, shapes, buildings int
	seed                                uint64
}

const (
	cityLat0, cityLon0 = 400000000, -300000000 // 40°N 30°W, 1e-7 degrees
	cityStepLat        = 8993                  // 100 m
	cityStepLon        = 11740                 // 100 m at 40°
)

// mix is splitmix64, a hash that makes each coordinate a function of its
// indices, so that ways can be written without keeping the nodes.
func mix(x uint64) uint64 {
	x += 0x9e3779b97f4a7c15
	x = (x ^ x>>30) * 0xbf58476d1ce4e5b9
	x = (x ^ x>>27) * 0x94d049bb133111eb
	return x ^ x>>31
}

// jitter returns a value in [-r, r] from the hash of k.
func (c syntheticCity) jitter(k uint64, r int32) int32 {
	return int32(mix(k^c.seed)%uint64(2*r+1)) - r
}

func (c syntheticCity) bound() orb.Bound {
	g := float64(c.grid)
	return orb.Bound{
		Min: orb.Point{fromOSMUnits(cityLon0) - 0.002, fromOSMUnits(cityLat0) - 0.002},
		Max: orb.Point{fromOSMUnits(cityLon0) + g*cityStepLon*osmUnit + 0.002, fromOSMUnits(cityLat0) + g*cityStepLat*osmUnit + 0.002},
	}
}

// Node id ranges, in file order.
func (c syntheticCity) junction(i, j int) int64 { return 1 + int64(i*c.grid+j) }
func (c syntheticCity) hShape(i, j, s int) int64 {
	return 1 + int64(c.grid*c.grid) + int64((i*(c.grid-1)+j)*c.shapes+s)
}
func (c syntheticCity) vShape(i, j, s int) int64 {
	return 1 + int64(c.grid*c.grid) + int64(c.grid*(c.grid-1)*c.shapes) + int64((i*c.grid+j)*c.shapes+s)
}
func (c syntheticCity) blockBase(i, j int) int64 {
	perBlock := 1 + c.buildings*6 // a point, then buildings of 4, 6, 8 corners (6 on average, buildings%3 == 0)
	return 1 + int64(c.grid*c.grid) + 2*int64(c.grid*(c.grid-1)*c.shapes) + int64((i*(c.grid-1)+j)*perBlock)
}

func corners(k int) int { return 4 + 2*(k%3) }

// junctionPos is junction (i, j): the grid point, bent by a slow wave and
// moved by up to 12 m.
func (c syntheticCity) junctionPos(i, j int) (lat, lon int32) {
	k := uint64(i*c.grid + j)
	wave := int32(300 * ((i*7+j*3)%23 - 11) / 11)
	lat = cityLat0 + int32(i)*cityStepLat + wave + c.jitter(2*k, 1100)
	lon = cityLon0 + int32(j)*cityStepLon - wave + c.jitter(2*k+1, 1400)
	return lat, lon
}

func (c syntheticCity) info(k uint64) pbfInfo {
	h := mix(k ^ c.seed ^ 0x5555)
	uid := int32(h % 500)
	return pbfInfo{version: int32(1 + h>>20%6), timestamp: 1_300_000_000 + int64(h>>24%400_000_000), changeset: 1_000_000 + int64(h>>12%150_000_000), uid: 1000 + uid, user: fmt.Sprintf("mapper_%d", uid)}
}

// write streams the city to pw and returns the node and way counts.
func (c syntheticCity) write(pw *pbfWriter) (nodes, ways int) {
	g, S := c.grid, c.shapes
	node := func(n pbfNode) { pw.node(n); nodes++ }
	for i := range g {
		for j := range g {
			lat, lon := c.junctionPos(i, j)
			node(pbfNode{id: c.junction(i, j), lat: lat, lon: lon, info: c.info(uint64(i*g + j))})
		}
	}
	shape := func(id int64, a, b [2]int32, s int) {
		f := float64(s+1) / float64(S+1)
		lat := a[0] + int32(f*float64(b[0]-a[0])) + c.jitter(uint64(id)*3, 30)
		lon := a[1] + int32(f*float64(b[1]-a[1])) + c.jitter(uint64(id)*3+1, 30)
		node(pbfNode{id: id, lat: lat, lon: lon, info: c.info(uint64(id))})
	}
	pos := func(i, j int) [2]int32 { lat, lon := c.junctionPos(i, j); return [2]int32{lat, lon} }
	for i := range g {
		for j := range g - 1 {
			for s := range S {
				shape(c.hShape(i, j, s), pos(i, j), pos(i, j+1), s)
			}
		}
	}
	for i := range g - 1 {
		for j := range g {
			for s := range S {
				shape(c.vShape(i, j, s), pos(i, j), pos(i+1, j), s)
			}
		}
	}
	amenities := []string{"bench", "cafe", "post_box", "bicycle_parking", "waste_basket"}
	for i := range g - 1 {
		for j := range g - 1 {
			id := c.blockBase(i, j)
			lat0, lon0 := cityLat0+int32(i)*cityStepLat, cityLon0+int32(j)*cityStepLon
			k := uint64(id)
			node(pbfNode{id: id, lat: lat0 + 4000 + c.jitter(k, 1500), lon: lon0 + 5000 + c.jitter(k+1, 2000),
				tags: []string{"amenity", amenities[mix(k)%5]}, info: c.info(k)})
			id++
			for b := range c.buildings {
				// Centre 25-75 m into the block, radius 5-12 m.
				k := uint64(id)
				clat := lat0 + cityStepLat/2 + c.jitter(k*7, cityStepLat/4)
				clon := lon0 + cityStepLon/2 + c.jitter(k*7+1, cityStepLon/4)
				r := 5 + float64(mix(k*7+2)%8)
				inf := c.info(k)
				n := corners(b)
				for q := range n {
					a := 2 * math.Pi * float64(q) / float64(n)
					node(pbfNode{id: id, lat: clat + int32(r*90*math.Sin(a)), lon: clon + int32(r*117*math.Cos(a)), info: inf})
					id++
				}
			}
		}
	}
	way := func(w pbfWay) { pw.way(w); ways++ }
	wayID := int64(1)
	street := func(major bool, line int, name string) []string {
		if !major {
			return []string{"highway", "residential", "name", fmt.Sprintf("%s %d", name, line)}
		}
		class := []string{"primary", "secondary"}[line/c.majorEvery%2]
		return []string{"highway", class, "name", fmt.Sprintf("%s Avenue %d", name, line), "maxspeed", "50", "lanes", "2"}
	}
	const blocksPerWay = 10
	for i := range g {
		for j0 := 0; j0 < g-1; j0 += blocksPerWay {
			refs := []int64{c.junction(i, j0)}
			for j := j0; j < min(j0+blocksPerWay, g-1); j++ {
				for s := range S {
					refs = append(refs, c.hShape(i, j, s))
				}
				refs = append(refs, c.junction(i, j+1))
			}
			way(pbfWay{id: wayID, refs: refs, tags: street(i%c.majorEvery == 0, i, "North"), info: c.info(uint64(wayID) << 32)})
			wayID++
		}
	}
	for j := range g {
		for i0 := 0; i0 < g-1; i0 += blocksPerWay {
			refs := []int64{c.junction(i0, j)}
			for i := i0; i < min(i0+blocksPerWay, g-1); i++ {
				for s := range S {
					refs = append(refs, c.vShape(i, j, s))
				}
				refs = append(refs, c.junction(i+1, j))
			}
			way(pbfWay{id: wayID, refs: refs, tags: street(j%c.majorEvery == 0, j, "East"), info: c.info(uint64(wayID) << 32)})
			wayID++
		}
	}
	for i := range g - 1 {
		for j := range g - 1 {
			id := c.blockBase(i, j) + 1
			for b := range c.buildings {
				n := corners(b)
				refs := make([]int64, n+1)
				for q := range n {
					refs[q] = id + int64(q)
				}
				refs[n] = id
				tags := []string{"building", "yes"}
				if b%4 == 0 {
					tags = append(tags, "addr:housenumber", fmt.Sprint(b+1), "addr:street", fmt.Sprintf("North %d", i))
				}
				way(pbfWay{id: wayID, refs: refs, tags: tags, info: c.info(uint64(id))})
				wayID++
				id += int64(n)
			}
		}
	}
	return nodes, ways
}

// BenchmarkRegions50MBPBF measures ReadFile on a synthetic city of about
// 50 MB of PBF, the size for which the partition must stay well under
// 1 GiB, and reports the peak heap in use and the peak memory held from
// the system (total mapped minus released to the OS, close to the
// resident size) sampled every 2 ms while it runs, and the peak live heap
// (marked by a collection), which the heap in use exceeds by the garbage
// the collector lets accumulate (GOGC).
func BenchmarkRegions50MBPBF(b *testing.B) {
	if testing.Short() {
		b.Skip("writes and reads a 50 MB file")
	}
	city := syntheticCity{grid: 310, majorEvery: 8, shapes: 2, buildings: 9, seed: 1}
	start := time.Now()
	var nodes, ways int
	path := writePBFFile(b, b.TempDir(), city.bound(), func(pw *pbfWriter) { nodes, ways = city.write(pw) })
	st, err := os.Stat(path)
	if err != nil {
		b.Fatal(err)
	}
	b.Logf("wrote %.1f MB, %d nodes, %d ways in %v", float64(st.Size())/1e6, nodes, ways, time.Since(start).Round(time.Millisecond))
	runtime.GC()
	debug.FreeOSMemory()
	var peakHeap, peakHeld, peakLive uint64
	regions := 0
	for b.Loop() {
		stop := make(chan struct{})
		done := make(chan struct{})
		go func() {
			defer close(done)
			samples := []metrics.Sample{
				{Name: "/memory/classes/heap/objects:bytes"},
				{Name: "/memory/classes/heap/unused:bytes"},
				{Name: "/memory/classes/total:bytes"},
				{Name: "/memory/classes/heap/released:bytes"},
				{Name: "/gc/heap/live:bytes"},
			}
			tick := time.NewTicker(2 * time.Millisecond)
			defer tick.Stop()
			for {
				metrics.Read(samples)
				heap := samples[0].Value.Uint64() + samples[1].Value.Uint64()
				held := samples[2].Value.Uint64() - samples[3].Value.Uint64()
				peakHeap, peakHeld = max(peakHeap, heap), max(peakHeld, held)
				peakLive = max(peakLive, samples[4].Value.Uint64())
				select {
				case <-stop:
					return
				case <-tick.C:
				}
			}
		}()
		p, err := ReadFile(context.Background(), path, DefaultOptions())
		close(stop)
		<-done
		if err != nil {
			b.Fatal(err)
		}
		regions = len(p.Regions)
	}
	// The major streets cut the grid into square districts; they end short
	// of the study rectangle, so the margin around the city is one ring.
	lines := (city.grid-1)/city.majorEvery + 1
	if want := (lines-1)*(lines-1) + 1; regions != want {
		b.Errorf("%d regions, want %d districts and the ring around them", regions, want-1)
	}
	b.ReportMetric(float64(st.Size())/1e6, "file-MB")
	b.ReportMetric(float64(nodes), "nodes")
	b.ReportMetric(float64(ways), "ways")
	b.ReportMetric(float64(regions), "regions")
	b.ReportMetric(float64(peakHeap)/(1<<20), "peak-heap-MB")
	b.ReportMetric(float64(peakHeld)/(1<<20), "peak-sys-MB")
	b.ReportMetric(float64(peakLive)/(1<<20), "peak-live-MB")
}
