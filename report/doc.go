// Package report writes a study's outputs.
//
// In: an Input holding the study's description (title, input files with
// their SHA-256, ordered settings), the regions (partition.Partition), the
// day-graph store's metadata (regiongraph.Meta, optional) and either a
// patterns.Scan of one period or a patterns.Comparison of two.
//
// Out:
//   - a workbook (.xlsx) with the sheets listed by Sheets: a summary with the
//     headline, the cautions, key figures, verdict counts, a map picture
//     (region ids, arrows coloured by verdict) below its caption, and the
//     input files and settings; the ranked weak links and their edges (in a
//     comparison each period ranks its own, so the period is shown beside
//     the rank); the comparison; daily values per finding edge; a daily
//     timeline with a line chart; edge-days with a speed-against-detour
//     scatter chart (candidates as their own series); regions; data
//     quality; and the method. Every sheet prints landscape, one page wide,
//     with its header row repeated;
//   - map layers of the regions (polygons, RFC 7946 ring orientation) and
//     of the findings (a line per finding edge between the regions'
//     representative points), as GeoJSON;
//   - an HTML page that opens offline, with the headline and the cautions,
//     the verdict table, an inline SVG map coloured by verdict with a
//     caption and a legend, the weak links and the input files.
//
// Units in every output: km/h, km, km², hours; detours are ratios of
// travel to straight-line distance; the types hold m/s and metres.
//
// Values computed from fewer trips than Input.PublicationMinTrips
// (DefaultPublicationMinTrips) are suppressed: the workbook shows "<10"
// for counts and "n<10" for values, in grey; the GeoJSON has nulls and
// suppressed = true; the page shows the markers. Text that came from data
// (road names, ids, paths, settings) is written to the workbook as string
// cells, never as formulas, so a road named "=HYPERLINK(...)" stays text.
//
// Every output is deterministic: the same Input gives byte-identical files.
// The workbook's creation time is fixed (Input.Created, by default the day
// after the last analysed day), and the order of its parts and of its
// content-type entries, which excelize v2.11.1 leaves to map order, is
// sorted. The two large sheets (Daily, Speed v detour) go through
// excelize's stream writer.
//
// Each output goes to an io.Writer (WriteWorkbook, WriteRegionsGeoJSON,
// WriteFindingsGeoJSON, WriteHTML): the caller names the files and makes
// their writing atomic. A writer checks its Input before it writes, so an
// invalid Input writes nothing.
package report
