package partition

import "github.com/paulmach/orb"

// Region is one face of the cleaned planar partition of the study area.
type Region struct {
	// ID is stable for the same input and options: regions are numbered
	// from 1 in a deterministic order.
	ID int
	// Name is what a local would call the region, unique within the
	// partition: the OSM place (suburb, village, town, quarter,
	// neighbourhood, hamlet, locality, city, as a node inside the region,
	// or an outline or place relation around its point) if there is one,
	// else its two longest border roads or barriers above ground joined by
	// " / " (motorways and trunks by their ref), else where it lies from
	// the nearest place ("0.8 km north of P"). Where regions would share a
	// name, each gets a suffix: a compass word for two; for more, the
	// nearest place, a further border road or a compass word where these
	// tell them apart, a number only where nothing does.
	Name string
	// Polygon is in WGS84 longitude/latitude; the exterior ring is
	// counter-clockwise, holes clockwise (RFC 7946).
	Polygon orb.Polygon
	// AreaKM2 and PerimeterKM are measured in the local planar projection.
	AreaKM2     float64
	PerimeterKM float64
	// Point is a representative point guaranteed to lie inside Polygon.
	Point orb.Point
	// BorderRoads lists the names (or refs) of the roads along the border,
	// longest shared length first.
	BorderRoads []BorderRoad
	// Neighbours lists the regions sharing a border, by ascending ID.
	Neighbours []Neighbour
}

// BorderRoad is a named road along a region's border.
type BorderRoad struct {
	Name     string
	LengthKM float64
}

// Neighbour is a region sharing a border of positive length.
type Neighbour struct {
	ID       int
	SharedKM float64
}

// Partition is the output of the partition step.
type Partition struct {
	// Source names the input file (base name) it was built from.
	Source string
	// Bound is the study area in WGS84.
	Bound orb.Bound
	// Regions are ordered by ID (1..n).
	Regions []Region
	// WaterKM2 is the area of the water inside the study area that is no
	// region (rivers and lakes drawn as areas, the sea beyond the
	// coastline): the regions and the water
	// together tile the study rectangle.
	WaterKM2 float64
	// Warnings are notes for the user (for example, study area taken from
	// the data extent).
	Warnings []string
	// Network is the linework of the extract inside the study area, for
	// maps: the roads, railways, waterways and coast read with the regions
	// (one pass over the file). It is not written to GeoJSON and is nil
	// after ReadGeoJSON.
	Network []NetworkLine
	// Routing holds the roads and barriers the routable network is built
	// from (Options.RouteRoads), read in the same pass; nil after
	// ReadGeoJSON or when RouteRoads is empty.
	Routing *Routing
	// Stats describes the arrangement the regions came from. It is not
	// written to GeoJSON and is zero after ReadGeoJSON.
	Stats Stats
}

// Stats describes the linework and the noded arrangement whose faces the
// regions were taken from (after gap closing, before sliver merging). On
// the arrangement Euler's formula for plane graphs holds:
// Vertices - Edges + (Faces + 1) = 1 + Components, where the 1 added to
// Faces is the unbounded face.
type Stats struct {
	// Lines is the number of lines read: runs of two or more consecutive
	// present nodes of the chosen ways. IncompleteWays counts chosen ways
	// that refer to nodes missing from the file.
	Lines, IncompleteWays int
	// Vertices, Edges, Components and Faces count the noded arrangement
	// (lines clipped to the study rectangle, plus its boundary): vertices
	// and edges after splitting at every crossing and dissolving
	// duplicates, connected components, and bounded faces.
	Vertices, Edges, Components, Faces int
	// DanglesDropped and CutEdgesDropped count edges that bound no face.
	DanglesDropped, CutEdgesDropped int
	// GapsClosed counts connectors added to close gaps; DanglesExtended
	// the road ends extended to a barrier or road ahead; SliversMerged
	// the faces merged into a neighbour (all zero in exact mode).
	GapsClosed, DanglesExtended, SliversMerged int
	// Oversized counts the regions above Options.MaxRegionKM2 before
	// splitting; RegionsSplit those of them the split roads cut, and
	// SplitInto the regions they became. SplitClasses lists the split road
	// classes that were added, in the order tried. StillOversized counts
	// the regions above the limit after splitting, StillOversizedNoRoads
	// those of them with no split road inside (mountain or farm land
	// without tertiary roads, tracks or streets), the others holding only
	// split roads that end inside them or that cut off pieces too small to
	// keep (under a quarter of the limit, which rejoin).
	Oversized, RegionsSplit, SplitInto    int
	SplitClasses                          []string
	StillOversized, StillOversizedNoRoads int
	// Barriers lists the barrier kinds with lines inside the study area,
	// the ones that bound regions.
	Barriers []string
}
