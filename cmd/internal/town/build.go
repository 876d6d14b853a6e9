// The builder lays out the streets, the ring road, the railway, the river,
// the planned link and the planted districts as OSM nodes and ways.

package town

import (
	"fmt"
	"math"
	"math/rand/v2"
	"sort"

	"github.com/paulmach/orb"

	"narrows/partition/geodesy"
)

// builder is the state of one Generate call: the town being built, its
// nodes and ways so far, and the railway's level crossings.
type builder struct {
	t   *Town
	lay layout
	w   warp
	rng *rand.Rand

	nodes  []osmNode
	ways   []Way
	nextID int64
	rail   []railPoint // crossings with the railway, by grid y
}

// railPoint is a point of the railway at grid y gy; id is its node, 0 for
// a shape point not yet added.
type railPoint struct {
	gy float64
	id int64
}

func (b *builder) addNode(p xy, tags []tag) int64 {
	b.nextID++
	b.t.local = append(b.t.local, p)
	b.nodes = append(b.nodes, osmNode{ID: b.nextID, Point: b.t.lonLat(p), Tags: tags})
	return b.nextID
}

func (b *builder) build() {
	lay := b.lay
	t := b.t
	t.proj = geodesy.NewProjection(lay.origin)
	// Local frame: origin at the bounds' south-west corner; the grid starts
	// at (margin, margin).
	off := lay.margin
	NX, NY := lay.NX(), lay.NY()
	t.grid = make([]gridNode, (NX+1)*(NY+1))
	clear := 0.3 * lay.block // grid nodes this close to the river or rail axis are left out
	jit := 0.06 * lay.block
	for j := 0; j <= NY; j++ {
		for i := 0; i <= NX; i++ {
			gx, gy := float64(i)*lay.block, lay.gyOf(j)
			dx, dy := (b.rng.Float64()*2-1)*jit, (b.rng.Float64()*2-1)*jit
			corner := (i == 0 || i == NX) && (j == 0 || j == NY)
			if corner || math.Abs(gy-lay.riverY()) < clear || math.Abs(gx-lay.railX()) < clear {
				continue
			}
			p := b.w.apply(gx, gy)
			p = xy{p.X + dx + off, p.Y + dy + off}
			var tags []tag
			if i%lay.k == 0 && j%lay.k == 0 && i > 0 && i < NX && j > 0 && j < NY {
				tags = []tag{{"highway", "traffic_signals"}}
			}
			id := b.addNode(p, tags)
			t.grid[b.gridIndex(i, j)] = gridNode{id: id, gx: gx, gy: gy, pos: p}
		}
	}
	b.streets()
	b.ring()
	b.railway()
	b.river()
	b.link()
	b.districts()
	b.railDistrict()
	b.placeNodes()
	t.nodes = b.nodes
	t.ways = b.ways
	t.bound = orb.Bound{Min: t.lonLat(xy{0, 0}), Max: t.lonLat(xy{lay.width() + 2*off, lay.height() + 2*off})}
}

type lineSpec struct {
	class     roadClass
	name, ref string
	oneway    bool
	bridgeOK  bool // may cross the river
	// oldBridge names the river bridge of an arterial: an old bridge with
	// a single lane that the two directions take in turns under signals
	// (20 km/h), the town's bottleneck.
	oldBridge string
	crossRail bool // may cross the railway (level crossing)
	railOver  bool // crosses the railway on a bridge
}

func (b *builder) addWay(nodes []int64, tags []tag) {
	if len(nodes) < 2 {
		return
	}
	id := int64(len(b.ways) + 1)
	b.ways = append(b.ways, Way{id: id, nodes: append([]int64(nil), nodes...), tags: tags})
}

