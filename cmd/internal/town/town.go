package town

import (
	"math"
	"math/rand/v2"

	"github.com/paulmach/orb"

	"narrows/partition/geodesy"
)

// Town is a generated town.
type Town struct {
	// Name is the town's (invented) name.
	Name string
	// Link is the planned new river crossing.
	Link *Way
	// LinkMidpoint is the middle of the new bridge (for a map focus).
	LinkMidpoint orb.Point
	// Housing (north bank) and Jobs (south bank) are the planted districts.
	Housing, Jobs District
	// RailHousing is the second planted district (Options.RailWeakness),
	// across the railway from Jobs; zero otherwise.
	RailHousing District

	// size and seed are the options the town was generated with.
	size Size
	seed int64
	// nodes and ways are the network without the link, ascending by ID;
	// linkNodes are the nodes only the link uses (its end nodes are
	// ordinary street nodes in nodes).
	nodes     []osmNode
	ways      []Way
	linkNodes []osmNode
	// bound is the study area written as the OSM <bounds>.
	bound orb.Bound

	lay   layout
	warp  warp
	proj  geodesy.Projection
	grid  []gridNode // index = (j*(NX+1) + i); present nodes only have id > 0
	local []xy       // local metres of every node, index = id-1
}

// Generate builds a town. It returns an error only for an unknown size.
func Generate(opts Options) (*Town, error) {
	lay, err := layoutFor(opts.Size)
	if err != nil {
		return nil, err
	}
	if opts.RailWeakness {
		lay = lay.withRailWeakness()
	}
	size := opts.Size
	if size == "" {
		size = SizeTown
	}
	rng := rand.New(rand.NewPCG(uint64(opts.Seed), 0x71c4a7e5))
	w := warp{
		amp:        0.12 * lay.cell(),
		wave:       math.Max(lay.width(), lay.height()) * 0.8,
		phaseX:     rng.Float64() * 2 * math.Pi,
		phaseY:     rng.Float64() * 2 * math.Pi,
		riverPhase: rng.Float64() * 2 * math.Pi,
		railPhase:  rng.Float64() * 2 * math.Pi,
	}
	t := &Town{Name: lay.name, size: size, seed: opts.Seed, lay: lay, warp: w}
	b := &builder{t: t, lay: lay, w: w, rng: rng}
	b.build()
	return t, nil
}

// District is one of the two planted districts.
type District struct {
	Name string
	// Centre is a point well inside the district (longitude, latitude);
	// it identifies the district's region after partitioning.
	Centre orb.Point
	// area is the district's outline (an approximate rectangle between the
	// arterials and the river bank), closed, counter-clockwise.
	area orb.Ring
}

// tag is one OSM key=value pair.
type tag struct{ Key, Value string }

// osmNode is an OSM node.
type osmNode struct {
	ID    int64
	Point orb.Point // WGS84 longitude, latitude
	Tags  []tag
}

// Way is an OSM way: a polyline through nodes, with tags.
type Way struct {
	id    int64
	nodes []int64
	tags  []tag // sorted by key
}

// Tag returns the value of key, or "" when the way has no such tag.
func (w *Way) Tag(key string) string {
	for _, t := range w.tags {
		if t.Key == key {
			return t.Value
		}
	}
	return ""
}
