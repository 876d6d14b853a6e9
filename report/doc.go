// Package report writes a study's outputs.
//
// In: the study's description, the regions, the day-graph store's metadata
// and a scan or a comparison.
// Out: a workbook (.xlsx), map layers (regions.geojson, findings.geojson) and
// an HTML summary page with an inline SVG map. Every file is written to a
// temporary name and renamed into place.
package report
