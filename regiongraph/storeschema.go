package regiongraph

import (
	"slices"

	"github.com/parquet-go/parquet-go"
)

// schemaVersion is the version of the store's Parquet layout (SCHEMA.md).
const schemaVersion = 1

// File metadata keys of the store.
const (
	metaSchemaVersion = "schema_version"
	metaRegions       = "regions_sha256"
	metaTimeZone      = "time_zone"
	metaWindows       = "windows"
	metaQuality       = "quality"
	metaSources       = "sources"
	metaRegionsJSON   = "regions_geojson"
	metaDayTotals     = "day_totals"
)

// A storeColumn is a column of the store: its name, its Parquet type, and
// the Edge field it holds, reached through the accessor of the type's kind.
// The two byte array columns hold the text of an edge's day and window
// (see storeText).
type storeColumn struct {
	name   string
	node   parquet.Node
	int    func(e *Edge) *int     // int32 and int64 columns
	double func(e *Edge) *float64 // double columns
}

func (c *storeColumn) kind() parquet.Kind { return c.node.Type().Kind() }

// The Parquet types of the store's columns: strings (dictionary-encoded,
// since a store repeats a few days and window names on every row), region
// ids, counts and measures.
var (
	dictString = parquet.Encoded(parquet.String(), &parquet.RLEDictionary)
	int32Node  = parquet.Int(32)
	int64Node  = parquet.Int(64)
	doubleNode = parquet.Leaf(parquet.DoubleType)
)

// storeColumns are the columns of the store in file order, the one list of
// them; SCHEMA.md documents them (a test checks it).
var storeColumns = [...]storeColumn{
	{name: "day", node: dictString},
	{name: "window", node: dictString},
	{name: "from_region", node: int32Node, int: func(e *Edge) *int { return &e.From }},
	{name: "to_region", node: int32Node, int: func(e *Edge) *int { return &e.To }},
	{name: "trips", node: int64Node, int: func(e *Edge) *int { return &e.Trips }},
	{name: "speed_p25_mps", node: doubleNode, double: func(e *Edge) *float64 { return &e.SpeedP25 }},
	{name: "speed_median_mps", node: doubleNode, double: func(e *Edge) *float64 { return &e.SpeedMedian }},
	{name: "speed_p75_mps", node: doubleNode, double: func(e *Edge) *float64 { return &e.SpeedP75 }},
	{name: "detour_p25", node: doubleNode, double: func(e *Edge) *float64 { return &e.DetourP25 }},
	{name: "detour_median", node: doubleNode, double: func(e *Edge) *float64 { return &e.DetourMedian }},
	{name: "detour_p75", node: doubleNode, double: func(e *Edge) *float64 { return &e.DetourP75 }},
	{name: "distance_median_m", node: doubleNode, double: func(e *Edge) *float64 { return &e.DistanceMedian }},
	{name: "duration_median_s", node: doubleNode, double: func(e *Edge) *float64 { return &e.DurationMedian }},
	{name: "distance_sum_m", node: doubleNode, double: func(e *Edge) *float64 { return &e.DistanceSum }},
	{name: "straight_sum_m", node: doubleNode, double: func(e *Edge) *float64 { return &e.StraightSum }},
	{name: "duration_sum_s", node: doubleNode, double: func(e *Edge) *float64 { return &e.DurationSum }},
}

// The columns that ReadOptions filters on, as indexes in storeColumns.
const (
	storeDay    = 0
	storeWindow = 1
	storeTrips  = 4
)

// numStoreColumns is the number of columns of the store.
const numStoreColumns = len(storeColumns)

// storeSchemaName is the name of the schema's root in the files, the one
// every store so far was written with.
const storeSchemaName = "edgeRow"

// storeSchema returns the Parquet schema of the store: storeColumns in
// order, each required. node, when not nil, gives a column another type
// (tests write the plain strings of the first stores with it).
func storeSchema(node func(c *storeColumn) parquet.Node) *parquet.Schema {
	g := make(parquet.Group, numStoreColumns)
	for i := range storeColumns {
		c := &storeColumns[i]
		g[c.name] = c.node
		if node != nil {
			g[c.name] = node(c)
		}
	}
	return parquet.NewSchema(storeSchemaName, orderedGroup{g})
}

// orderedGroup is a parquet.Group whose fields come in the order of
// storeColumns; a Group alone sorts them by name.
type orderedGroup struct{ parquet.Group }

func (g orderedGroup) Fields() []parquet.Field {
	fields := g.Group.Fields()
	slices.SortStableFunc(fields, func(a, b parquet.Field) int {
		return storeColumnIndex(a.Name()) - storeColumnIndex(b.Name())
	})
	return fields
}

// storeColumnIndex returns the index of the named column in storeColumns,
// or -1.
func storeColumnIndex(name string) int {
	for i := range storeColumns {
		if storeColumns[i].name == name {
			return i
		}
	}
	return -1
}

// appendRow appends the Parquet row of e to row, the day and window
// written by text; the region ids must fit int32.
func appendRow(row parquet.Row, e *Edge, text *storeText) parquet.Row {
	for i := range storeColumns {
		c := &storeColumns[i]
		var v parquet.Value
		switch c.kind() {
		case parquet.ByteArray:
			if i == storeDay {
				v = parquet.ByteArrayValue(text.dayBytes(e.Day))
			} else {
				v = parquet.ByteArrayValue(text.windowBytes(e.Window))
			}
		case parquet.Int32:
			v = parquet.Int32Value(int32(*c.int(e)))
		case parquet.Int64:
			v = parquet.Int64Value(int64(*c.int(e)))
		default:
			v = parquet.DoubleValue(*c.double(e))
		}
		row = append(row, v.Level(0, 0, i))
	}
	return row
}

// The JSON values of the windows, quality and sources metadata.
type (
	windowJSON struct {
		Name  string `json:"name"`
		Start string `json:"start"` // HH:MM
		End   string `json:"end"`   // HH:MM, 24:00 allowed
	}
	qualityJSON struct {
		Read     int64            `json:"read"`
		Used     int64            `json:"used"`
		Rejected map[string]int64 `json:"rejected"`
		// Written only when not zero, so stores of data without offsets
		// keep their bytes.
		OffsetTimes    int64 `json:"offset_times,omitempty"`
		OffsetMismatch int64 `json:"offset_mismatch,omitempty"`
	}
	sourceJSON struct {
		Path   string `json:"path"`
		SHA256 string `json:"sha256"`
		Rows   int64  `json:"rows"`
	}
)
