package regiongraph

import (
	"io"
	"path/filepath"
	"testing"

	"github.com/parquet-go/parquet-go"
)

// TestReadDayRange compares the day range read from the day column alone
// with the first and last day of every edge, in stores of one and of many
// row groups and pages.
func TestReadDayRange(t *testing.T) {
	s := syntheticStore(9, 30, 120, "pm", "am")
	first, last := s.Edges[0].Day, s.Edges[0].Day
	for _, e := range s.Edges {
		first, last = min(first, e.Day), max(last, e.Day)
	}
	if first == last {
		t.Fatal("the test store has one day")
	}
	dir := t.TempDir()
	for name, write := range map[string]func(io.Writer) error{
		"one group": s.WriteParquet,
		"many":      func(w io.Writer) error { return writeParquet(w, s, 100, parquet.PageBufferSize(512)) },
	} {
		path := filepath.Join(dir, name+".parquet")
		if err := createFile(path, write); err != nil {
			t.Fatal(err)
		}
		gf, gl, err := ReadDayRange(path)
		if err != nil || gf != first.String() || gl != last.String() {
			t.Errorf("%s: %s..%s, %v; every edge gives %s..%s", name, gf, gl, err, first, last)
		}
	}
	if _, _, err := ReadDayRange(filepath.Join(dir, "none.parquet")); err == nil {
		t.Error("a missing file gave no error")
	}
}
