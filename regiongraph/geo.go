package regiongraph

import (
	"cmp"
	"fmt"
	"math"
	"slices"

	"github.com/paulmach/orb"
	"github.com/tidwall/rtree"

	"narrows/partition"
)

// locator finds the region holding a point. An R-tree over the region
// bounds gives, once, the candidate regions of every cell of a uniform grid
// over the study area. A point's cell either lies wholly inside one region
// (no border crosses it: the answer without a test) or names its few
// candidates, which an exact crossing-number test with holes decides, over
// the edges of the point's latitude band only. Points on a border shared by
// two regions belong to exactly one of them: the test is half-open (a region
// holds its lower and left borders, not its upper and right ones), and when
// regions overlap the lowest id wins.
// A locator is read-only after construction and safe for concurrent use.
type locator struct {
	regions []locRegion // ascending id

	minX, minY   float64
	cellW, cellH float64
	nx, ny       int
	cellStart    []int32 // candidates of cell c: cellList[cellStart[c]:cellStart[c+1]]
	cellList     []int32 // region indexes, ascending
	cellRegion   []int32 // region index holding all of cell c (no border inside), or -1
}

type locRegion struct {
	id    int
	bound orb.Bound
	rings []orb.Ring // exterior first, then holes

	// Ring edges by horizontal band of the bound: the edges that can cross
	// the horizontal line through a point are those of the point's band.
	bandH     float64
	bands     int
	bandStart []int32 // edges of band k: bandEdges[bandStart[k]:bandStart[k+1]]
	bandEdges []edge
}

// edge is a ring edge with its lower end first (a[1] <= b[1]). Both regions
// that share an edge store it the same way round, so both compute the very
// same crossing and a border point falls in exactly one of them.
type edge struct{ a, b [2]float64 }

func newLocRegion(id int, poly orb.Polygon) locRegion {
	r := locRegion{id: id, bound: poly.Bound(), rings: poly}
	var edges []edge
	for _, ring := range poly {
		for k := 1; k < len(ring); k++ {
			a, b := ring[k-1], ring[k]
			if a[1] == b[1] {
				continue // horizontal: never crosses a horizontal line strictly
			}
			if a[1] > b[1] {
				a, b = b, a
			}
			edges = append(edges, edge{a, b})
		}
	}
	bands := max(1, min(1024, len(edges)/4))
	r.bandH = (r.bound.Max[1] - r.bound.Min[1]) / float64(bands)
	if !(r.bandH > 0) {
		bands, r.bandH = 1, 1
	}
	r.bands = bands
	counts := make([]int32, bands+1)
	for _, e := range edges {
		for k := r.band(e.a[1]); k <= r.band(e.b[1]); k++ {
			counts[k+1]++
		}
	}
	for k := 1; k <= bands; k++ {
		counts[k] += counts[k-1]
	}
	r.bandStart = slices.Clone(counts)
	r.bandEdges = make([]edge, counts[bands])
	for _, e := range edges {
		for k := r.band(e.a[1]); k <= r.band(e.b[1]); k++ {
			r.bandEdges[counts[k]] = e
			counts[k]++
		}
	}
	return r
}

// band returns the band of latitude y, clamped to the bound's bands.
func (r *locRegion) band(y float64) int {
	k := int(math.Floor((y - r.bound.Min[1]) / r.bandH))
	return min(max(k, 0), r.bands-1)
}

// maxRegions is the most regions a locator indexes: aggregation packs a
// region pair into 32 bits.
const maxRegions = 1<<16 - 1

func newLocator(p *partition.Partition) (*locator, error) {
	l := &locator{}
	for _, r := range p.Regions {
		if len(r.Polygon) == 0 || len(r.Polygon[0]) < 3 {
			continue
		}
		l.regions = append(l.regions, newLocRegion(r.ID, r.Polygon))
	}
	slices.SortStableFunc(l.regions, func(a, b locRegion) int { return cmp.Compare(a.id, b.id) })
	if len(l.regions) > maxRegions {
		return nil, fmt.Errorf("regiongraph: %d regions; at most %d are supported", len(l.regions), maxRegions)
	}
	var tree rtree.RTreeG[int32]
	var all orb.Bound
	for i := range l.regions {
		if i > 0 && l.regions[i].id == l.regions[i-1].id {
			return nil, fmt.Errorf("regiongraph: region id %d is used twice", l.regions[i].id)
		}
		b := l.regions[i].bound
		tree.Insert(b.Min, b.Max, int32(i))
		if i == 0 {
			all = b
		} else {
			all = all.Union(b)
		}
	}
	if len(l.regions) == 0 {
		return l, nil
	}
	// About sixteen cells per region, in the shape of the study area: most
	// points then fall in a cell that no border crosses.
	w, h := all.Max[0]-all.Min[0], all.Max[1]-all.Min[1]
	cells := float64(16 * len(l.regions))
	side := math.Sqrt(w * h / cells)
	if !(side > 0) {
		side = math.Max(w, h) + 1e-9
	}
	l.nx = max(1, min(512, int(math.Ceil(w/side))))
	l.ny = max(1, min(512, int(math.Ceil(h/side))))
	l.minX, l.minY = all.Min[0], all.Min[1]
	l.cellW, l.cellH = math.Max(w/float64(l.nx), 1e-12), math.Max(h/float64(l.ny), 1e-12)
	// Cells are searched a little enlarged, so that a point whose cell is
	// misjudged by rounding still finds every region that could hold it.
	const pad = 1e-7 // degrees, about a centimetre
	l.cellStart = make([]int32, 0, l.nx*l.ny+1)
	var found []int32
	for cy := 0; cy < l.ny; cy++ {
		for cx := 0; cx < l.nx; cx++ {
			l.cellStart = append(l.cellStart, int32(len(l.cellList)))
			x0, y0 := l.minX+float64(cx)*l.cellW, l.minY+float64(cy)*l.cellH
			found = found[:0]
			tree.Search([2]float64{x0 - pad, y0 - pad}, [2]float64{x0 + l.cellW + pad, y0 + l.cellH + pad},
				func(_, _ [2]float64, i int32) bool {
					found = append(found, i)
					return true
				})
			slices.Sort(found)
			l.cellList = append(l.cellList, found...)
		}
	}
	l.cellStart = append(l.cellStart, int32(len(l.cellList)))
	l.markInteriorCells(pad)
	return l, nil
}