// emitLine turns a path of grid nodes into ways, cutting it where it meets
// the river (a bridge when allowed, else the street ends at the bank) and
// the railway (a level crossing, a bridge, or an end).
func (b *builder) emitLine(path []*gridNode, s lineSpec) {
	var cur []int64
	flush := func() {
		b.addWay(cur, b.tagsFor(s, false))
		cur = nil
	}
	ry, rx := b.lay.riverY(), b.lay.railX()
	for k, g := range path {
		if k == 0 {
			cur = append(cur, g.id)
			continue
		}
		a := path[k-1]
		switch {
		case (a.gy-ry)*(g.gy-ry) < 0: // crosses the river
			if !s.bridgeOK {
				flush()
				cur = []int64{g.id}
				continue
			}
			yr := b.riverAt((a.gx + g.gx) / 2)
			p1, p2 := b.crossingPair(a, g, (yr-b.lay.bridgeHalf()-a.gy)/(g.gy-a.gy), (yr+b.lay.bridgeHalf()-a.gy)/(g.gy-a.gy))
			cur = append(cur, p1)
			flush()
			tags := b.tagsFor(s, true)
			if s.oldBridge != "" {
				old := s
				old.name = s.oldBridge
				tags = b.tagsFor(old, true)
				for k := range tags {
					switch tags[k].Key {
					case "lanes":
						tags[k].Value = "1"
					case "maxspeed":
						tags[k].Value = "20"
					}
				}
				// Signals at both ends let the two directions take turns.
				signals := []tag{{"highway", "traffic_signals"}}
				b.nodes[p1-1].Tags, b.nodes[p2-1].Tags = signals, signals
			}
			b.addWay([]int64{p1, p2}, tags)
			cur = []int64{p2, g.id}
		case (a.gx-rx)*(g.gx-rx) < 0: // crosses the railway
			xr := b.railAt(a.gy)
			switch {
			case s.railOver:
				h := b.lay.bridgeHalf()
				p1, p2 := b.crossingPair(a, g, (xr-h-a.gx)/(g.gx-a.gx), (xr+h-a.gx)/(g.gx-a.gx))
				cur = append(cur, p1)
				flush()
				b.addWay([]int64{p1, p2}, b.tagsFor(s, true))
				cur = []int64{p2, g.id}
			case s.crossRail:
				f := (xr - a.gx) / (g.gx - a.gx)
				id := b.addNode(lerp(a.pos, g.pos, f), b.levelCrossingTags())
				b.rail = append(b.rail, railPoint{gy: a.gy, id: id})
				cur = append(cur, id, g.id)
			default:
				flush()
				cur = []int64{g.id}
			}
		default:
			cur = append(cur, g.id)
		}
	}
	flush()
}

// crossingPair adds two nodes on segment a-g at fractions f1 < f2 (in the
// direction a to g, whichever way the fractions come).
func (b *builder) crossingPair(a, g *gridNode, f1, f2 float64) (int64, int64) {
	if f1 > f2 {
		f1, f2 = f2, f1
	}
	f1 = math.Max(0.05, f1)
	f2 = math.Min(0.95, f2)
	return b.addNode(lerp(a.pos, g.pos, f1), nil), b.addNode(lerp(a.pos, g.pos, f2), nil)
}

func (b *builder) streets() {
	lay := b.lay
	NX, NY := lay.NX(), lay.NY()
	mid := func(n int) int { return n / 2 / lay.k } // index of the middle arterial
	// North-south lines.
	for i := 1; i < NX; i++ {
		var path []*gridNode
		for j := 0; j <= NY; j++ {
			if g := b.node(i, j); g != nil {
				path = append(path, g)
			}
		}
		s := lineSpec{class: classResidential, name: streetName(i, []string{"Street", "Lane", "Row"})}
		if i%lay.k == 0 {
			s.class = classSecondary
			if (i/lay.k-mid(NX))%2 == 0 {
				s.class = classPrimary
			}
			s.name = streetName(i/lay.k+7, []string{"Avenue", "Parade"})
			s.ref = fmt.Sprintf("Q%d", 10+i/lay.k)
			for k, c := range lay.bridgeCols {
				if c == i {
					s.bridgeOK = true
					if lay.oldBridges {
						s.oldBridge = bridgeNames[k%len(bridgeNames)]
					}
				}
			}
		} else if i%lay.k == 1 {
			s.class = classTertiary
		}
		b.emitLine(path, s)
	}
	// East-west lines.
	for j := 1; j < NY; j++ {
		var path []*gridNode
		for i := 0; i <= NX; i++ {
			if g := b.node(i, j); g != nil {
				path = append(path, g)
			}
		}
		s := lineSpec{class: classResidential, name: streetName(j+13, []string{"Walk", "Close", "Way"})}
		if j%lay.k == 0 {
			s.class = classSecondary
			if (j/lay.k-mid(NY))%2 == 0 {
				s.class = classPrimary
			}
			s.name = streetName(j/lay.k+21, []string{"Road", "Boulevard"})
			s.ref = fmt.Sprintf("Q%d", 50+j/lay.k)
			s.crossRail = !lay.railGapRow(j)
		} else {
			if j%lay.k == 1 {
				s.class = classTertiary
			}
			// The top row of cells is the old quarter: its local
			// east-west streets are one-way, alternating direction.
			if j > NY-lay.k {
				s.oneway = true
				if j%2 == 1 {
					for l, r := 0, len(path)-1; l < r; l, r = l+1, r-1 {
						path[l], path[r] = path[r], path[l]
					}
				}
			}
		}
		b.emitLine(path, s)
	}
}

