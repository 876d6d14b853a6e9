package partition

import (
	"cmp"
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"

	"github.com/paulmach/orb"
)

// ReadFile builds the partition of the OSM extract at path; see Build.
func ReadFile(ctx context.Context, path string, opts Options) (*Partition, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("partition: %w", err)
	}
	defer f.Close()
	return build(ctx, f, path, filepath.Base(path), opts)
}

// Build reads an OSM extract from r (PBF, or XML plain, gzip or bzip2,
// detected from the bytes) and partitions its study area into regions
// bounded by the chosen roads and barriers. name labels the input in
// errors and in Partition.Source.
func Build(ctx context.Context, r io.Reader, name string, opts Options) (*Partition, error) {
	return build(ctx, r, name, filepath.Base(name), opts)
}

func build(ctx context.Context, r io.Reader, name, source string, opts Options) (*Partition, error) {
	if err := opts.validate(); err != nil {
		return nil, fmt.Errorf("partition: %s: %v", name, err)
	}
	ex, err := readOSM(ctx, r, &opts)
	if err != nil {
		if errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded) {
			return nil, err
		}
		return nil, fmt.Errorf("partition: %s: %w", name, err)
	}
	p, err := fromExtract(ctx, ex, opts)
	if err != nil {
		if errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded) {
			return nil, err
		}
		return nil, fmt.Errorf("partition: %s: %w", name, err)
	}
	p.Source = source
	return p, nil
}

// classList names the chosen classes for error messages.
func classList(o *Options) string {
	return strings.Join(append(slices.Clone(o.Roads), o.Barriers...), ", ")
}

func lineBound(lines []rawLine) orb.Bound {
	b := orb.Bound{Min: orb.Point{math.Inf(1), math.Inf(1)}, Max: orb.Point{math.Inf(-1), math.Inf(-1)}}
	for _, l := range lines {
		for _, p := range l.pts {
			b = b.Extend(p)
		}
	}
	return b
}

func fmtBound(b orb.Bound) string {
	return fmt.Sprintf("%.6g,%.6g,%.6g,%.6g", b.Min[0], b.Min[1], b.Max[0], b.Max[1])
}

// studyArea chooses the study rectangle: the option, else the header
// bounds, else the extent of the chosen lines (with a warning).
func studyArea(ex *extract, o *Options, warn func(string)) (orb.Bound, error) {
	noRoads := func(where string) error {
		return fmt.Errorf("no ways of the classes %s %s; choose other classes with --roads (for example add tertiary)", classList(o), where)
	}
	if o.BBox != nil {
		b := *o.BBox
		if ex.nodes == 0 || !b.Intersects(ex.dataBound) {
			if ex.nodes == 0 {
				return b, fmt.Errorf("the study area %s misses the data: the file has no nodes", fmtBound(b))
			}
			return b, fmt.Errorf("the study area %s misses the data, which spans %s", fmtBound(b), fmtBound(ex.dataBound))
		}
		if len(ex.lines) == 0 {
			return b, noRoads("in the file")
		}
		return b, nil
	}
	if len(ex.lines) == 0 {
		return orb.Bound{}, noRoads("in the file")
	}
	if ex.header != nil {
		err := checkBound(*ex.header)
		if err == nil {
			return *ex.header, nil
		}
		warn(fmt.Sprintf("header bounds %s unusable (%v)", fmtBound(*ex.header), err))
	}
	b := lineBound(ex.lines)
	if err := checkBound(b); err != nil {
		return b, fmt.Errorf("no usable study area: the file has no bounds and the extent of its roads, %s, %v; give one with --bbox", fmtBound(b), err)
	}
	warn(fmt.Sprintf("no bounds in the file; the study area is the extent of the chosen roads, %s", fmtBound(b)))
	return b, nil
}

