package partition

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/paulmach/orb"
	"github.com/paulmach/osm"
)

// Options control which lines bound regions and how the partition is
// cleaned. The zero value is not useful; start from DefaultOptions. The toml
// tags are the keys of a study file's [regions] table.
type Options struct {
	// Roads are the OSM highway classes whose ways bound regions, for
	// example "primary" or "motorway_link". Default: motorway, trunk,
	// primary, secondary, the classes that carry through traffic between
	// districts; *_link ramps are left out because they only connect
	// carriageways and would cut junctions into slivers.
	Roads []string `toml:"roads"`
	// Barriers are extra features that bound regions: any of "rail"
	// (railway=rail), "river" (waterway=river), "canal" (waterway=canal),
	// "coastline" (natural=coastline; the sea on its right, as OSM draws
	// it, is no region) and "water" (water areas:
	// natural=water, waterway=riverbank, as closed ways or multipolygon
	// relations; their banks bound regions and the water itself is no
	// region). Default: all five, because a district ends at a river or a
	// railway as surely as at a main road, and trips across them are what
	// a planner looks for. An empty list (the study key barriers = [] or
	// the flag value "none") turns them off.
	Barriers []string `toml:"barriers"`
	// BBox is the study area in WGS84 degrees. Nil means the bounds in the
	// file's header; if the file has none, the extent of the chosen lines
	// is used and a warning is given.
	BBox *orb.Bound `toml:"-"`
	// SnapMetres closes gaps: a line that ends within this distance of
	// another line (and is not already joined to it nearby) is joined to it
	// by a short connector. Default 20 m: wider than the usual offset of a
	// road end mapped short of the road it meets (a few metres, common
	// mapping practice) and well under a city block, so that it seldom
	// closes a real opening. 0 turns gap closing off.
	SnapMetres float64 `toml:"snap_metres"`
	// MinAreaKM2 is the smallest region kept: smaller faces (junction
	// triangles, roundabouts, the strips between one-way carriageway
	// pairs) are merged into the neighbour across the longest shared
	// border. Default 0.05 km² (5 ha), about a small urban block, below
	// which a face cannot hold a district's worth of trip ends.
	MinAreaKM2 float64 `toml:"min_area_km2"`
	// MinCompactness is the Polsby-Popper floor 4πA/P² (1 for a circle,
	// π/4 for a square, near 0 for a strip). Thinner faces are merged like
	// small ones, whatever their size, because the strip between two
	// carriageways can be long enough to pass any area floor. Default
	// 0.15, which a rectangle passes up to a side ratio of about 1:19.
	// Tuned on the Baltimore extract: it merges the 70 m strip between two
	// parallel motorways (0.13) and keeps the block-wide strips between
	// one-way street pairs (0.19 and more).
	MinCompactness float64 `toml:"min_compactness"`
	// MaxSliverWidthMetres limits the compactness rule to narrow faces:
	// a face counts as thin only when it fails MinCompactness and its
	// mean width 2A/P is under this many metres. Default 100 m: wider than
	// the strip between the carriageways of a dual road or two parallel
	// motorways (tens of metres), narrower than a city block. Without it,
	// a wide but elongated face (the ring between an outer ring road and
	// the edge of the study area) counts as a sliver, and merging it into
	// a neighbour leaves an elongated face again, so the merging cascades
	// through whole districts. 0 means no limit.
	MaxSliverWidthMetres float64 `toml:"max_sliver_width_metres"`
	// ExtendMetres closes districts at a bank: a major road that ends
	// (a dangle) is extended straight ahead, along its last 10 m, to the
	// first barrier or major road within this distance. Default 150 m:
	// well beyond SnapMetres, enough for arterials mapped to stop at a
	// river bank or short of a railway embankment (a few tens of metres
	// to about a hundred, common mapping practice), and under a typical
	// urban block, so a road that merely dead-ends in a field stays a
	// dangle. 0 turns it off.
	ExtendMetres float64 `toml:"extend_metres"`
	// MinWaterAreaKM2 is the smallest water area kept as water: smaller
	// ponds and basins count as land and merge into the region around
	// them. Default 0.05 km², the same floor as MinAreaKM2.
	MinWaterAreaKM2 float64 `toml:"min_water_area_km2"`
	// MaxRegionKM2 is the largest region left whole: a larger one is split
	// by the SplitRoads inside it (then cleaned like the rest). Default
	// 4 km², about 2 km by 2 km, larger than an urban district between
	// arterials; above it a region usually holds a rail yard or park and
	// the districts on both sides. 0 turns splitting off.
	MaxRegionKM2 float64 `toml:"max_region_km2"`
	// SplitRoads are the highway classes that split regions above
	// MaxRegionKM2, tried in turn: the second class only cuts the regions
	// the first left oversized, and so on. Default: tertiary (the class
	// below the default Roads), then unclassified, residential and track,
	// so that a valley or a farm plain without tertiary roads is still cut
	// by the lanes, streets and tracks that run across it.
	SplitRoads []string `toml:"split_roads"`
	// MinBorderRoadMetres leaves roads with a shorter shared border out of
	// a region's BorderRoads and name: a road that only touches a corner
	// is no border. Default 30 m, about the width of a junction.
	MinBorderRoadMetres float64 `toml:"min_border_road_metres"`
	// NetworkRoads are highway classes read only to be drawn under the
	// findings on the report's maps (Partition.Network); they bound no
	// region. Default: tertiary, unclassified, residential and the *_link
	// ramps, the streets a reader finds their way by. An empty list leaves
	// minor roads off the maps (and saves their memory on a large extract).
	NetworkRoads []string `toml:"network_roads"`
	// RouteRoads are the highway classes read, with their node ids and
	// oneway, maxspeed, bridge, tunnel and ford tags, for the routable
	// network (Partition.Routing). Default: the motor roads from motorway
	// to residential and living_street, with the links; service roads and
	// tracks are left out. Empty reads none.
	RouteRoads []string `toml:"route_roads"`
	// Exact turns all cleaning off: the regions are the plain faces of the
	// noded linework plus the study-area rectangle (dangles and cut edges
	// dropped), as a polygonizer would give.
	Exact bool `toml:"exact"`
	// Warn, if not nil, receives notes for the user as they arise; they
	// are also kept in Partition.Warnings.
	Warn func(string) `toml:"-"`
}