func (b *builder) ring() {
	NX, NY := b.lay.NX(), b.lay.NY()
	var path []*gridNode
	add := func(i, j int) {
		if g := b.node(i, j); g != nil {
			path = append(path, g)
		}
	}
	for i := 1; i < NX; i++ {
		add(i, 0)
	}
	for j := 1; j < NY; j++ {
		add(NX, j)
	}
	for i := NX - 1; i > 0; i-- {
		add(i, NY)
	}
	for j := NY - 1; j > 0; j-- {
		add(0, j)
	}
	add(1, 0) // close the loop
	b.emitLine(path, lineSpec{class: classTrunk, name: b.lay.name + " Ring", ref: "QR1", bridgeOK: true, railOver: true})
}

// railway runs south to north through the level crossings, with a bridge
// over the river, beyond the bounds at both ends.
func (b *builder) railway() {
	lay := b.lay
	step := lay.block
	y0, y1 := -lay.margin-60, lay.height()+lay.margin+60
	pts := b.rail
	ryr := b.riverAt(lay.railX())
	h := lay.bridgeHalf()
	var shape []railPoint
	for y := y0; y < y1; y += step {
		shape = append(shape, railPoint{gy: y})
	}
	shape = append(shape, railPoint{gy: y1})
	all := append(append([]railPoint(nil), pts...), shape...)
	sort.SliceStable(all, func(i, j int) bool { return all[i].gy < all[j].gy })
	var south, north []int64
	var bridge [2]int64
	bridge[0] = b.addNode(b.gridPos(b.railAt(ryr-h), ryr-h), nil)
	bridge[1] = b.addNode(b.gridPos(b.railAt(ryr+h), ryr+h), nil)
	for _, p := range all {
		if math.Abs(p.gy-ryr) < h+0.2*lay.block {
			if p.id == 0 {
				continue
			}
		}
		id := p.id
		if id == 0 {
			id = b.addNode(b.gridPos(b.railAt(p.gy), p.gy), nil)
		}
		if p.gy < ryr {
			south = append(south, id)
		} else {
			north = append(north, id)
		}
	}
	tags := []tag{{"name", railwayName}, {"railway", "rail"}}
	b.addWay(append(south, bridge[0]), tags)
	b.addWay([]int64{bridge[0], bridge[1]}, []tag{{"bridge", "yes"}, {"layer", "1"}, {"name", railwayName}, {"railway", "rail"}})
	b.addWay(append([]int64{bridge[1]}, north...), tags)
}

func (b *builder) river() {
	lay := b.lay
	x0, x1 := -lay.margin-60, lay.width()+lay.margin+60
	var ids []int64
	step := lay.block / 3
	for x := x0; ; x += step {
		if x > x1 {
			x = x1
		}
		ids = append(ids, b.addNode(b.gridPos(x, b.riverAt(x)), nil))
		if x == x1 {
			break
		}
	}
	b.addWay(ids, []tag{{"name", riverName}, {"waterway", "river"}})
}