// fromExtract runs the partition on what readOSM returned.
func fromExtract(ctx context.Context, ex *extract, o Options) (*Partition, error) {
	p := &Partition{}
	warn := func(s string) {
		p.Warnings = append(p.Warnings, s)
		if o.Warn != nil {
			o.Warn(s)
		}
	}
	bound, err := studyArea(ex, &o, warn)
	if err != nil {
		return nil, err
	}
	p.Bound = bound
	p.Stats.Lines, p.Stats.IncompleteWays = len(ex.lines), ex.incomplete
	if ex.incomplete > 0 {
		warn(fmt.Sprintf("%d ways refer to nodes missing from the file; their present parts are used", ex.incomplete))
	}
	pr := newProjection(bound)
	x0, y0 := pr.forward(bound.Min)
	x1, y1 := pr.forward(bound.Max)
	rc := rect{toGrid(x0), toGrid(y0), toGrid(x1), toGrid(y1)}
	if w, h := float64(rc.maxX-rc.minX)*gridMetres, float64(rc.maxY-rc.minY)*gridMetres; w < 1 || h < 1 {
		return nil, fmt.Errorf("the study area %s is %.3g m x %.3g m, too small to partition", fmtBound(bound), w, h)
	}

	segs := clipLines(ex.lines, pr, rc)
	if len(segs) == 0 {
		return nil, fmt.Errorf("no ways of the classes %s inside the study area %s; choose other classes with --roads or a larger --bbox", classList(&o), fmtBound(bound))
	}
	p.Stats.Barriers = barriersUsed(segs, ex.ways, o.Barriers)
	warnUnusedBarriers(ex.unused, pr, rc, warn)
	corners := []ipt{{rc.minX, rc.minY}, {rc.maxX, rc.minY}, {rc.maxX, rc.maxY}, {rc.minX, rc.maxY}}
	for i := range corners {
		segs = append(segs, seg{corners[i], corners[(i+1)%4], -1})
	}

	arr, err := node(ctx, segs)
	if err != nil {
		return nil, err
	}
	if !o.Exact {
		if arr, segs, err = closeAndExtend(ctx, arr, segs, ex.ways, &o, &p.Stats); err != nil {
			return nil, err
		}
	}
	fs, err := arr.faces(ctx)
	if err != nil {
		return nil, err
	}
	p.Stats.Vertices, p.Stats.Edges, p.Stats.Components, p.Stats.Faces = fs.vertices, fs.edges, fs.components, fs.bounded
	p.Stats.DanglesDropped, p.Stats.CutEdgesDropped = fs.dangles, fs.cutEdges
	var water []bool
	if !o.Exact {
		c := cleaner{o: &o, st: &p.Stats, ex: ex, pr: pr, rc: rc, water: waterTest{waterPolygons(ex, pr), coastlineOf(ex, pr)}}
		if arr, fs, water, err = c.cleanFaces(ctx, arr, fs, segs); err != nil {
			return nil, err
		}
	}
	var tunnels []map[string]bool
	p.Regions, p.WaterKM2, tunnels = regions(arr, fs, pr, ex.ways, water, o.MinBorderRoadMetres)
	nameRegions(p.Regions, ex, tunnels)
	p.Network = networkOf(ex, bound)
	p.Routing = ex.routing
	return p, nil
}

// closeAndExtend closes gaps, then extends major roads that end near a
// barrier or another major road, and returns the arrangement noded with
// the connectors and the segments it was noded from.
func closeAndExtend(ctx context.Context, arr *arrangement, segs []seg, ways []wayInfo, o *Options, st *Stats) (*arrangement, []seg, error) {
	var err error
	if o.SnapMetres > 0 {
		if conn := closeGaps(arr, o.SnapMetres); len(conn) > 0 {
			st.GapsClosed = len(conn)
			segs = slices.Concat(segs, conn)
			if arr, err = node(ctx, segs); err != nil {
				return nil, nil, err
			}
		}
	}
	if o.ExtendMetres > 0 {
		major := func(w int32) bool { return ways[w].major }
		if ext := extendDangles(arr, major, o.ExtendMetres); len(ext) > 0 {
			st.DanglesExtended = len(ext)
			segs = slices.Concat(segs, ext)
			if arr, err = node(ctx, segs); err != nil {
				return nil, nil, err
			}
		}
	}
	return arr, segs, nil
}

// barriersUsed lists the barrier kinds with a line inside the study area,
// in the order of chosen.
func barriersUsed(segs []seg, ways []wayInfo, chosen []string) []string {
	seen := map[string]bool{}
	for _, s := range segs {
		seen[ways[s.way].class] = true
	}
	var out []string
	for _, b := range chosen {
		if seen[b] && !slices.Contains(out, b) {
			out = append(out, b)
		}
	}
	return out
}

// warnUnusedBarriers warns, once per kind, that a railway, river, canal or
// coastline crosses the study area but does not bound regions.
func warnUnusedBarriers(lines []unusedLine, pr projection, rc rect, warn func(string)) {
	crosses := map[string]bool{}
	for _, l := range lines {
		if crosses[l.kind] {
			continue
		}
		if len(clipLines([]rawLine{{pts: l.pts}}, pr, rc)) > 0 {
			crosses[l.kind] = true
		}
	}
	for _, k := range barrierKinds {
		if crosses[k] {
			warn(fmt.Sprintf("a %s crosses the study area but does not bound regions (add %s to the barriers)", barrierNoun(k), k))
		}
	}
}

