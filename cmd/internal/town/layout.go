// The geometry of a town: the plan of each size, the grid it is built on,
// the warp that bends it, the river and the railway, and the projection to
// WGS84.

package town

import (
	"fmt"
	"math"

	"github.com/paulmach/orb"
)

// xy is a point in local metres (x east, y north).
type xy struct{ X, Y float64 }

type gridNode struct {
	id     int64
	gx, gy float64 // unperturbed grid position, metres
	pos    xy      // perturbed position, metres
}

// layout is the fixed plan of a size; the seed perturbs it, never changes it.
type layout struct {
	name       string
	nx, ny     int       // arterial cells
	k          int       // local blocks per cell side
	block      float64   // metres between local streets
	margin     float64   // metres from the ring to the bounds
	riverRow   int       // cell row the river runs through
	railCol    int       // cell column the railway runs through
	bridgeCols []int     // grid columns (i) of the arterial bridges
	oldBridges bool      // the arterial bridges are old single-lane ones
	plantCol   int       // cell column of the planted districts
	linkCol    int       // grid column (i) of the new link
	origin     orb.Point // south-west corner of the bounds (longitude, latitude)
	riverGap   float64   // metres the river widens the grid by
	population float64   // residents
	// plantedHousing and plantedJobs are the planted districts' shares of
	// the residents and of the jobs.
	plantedHousing, plantedJobs float64
	beta                        float64 // gravity deterrence, 1/metres
	// railGap (> 0) is the number of arterial rows just south of the river
	// without a level crossing, and railHousing the share of residents in the district across the
	// railway from the jobs: the second planted weakness (railweakness.go).
	railGap     int
	railHousing float64
}

func layoutFor(s Size) (layout, error) {
	switch s {
	case SizeTown, "":
		return layout{name: "Quillhaven", nx: 6, ny: 6, k: 3, block: 300, margin: 400,
			riverRow: 3, riverGap: 300, oldBridges: true, railCol: 1, bridgeCols: []int{6, 15}, plantCol: 3, linkCol: 10,
			origin: orb.Point{0.83, 0.61}, population: 65000, beta: 1.0 / 1600, plantedHousing: 0.10, plantedJobs: 0.12}, nil
	case sizeCity:
		return layout{name: "Ostravel", nx: 40, ny: 40, k: 2, block: 250, margin: 500,
			riverRow: 20, railCol: 12, bridgeCols: []int{8, 16, 24, 32, 40, 48, 56, 64, 72}, plantCol: 14, linkCol: 29,
			origin: orb.Point{0.71, 0.52}, population: 800000, beta: 1.0 / 2200, plantedHousing: 0.0012, plantedJobs: 0.0015}, nil
	}
	return layout{}, fmt.Errorf("town: unknown size %q (want %q or %q)", s, SizeTown, sizeCity)
}

// NX and NY are the grid line counts minus one.
func (l layout) NX() int         { return l.nx * l.k }
func (l layout) NY() int         { return l.ny * l.k }
func (l layout) cell() float64   { return float64(l.k) * l.block }
func (l layout) width() float64  { return float64(l.NX()) * l.block }
func (l layout) height() float64 { return float64(l.NY())*l.block + l.riverGap }

// The river runs along riverY0 of the plain grid; the rows north of it are
// moved north by riverGap to make room for a wide river.
func (l layout) riverY0() float64 { return (float64(l.riverRow*l.k) + float64(l.k)/2) * l.block }
func (l layout) riverY() float64  { return l.riverY0() + l.riverGap/2 }

// gyOf is the grid y of line j.
func (l layout) gyOf(j int) float64 {
	y := float64(j) * l.block
	if y > l.riverY0() {
		y += l.riverGap
	}
	return y
}
func (l layout) railX() float64      { return (float64(l.railCol*l.k) + float64(l.k)/2) * l.block }
func (l layout) meander() float64    { return 0.1 * l.block }
func (l layout) bridgeHalf() float64 { return 0.22*l.block + 0.4*l.riverGap }

// lonLat maps local metres to WGS84 by the local projection about the
// south-west corner of the bounds (exact enough at town scale).
func (t *Town) lonLat(p xy) orb.Point { return t.proj.Inverse(p.X, p.Y) }

// warp bends the grid gently: a smooth, monotone displacement of a few
// percent of the cell size, so streets curve without folding.
type warp struct {
	amp, wave      float64
	phaseX, phaseY float64
	riverPhase     float64
	railPhase      float64
}

func (w warp) apply(gx, gy float64) xy {
	return xy{gx + w.amp*math.Sin(2*math.Pi*gy/w.wave+w.phaseX), gy + w.amp*math.Sin(2*math.Pi*gx/w.wave+w.phaseY)}
}

// riverAt is the river's grid y at grid x.
func (b *builder) riverAt(gx float64) float64 {
	return b.lay.riverY() + b.lay.meander()*math.Sin(2*math.Pi*gx/(5*b.lay.cell())+b.w.riverPhase)
}

// railAt is the railway's grid x at grid y.
func (b *builder) railAt(gy float64) float64 {
	return b.lay.railX() + b.lay.meander()*math.Sin(2*math.Pi*gy/(7*b.lay.cell())+b.w.railPhase)
}

func (b *builder) gridIndex(i, j int) int { return j*(b.lay.NX()+1) + i }

func (b *builder) node(i, j int) *gridNode {
	if i < 0 || j < 0 || i > b.lay.NX() || j > b.lay.NY() {
		return nil
	}
	g := &b.t.grid[b.gridIndex(i, j)]
	if g.id == 0 {
		return nil
	}
	return g
}

// gridPos maps a grid position to local metres (warped, offset by the margin).
func (b *builder) gridPos(gx, gy float64) xy {
	p := b.w.apply(gx, gy)
	return xy{p.X + b.lay.margin, p.Y + b.lay.margin}
}

func lerp(a, c xy, f float64) xy { return xy{a.X + (c.X-a.X)*f, a.Y + (c.Y-a.Y)*f} }