// link is the planned bridge: it joins the two dead ends of a local street
// on either bank, in the middle of the planted districts.
func (b *builder) link() {
	lay := b.lay
	i := lay.linkCol
	var south, north *gridNode
	for j := 0; j <= lay.NY(); j++ {
		g := b.node(i, j)
		if g == nil {
			continue
		}
		if g.gy < lay.riverY() {
			south = g
		} else if north == nil {
			north = g
		}
	}
	yr := b.riverAt(south.gx)
	h := lay.bridgeHalf()
	f1 := (yr - h - south.gy) / (north.gy - south.gy)
	f2 := (yr + h - south.gy) / (north.gy - south.gy)
	before := len(b.nodes)
	p1, p2 := b.crossingPair(south, north, f1, f2)
	b.t.linkNodes = append([]osmNode(nil), b.nodes[before:]...)
	b.nodes = b.nodes[:before]
	// A new bridge is built for the traffic it will draw: two lanes each way.
	tags := b.tagsFor(lineSpec{class: classTertiary, name: linkName}, true)
	for k := range tags {
		if tags[k].Key == "lanes" {
			tags[k].Value = "4"
		}
	}
	b.t.Link = &Way{id: int64(len(b.ways)) + 1, nodes: []int64{south.id, p1, p2, north.id}, tags: tags}
	mid := lerp(b.t.local[p1-1], b.t.local[p2-1], 0.5)
	b.t.LinkMidpoint = b.t.lonLat(mid)
}

// districts records the planted districts: the halves of the river-row cell
// in the planted column, north (housing) and south (jobs) of the river.
func (b *builder) districts() {
	lay := b.lay
	c := lay.cell()
	x0, x1 := float64(lay.plantCol)*c, float64(lay.plantCol+1)*c
	y0, y1 := lay.gyOf(lay.riverRow*lay.k), lay.gyOf((lay.riverRow+1)*lay.k)
	ry := lay.riverY()
	gap := lay.meander() + 0.15*lay.block
	mk := func(name string, ya, yb float64) District {
		inset := 0.1 * lay.block
		ring := orb.Ring{}
		for _, q := range [][2]float64{{x0 + inset, ya}, {x1 - inset, ya}, {x1 - inset, yb}, {x0 + inset, yb}, {x0 + inset, ya}} {
			ring = append(ring, b.t.lonLat(b.gridPos(q[0], q[1])))
		}
		cx, cy := (x0+x1)/2, (ya+yb)/2
		return District{Name: name, Centre: b.t.lonLat(b.gridPos(cx, cy)), area: ring}
	}
	b.t.Housing = mk(housingName, ry+gap, y1-0.1*lay.block)
	b.t.Jobs = mk(jobsName, y0+0.1*lay.block, ry-gap)
}

// placeNodes names the town's districts as OSM place nodes, as a mapper
// would: one neighbourhood in each cell between the arterials, on each
// side of the river and the railway where they cross a cell, and the two
// planted districts as quarters. The regions take their names from them.
// The nodes belong to no way, so the road network is the same.
func (b *builder) placeNodes() {
	lay := b.lay
	c := lay.cell()
	n := 0
	for cj := 0; cj < lay.ny; cj++ {
		y0, y1 := lay.gyOf(cj*lay.k), lay.gyOf((cj+1)*lay.k)
		ys := []float64{(y0 + y1) / 2}
		if cj == lay.riverRow {
			ys = []float64{(y0 + lay.riverY()) / 2, (lay.riverY() + y1) / 2}
		}
		for ci := 0; ci < lay.nx; ci++ {
			x0, x1 := float64(ci)*c, float64(ci+1)*c
			xs := []float64{(x0 + x1) / 2}
			if ci == lay.railCol {
				xs = []float64{(x0 + lay.railX()) / 2, (lay.railX() + x1) / 2}
			}
			for _, y := range ys {
				for _, x := range xs {
					if cj == lay.riverRow && ci == lay.plantCol {
						continue // the planted districts, named below
					}
					b.addNode(b.gridPos(x, y), []tag{{"name", districtName(n)}, {"place", "neighbourhood"}})
					n++
				}
			}
		}
	}
	for _, d := range []District{b.t.Housing, b.t.Jobs} {
		x, y := b.t.proj.Forward(d.Centre)
		b.addNode(xy{x, y}, []tag{{"name", d.Name}, {"place", "quarter"}})
	}
}
