package regiongraph

import (
	"os"
	"strings"
	"testing"
)

// SCHEMA.md documents every column of the placed-trip file, in order.
func TestPlacedColumnsDocumented(t *testing.T) {
	data, err := os.ReadFile("SCHEMA.md")
	if err != nil {
		t.Fatal(err)
	}
	_, section, ok := strings.Cut(string(data), "## Placed-trip file")
	if !ok {
		t.Fatal("SCHEMA.md has no section on the placed-trip file")
	}
	at := 0
	for _, c := range placedColumns {
		i := strings.Index(section[at:], "| `"+c.name+"` |")
		if i < 0 {
			t.Fatalf("column %s not documented (or out of order)", c.name)
		}
		at += i
	}
}