func barrierNoun(kind string) string {
	switch kind {
	case "rail":
		return "railway"
	case "water":
		return "water area"
	}
	return kind
}

// cleaner holds what the face cleaning steps share.
type cleaner struct {
	o     *Options
	st    *Stats
	ex    *extract
	pr    projection
	rc    rect
	water waterTest
}

// cleanFaces marks the water, merges slivers, and splits oversized
// regions; it returns the final arrangement, its faces and which are water.
func (c *cleaner) cleanFaces(ctx context.Context, arr *arrangement, fs *faceSet, segs []seg) (*arrangement, *faceSet, []bool, error) {
	arr, fs, water, err := c.merge(ctx, arr, fs)
	if err != nil || c.o.MaxRegionKM2 <= 0 {
		return arr, fs, water, err
	}
	return c.split(ctx, arr, fs, water)
}

// merge marks the water faces and merges slivers among the land faces.
func (c *cleaner) merge(ctx context.Context, arr *arrangement, fs *faceSet) (*arrangement, *faceSet, []bool, error) {
	minWater := c.o.MinWaterAreaKM2 * 1e6
	water := waterFaces(arr, fs, &c.water, minWater)
	group, merged := mergeSlivers(arr, fs, c.o.MinAreaKM2*1e6, c.o.MinCompactness, c.o.MaxSliverWidthMetres, water)
	c.st.SliversMerged += merged
	if merged == 0 {
		return arr, fs, water, nil
	}
	arr = dissolve(arr, fs, group)
	fs, err := arr.faces(ctx)
	if err != nil {
		return nil, nil, nil, err
	}
	return arr, fs, waterFaces(arr, fs, &c.water, minWater), nil
}

// clipLines projects the lines, clips them to the study rectangle and
// returns their segments on the grid.
func clipLines(lines []rawLine, pr projection, rc rect) []seg {
	var segs []seg
	for _, l := range lines {
		px, py := pr.forward(l.pts[0])
		for _, q := range l.pts[1:] {
			qx, qy := pr.forward(q)
			if a, b, ok := rc.clipSegment(px, py, qx, qy); ok {
				segs = append(segs, seg{a, b, l.way})
			}
			px, py = qx, qy
		}
	}
	return segs
}

// dissolve keeps the edges between different groups of faces (or a face
// and the outside), so that each group becomes one face.
func dissolve(a *arrangement, fs *faceSet, group []int32) *arrangement {
	g := func(f int32) int32 {
		if f < 0 {
			return f
		}
		return group[f]
	}
	out := &arrangement{pts: a.pts}
	for e, ed := range a.edges {
		l, r := fs.left[2*e], fs.left[2*e+1]
		if l == pruned || g(l) == g(r) {
			continue
		}
		out.edges = append(out.edges, ed)
	}
	return out
}

// regions turns the land faces (water[f] false; water may be nil) into
// Regions, numbered north to south, then west to east, by representative
// point, and returns them with the area of the water faces in km².
// Border roads sharing less than minRoad metres are left out. The third
// result holds, per region, the border roads that run only in tunnels.
func regions(a *arrangement, fs *faceSet, pr projection, ways []wayInfo, water []bool, minRoad float64) ([]Region, float64, []map[string]bool) {
	isWater := func(f int32) bool { return water != nil && water[f] }
	roads, surface, nbrs := borders(a, fs, ways, isWater)
	type rp struct {
		face int
		x, y float64 // grid units
	}
	var order []rp
	var waterKM2 float64
	for f := range fs.faces {
		if isWater(int32(f)) {
			waterKM2 += fs.faces[f].area / 1e6
			continue
		}
		x, y := representativePoint(a.pts, fs.faces[f].rings)
		order = append(order, rp{f, x, y})
	}
	slices.SortFunc(order, func(p, q rp) int {
		return cmp.Or(cmp.Compare(q.y, p.y), cmp.Compare(p.x, q.x), cmp.Compare(p.face, q.face))
	})
	id := make([]int, len(fs.faces))
	for i, o := range order {
		id[o.face] = i + 1
	}
	out := make([]Region, len(order))
	tunnels := make([]map[string]bool, len(order))
	for i, o := range order {
		f := &fs.faces[o.face]
		reg := Region{
			ID:          i + 1,
			AreaKM2:     f.area / 1e6,
			PerimeterKM: f.perimeter / 1e3,
			Point:       pr.Inverse(o.x*gridMetres, o.y*gridMetres),
		}
		for _, ring := range f.rings {
			rg := make(orb.Ring, 0, len(ring)+1)
			for _, v := range ring {
				rg = append(rg, pr.inverse(a.pts[v]))
			}
			rg = append(rg, rg[0])
			reg.Polygon = append(reg.Polygon, rg)
		}
		for name, l := range roads[o.face] {
			if l >= minRoad {
				reg.BorderRoads = append(reg.BorderRoads, BorderRoad{Name: name, LengthKM: l / 1e3})
				if surface[o.face][name] == 0 {
					if tunnels[i] == nil {
						tunnels[i] = map[string]bool{}
					}
					tunnels[i][name] = true
				}
			}
		}
		slices.SortFunc(reg.BorderRoads, func(a, b BorderRoad) int {
			return cmp.Or(cmp.Compare(b.LengthKM, a.LengthKM), strings.Compare(a.Name, b.Name))
		})
		for g, l := range nbrs[o.face] {
			reg.Neighbours = append(reg.Neighbours, Neighbour{ID: id[g], SharedKM: l / 1e3})
		}
		slices.SortFunc(reg.Neighbours, func(a, b Neighbour) int { return cmp.Compare(a.ID, b.ID) })
		out[i] = reg
	}
	return out, waterKM2, tunnels
}