// DefaultOptions returns the defaults documented on each Options field.
func DefaultOptions() Options {
	return Options{
		Roads:          []string{"motorway", "trunk", "primary", "secondary"},
		SnapMetres:     20,
		MinAreaKM2:     0.05,
		MinCompactness: 0.15,

		MaxSliverWidthMetres: 100,

		Barriers:            []string{"rail", "river", "canal", "coastline", "water"},
		ExtendMetres:        150,
		MinWaterAreaKM2:     0.05,
		MaxRegionKM2:        4,
		SplitRoads:          []string{"tertiary", "unclassified", "residential", "track"},
		MinBorderRoadMetres: 30,
		NetworkRoads:        []string{"tertiary", "unclassified", "residential", "motorway_link", "trunk_link", "primary_link", "secondary_link", "tertiary_link"},
		RouteRoads: []string{"motorway", "trunk", "primary", "secondary", "tertiary", "unclassified", "residential", "living_street",
			"motorway_link", "trunk_link", "primary_link", "secondary_link", "tertiary_link"},
	}
}

// barrierKinds lists the Barriers values in the order they are described.
var barrierKinds = [...]string{"rail", "river", "canal", "coastline", "water"}

// barrierMatch reports whether tags select the barrier kind name.
func barrierMatch(name string, tags osm.Tags) bool {
	switch name {
	case "rail":
		return tags.Find("railway") == "rail"
	case "river":
		return tags.Find("waterway") == "river"
	case "canal":
		return tags.Find("waterway") == "canal"
	case "coastline":
		return tags.Find("natural") == "coastline"
	case "water":
		return isWaterArea(tags)
	}
	return false
}

// isWaterArea reports whether tags describe a water area.
func isWaterArea(tags osm.Tags) bool {
	return tags.Find("natural") == "water" || tags.Find("waterway") == "riverbank"
}

func knownBarrier(name string) bool {
	for _, k := range barrierKinds {
		if k == name {
			return true
		}
	}
	return false
}

// ParseBBox parses a study area written "W,S,E,N" in WGS84 degrees
// (west and east longitudes, south and north latitudes).
func ParseBBox(s string) (orb.Bound, error) {
	parts := strings.Split(s, ",")
	if len(parts) != 4 {
		return orb.Bound{}, fmt.Errorf("bbox %q: want four numbers W,S,E,N, got %d", s, len(parts))
	}
	var v [4]float64
	names := [4]string{"west", "south", "east", "north"}
	for i, p := range parts {
		f, err := strconv.ParseFloat(strings.TrimSpace(p), 64)
		if err != nil || math.IsNaN(f) || math.IsInf(f, 0) {
			return orb.Bound{}, fmt.Errorf("bbox %q: %s %q is not a number", s, names[i], strings.TrimSpace(p))
		}
		v[i] = f
	}
	b := orb.Bound{Min: orb.Point{v[0], v[1]}, Max: orb.Point{v[2], v[3]}}
	if err := checkBound(b); err != nil {
		return orb.Bound{}, fmt.Errorf("bbox %q: %v", s, err)
	}
	return b, nil
}

// checkBound reports whether b is a usable study rectangle.
func checkBound(b orb.Bound) error {
	for _, x := range []float64{b.Min[0], b.Min[1], b.Max[0], b.Max[1]} {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return fmt.Errorf("coordinate %v is not finite", x)
		}
	}
	switch {
	case b.Min[0] < -180 || b.Max[0] > 180:
		return fmt.Errorf("longitudes %v..%v outside -180..180", b.Min[0], b.Max[0])
	case b.Min[1] < -85 || b.Max[1] > 85:
		return fmt.Errorf("latitudes %v..%v outside -85..85", b.Min[1], b.Max[1])
	case b.Min[0] >= b.Max[0]:
		return fmt.Errorf("west %v is not less than east %v", b.Min[0], b.Max[0])
	case b.Min[1] >= b.Max[1]:
		return fmt.Errorf("south %v is not less than north %v", b.Min[1], b.Max[1])
	case b.Max[0]-b.Min[0] > 10 || b.Max[1]-b.Min[1] > 10:
		return fmt.Errorf("spans %.3g° x %.3g°, more than the 10° a local planar projection serves", b.Max[0]-b.Min[0], b.Max[1]-b.Min[1])
	}
	return nil
}
