// Package partition splits the study area of an OpenStreetMap extract into
// regions bounded by major roads and barriers.
//
// In: an OSM extract (PBF, or XML plain, gzip- or bzip2-compressed; the
// format is detected from the bytes, not the file name) and Options: the
// highway classes and barriers that bound regions, the study area, the
// snap tolerance and the sliver thresholds (see DefaultOptions).
// Out: a Partition, the regions that tile the study rectangle without gaps
// or overlaps, each with a stable id, its polygon in WGS84, area,
// perimeter, a representative point inside it, the roads along its border
// by shared length and its neighbours with the shared border length.
// WriteGeoJSON and ReadGeoJSON store a Partition as an RFC 7946
// FeatureCollection.
//
// # Method
//
// Build reads the file in one pass, keeping the chosen ways and a compact
// record (16 bytes, coordinates at OSM's resolution of 1e-7°) of every
// node, so that any reader works and a 50 MB PBF needs a few hundred MB at
// most. A way that refers to nodes the file lacks (cut off at the
// extract's edge) keeps each run of two or more consecutive present nodes
// as a line of its own. Each PBF block is checked before the decoder sees
// it (sizes, string indices, dense nodes), so a damaged or hostile file
// gives an error, never a crash.
//
// The study area is Options.BBox, else the bounds in the file's header,
// else, with a warning, the extent of the chosen lines. Lines are
// projected with a local equirectangular projection about the study
// area's centre (x = R·cos φ0·Δλ, y = R·Δφ, R = 6371008.8 m). It keeps
// the study rectangle a rectangle, so that clipping is exact, and it is
// the projection of the reference faces the tests compare with. Its scale
// error grows away from the centre latitude, about tan φ0 times the
// latitude offset in radians: under 0.5 % within 30 km north or south of
// the centre at 45°, so for a city or a small country; the summed area of
// the whole rectangle is exact to second order. Study areas beyond 10°
// are refused.
//
// Projected coordinates are rounded to a 1 µm grid, so every orientation
// test is exact in integer arithmetic. Lines are clipped to the study
// rectangle and the rectangle's boundary is added. Noding splits every
// segment at every crossing, at every end point that lies on another
// segment (T-junctions with or without a shared node, overlaps) and
// dissolves duplicate pieces; a uniform grid of segment boxes keeps it
// near linear. The faces of the noded arrangement come from a half-edge
// structure: dangles (edges with an end of degree one, repeatedly) and cut
// edges (the same face on both sides) bound nothing and are dropped, and
// a component that lies inside a face (an island) becomes a hole of the
// smallest face containing it. In exact mode (Options.Exact) these faces
// are the regions.
//
// Cleaning, in default mode, then:
//   - closes gaps: a line end within Options.SnapMetres of another line
//     is joined to the nearest point on it, unless the two are already
//     linked nearby along the network;
//   - merges slivers: a face smaller than Options.MinAreaKM2, or thinner
//     than Options.MinCompactness by the Polsby-Popper measure 4πA/P² while
//     narrower than Options.MaxSliverWidthMetres (mean width 2A/P), is
//     merged into the neighbour across its longest shared border, smallest
//     first, until none is left (a face without neighbours, such as the
//     only face of the study area, stays). Thin faces are merged whatever
//     their area: the strip between the two carriageways of a dual road can
//     run the length of the study area and pass any area floor. The width
//     limit keeps wide elongated faces (the ring outside a ring road) from
//     counting as slivers and cascading merges through whole districts.
//
// Regions are numbered from 1 by representative point, north to south,
// then west to east. The representative point is the middle of the widest
// interior interval on one of several horizontal lines across the region,
// so it lies inside the region and outside its holes. Border roads are
// named by the way's name tag, else its ref, else "(unnamed class)"
// (motorways and trunks by ref first; of a ";"-list, the first value);
// where ways overlap the edge is credited to the higher class. Areas and
// lengths are measured in the projection.
package partition