// borders sums, per face, the length of each named road or barrier along
// its border (metres), the part of it above ground, and the length shared
// with each land neighbour.
func borders(a *arrangement, fs *faceSet, ways []wayInfo, isWater func(int32) bool) (roads, surface []map[string]float64, nbrs []map[int32]float64) {
	n := len(fs.faces)
	roads = make([]map[string]float64, n)
	surface = make([]map[string]float64, n)
	nbrs = make([]map[int32]float64, n)
	for e, ed := range a.edges {
		l, r := fs.left[2*e], fs.left[2*e+1]
		if l == pruned {
			continue
		}
		length := dist(a.pts[ed.u], a.pts[ed.v])
		for _, f := range []int32{l, r} {
			if f < 0 || ed.way < 0 {
				continue
			}
			if roads[f] == nil {
				roads[f], surface[f] = map[string]float64{}, map[string]float64{}
			}
			w := &ways[ed.way]
			roads[f][w.label] += length
			if !w.tunnel {
				surface[f][w.label] += length
			}
		}
		if l >= 0 && r >= 0 && l != r && !isWater(l) && !isWater(r) {
			for _, pair := range [2][2]int32{{l, r}, {r, l}} {
				if nbrs[pair[0]] == nil {
					nbrs[pair[0]] = map[int32]float64{}
				}
				nbrs[pair[0]][pair[1]] += length
			}
		}
	}
	return roads, surface, nbrs
}

// representativePoint returns a point strictly inside the face given by
// rings, in grid units: the middle of the widest interior interval along
// one of several horizontal lines. The lines sit half a grid step off the
// grid, so they never pass through a vertex.
func representativePoint(pts []ipt, rings [][]int32) (x, y float64) {
	shell := rings[0]
	minY, maxY := pts[shell[0]].Y, pts[shell[0]].Y
	for _, v := range shell {
		minY, maxY = min(minY, pts[v].Y), max(maxY, pts[v].Y)
	}
	best := -1.0
	var xs []float64
	const lines = 9
	for k := 1; k <= lines; k++ {
		yi := minY + (maxY-minY)*int64(k)/(lines+1)
		yl := float64(yi) + 0.5
		if yl >= float64(maxY) {
			yl = float64(minY) + 0.5
		}
		xs = xs[:0]
		for _, ring := range rings {
			for i := range ring {
				a, b := pts[ring[i]], pts[ring[(i+1)%len(ring)]]
				if (float64(a.Y) > yl) != (float64(b.Y) > yl) {
					t := (yl - float64(a.Y)) / float64(b.Y-a.Y)
					xs = append(xs, float64(a.X)+t*float64(b.X-a.X))
				}
			}
		}
		slices.Sort(xs)
		for i := 0; i+1 < len(xs); i += 2 {
			if w := xs[i+1] - xs[i]; w > best {
				best = w
				x, y = (xs[i]+xs[i+1])/2, yl
			}
		}
	}
	if best < 0 { // degenerate: fall back to a vertex
		return float64(pts[shell[0]].X), float64(pts[shell[0]].Y)
	}
	return x, y
}
