package regiongraph

import (
	"bytes"
	"os"
	"regexp"
	"slices"
	"testing"

	"github.com/parquet-go/parquet-go"
)

// schemaColumn is a column as a written file and SCHEMA.md give it.
type schemaColumn struct {
	name string
	kind parquet.Kind
}

// TestStoreSchema derives the column list from the Parquet schema of a
// written store and compares it with storeColumns and with the column
// table of SCHEMA.md, so that the columns are written down once.
func TestStoreSchema(t *testing.T) {
	var buf bytes.Buffer
	if err := syntheticStore(2, 5, 4, "am").WriteParquet(&buf); err != nil {
		t.Fatal(err)
	}
	pf, err := parquet.OpenFile(bytes.NewReader(buf.Bytes()), int64(buf.Len()))
	if err != nil {
		t.Fatal(err)
	}
	var file []schemaColumn
	for _, f := range pf.Schema().Fields() {
		if !f.Leaf() || !f.Required() {
			t.Errorf("column %s: %v, want a required leaf", f.Name(), f)
		}
		file = append(file, schemaColumn{f.Name(), f.Type().Kind()})
	}
	var table []schemaColumn
	for i := range storeColumns {
		table = append(table, schemaColumn{storeColumns[i].name, storeColumns[i].kind()})
	}
	if !slices.Equal(file, table) {
		t.Errorf("written columns %v,\nstoreColumns %v", file, table)
	}
	if got := pf.Schema().Name(); got != storeSchemaName {
		t.Errorf("schema name %q", got)
	}
	for i, want := range map[int]string{storeDay: "day", storeWindow: "window", storeTrips: "trips"} {
		if storeColumns[i].name != want {
			t.Errorf("storeColumns[%d] is %s, want %s", i, storeColumns[i].name, want)
		}
	}

	// Every column holds the Edge field of its kind's accessor, and a
	// different one from every other column.
	var e Edge
	fields := make(map[any]string)
	for i := range storeColumns {
		c := &storeColumns[i]
		var field any
		switch c.kind() {
		case parquet.ByteArray: // written by storeText
			field = map[int]any{storeDay: &e.Day, storeWindow: &e.Window}[i]
		case parquet.Int32, parquet.Int64:
			field = c.int(&e)
		default:
			field = c.double(&e)
		}
		if other, dup := fields[field]; dup {
			t.Errorf("columns %s and %s hold the same field", other, c.name)
		}
		fields[field] = c.name
	}

	doc, err := os.ReadFile("SCHEMA.md")
	if err != nil {
		t.Fatal(err)
	}
	kinds := map[string]parquet.Kind{"string": parquet.ByteArray, "int32": parquet.Int32, "int64": parquet.Int64, "double": parquet.Double}
	var documented []schemaColumn
	for _, m := range regexp.MustCompile("(?m)^\\| `([a-z0-9_]+)` \\| (string|int32|int64|double) \\|").FindAllSubmatch(doc, -1) {
		documented = append(documented, schemaColumn{string(m[1]), kinds[string(m[2])]})
	}
	if !slices.Equal(documented, table) {
		t.Errorf("SCHEMA.md columns %v,\nstoreColumns %v", documented, table)
	}
}
