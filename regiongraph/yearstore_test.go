package regiongraph

import (
	"flag"
	"os"
	"path/filepath"
	"testing"
	"time"
)

// The benchmark stores of a city-year: the days of a real ingest (of the
// simulated city, say 14 days at 320,000 trips a day) repeated in order
// until the wanted number of days, so that every day has a real day's
// size and spread of edges and the weekdays stay weekdays when the source
// covers whole weeks. Written in both layouts, for timing whole commands:
//
//	go test ./regiongraph -run TestWriteRepeatedStore -repeat-from SRC -repeat-days 365 -repeat-out DIR
//
// writes DIR/graphs (a dataset) and DIR/graphs.parquet.
var (
	repeatFrom = flag.String("repeat-from", "", "store (either layout) whose days TestWriteRepeatedStore repeats")
	repeatDays = flag.Int("repeat-days", 365, "days of the store TestWriteRepeatedStore writes")
	repeatOut  = flag.String("repeat-out", "", "folder TestWriteRepeatedStore writes graphs and graphs.parquet into")
)

func TestWriteRepeatedStore(t *testing.T) {
	if *repeatFrom == "" || *repeatOut == "" {
		t.Skip("writes benchmark stores only with -repeat-from and -repeat-out")
	}
	src := *repeatFrom
	if !IsDataset(src) {
		s, err := ReadFile(src)
		if err != nil {
			t.Fatal(err)
		}
		src = filepath.Join(t.TempDir(), "source")
		if err := s.WriteDataset(src); err != nil {
			t.Fatal(err)
		}
	}
	m, meta, err := readManifest(src)
	if err != nil {
		t.Fatal(err)
	}
	if len(m.Days) == 0 {
		t.Fatal("the source store has no days")
	}
	regions, err := os.ReadFile(filepath.Join(src, datasetRegionsName))
	if err != nil {
		t.Fatal(err)
	}
	// Each source day is used up to k times: the rows counts grow by k,
	// so that the store's trips stay within its rows used.
	k := int64((*repeatDays + len(m.Days) - 1) / len(m.Days))
	out := meta
	out.Quality.Read *= k
	out.Quality.Used *= k
	out.Quality.Rejected = map[string]int64{}
	for r, n := range meta.Quality.Rejected {
		out.Quality.Rejected[r] = n * k
	}
	if err := os.MkdirAll(*repeatOut, 0o755); err != nil {
		t.Fatal(err)
	}
	dw, err := CreateDataset(filepath.Join(*repeatOut, "graphs"), out, regions)
	if err != nil {
		t.Fatal(err)
	}
	defer dw.Abort()
	f, err := os.Create(filepath.Join(*repeatOut, "graphs.parquet"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	wopts, err := storeMetadata(&Store{Meta: out, regionsGeoJSON: regions})
	if err != nil {
		t.Fatal(err)
	}
	ew := newEdgeWriter(f, rowGroupRows, wopts, out.Windows)
	day0, _ := time.Parse(time.DateOnly, m.Days[0].Day)
	for i := range *repeatDays {
		edges, err := readDays(src, meta, m.Days[i%len(m.Days):i%len(m.Days)+1], ReadOptions{}, stretchRows)
		if err != nil {
			t.Fatal(err)
		}
		day := DayOf(day0.AddDate(0, 0, i))
		for j := range edges {
			edges[j].Day = day
		}
		if err := dw.WriteDay(day, edges); err != nil {
			t.Fatal(err)
		}
		if err := ew.add(edges); err != nil {
			t.Fatal(err)
		}
	}
	if err := ew.close(); err != nil {
		t.Fatal(err)
	}
	if err := dw.Close(); err != nil {
		t.Fatal(err)
	}
	t.Logf("%d days, %d edges", dw.Written().Days, dw.Written().Edges)
}
