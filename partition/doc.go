// Package partition splits an OpenStreetMap extract into regions bounded by
// major roads and barriers.
//
// In: an OSM extract (PBF, or XML plain, gzip or bzip2; the format is detected
// from the bytes) and Options (road classes, barriers, study area, snap
// tolerance, sliver thresholds).
// Out: a Partition, the regions that tile the study area, each with a stable
// id, its polygon in WGS84, area, perimeter, a representative point inside it,
// the roads along its border and its neighbours.
package partition