// markInteriorCells finds the cells that lie wholly inside one region: no
// edge of a candidate's rings comes near the cell (each edge's padded bounds
// mark the cells they cover), and the cell's centre is inside the candidate.
// Candidates are tried in id order, and a bordered one stops the search, so
// the lowest-id rule holds when regions overlap.
func (l *locator) markInteriorCells(pad float64) {
	bordered := make([]bool, len(l.cellList))
	cellOf := func(x, y float64) (int, int) {
		cx := int(math.Floor((x - l.minX) / l.cellW))
		cy := int(math.Floor((y - l.minY) / l.cellH))
		return min(max(cx, 0), l.nx-1), min(max(cy, 0), l.ny-1)
	}
	for ri := range l.regions {
		for _, ring := range l.regions[ri].rings {
			for k := 1; k < len(ring); k++ {
				a, b := ring[k-1], ring[k]
				x0, y0 := cellOf(math.Min(a[0], b[0])-pad, math.Min(a[1], b[1])-pad)
				x1, y1 := cellOf(math.Max(a[0], b[0])+pad, math.Max(a[1], b[1])+pad)
				for cy := y0; cy <= y1; cy++ {
					for cx := x0; cx <= x1; cx++ {
						c := cy*l.nx + cx
						for pos := l.cellStart[c]; pos < l.cellStart[c+1]; pos++ {
							if l.cellList[pos] == int32(ri) {
								bordered[pos] = true
								break
							}
						}
					}
				}
			}
		}
	}
	l.cellRegion = make([]int32, l.nx*l.ny)
	for c := range l.cellRegion {
		l.cellRegion[c] = -1
		centre := orb.Point{l.minX + (float64(c%l.nx)+0.5)*l.cellW, l.minY + (float64(c/l.nx)+0.5)*l.cellH}
		for pos := l.cellStart[c]; pos < l.cellStart[c+1]; pos++ {
			if bordered[pos] {
				break
			}
			if i := l.cellList[pos]; l.regions[i].contains(centre) {
				l.cellRegion[c] = i
				break
			}
		}
	}
}

// locate returns 1 + the index (in id order) of the region holding p, or 0
// when none does. When several hold it, the lowest id wins.
func (l *locator) locate(p orb.Point) int {
	if len(l.regions) == 0 {
		return 0
	}
	fx, fy := (p[0]-l.minX)/l.cellW, (p[1]-l.minY)/l.cellH
	if !(fx >= -1e-6 && fy >= -1e-6 && fx <= float64(l.nx)+1e-6 && fy <= float64(l.ny)+1e-6) {
		return 0 // outside every region's bounds (or NaN)
	}
	cx, cy := min(max(int(fx), 0), l.nx-1), min(max(int(fy), 0), l.ny-1)
	c := cy*l.nx + cx
	if i := l.cellRegion[c]; i >= 0 {
		return int(i) + 1
	}
	for _, i := range l.cellList[l.cellStart[c]:l.cellStart[c+1]] {
		if l.regions[i].contains(p) {
			return int(i) + 1
		}
	}
	return 0
}

// id returns the region id of a locate result.
func (l *locator) id(index int) int {
	if index == 0 {
		return 0
	}
	return l.regions[index-1].id
}

// contains is the crossing-number (even-odd) test over all rings, holes
// included, with a half-open rule: an edge counts when its lower end is at
// or below p's latitude and its upper end above, and it crosses that
// latitude strictly east of p.
func (r *locRegion) contains(p orb.Point) bool {
	if p[0] < r.bound.Min[0] || p[0] > r.bound.Max[0] || p[1] < r.bound.Min[1] || p[1] > r.bound.Max[1] {
		return false
	}
	x, y := p[0], p[1]
	k := r.band(y)
	in := false
	for _, e := range r.bandEdges[r.bandStart[k]:r.bandStart[k+1]] {
		if e.a[1] <= y && y < e.b[1] && x < (e.b[0]-e.a[0])*(y-e.a[1])/(e.b[1]-e.a[1])+e.a[0] {
			in = !in
		}
	}
	return in
}
