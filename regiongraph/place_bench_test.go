package regiongraph

import (
	"context"
	"io"
	"testing"
	"time"
)

// BenchmarkPlaceCSV places the benchmark trip table as one shard, beside
// Ingest of the same file in the same run: rows per CPU-second of each
// (Place reads on one goroutine, so its rows per CPU-second is its speed
// per core) and their ratio.
func BenchmarkPlaceCSV(b *testing.B) {
	path, rows, size := benchCSV(b)
	p := gridPartition(bNX, bNY, gLon0, gLat0, bStep)
	opts := DefaultOptions()
	opts.TimeZone = "Europe/Berlin"
	if _, err := countLines(path); err != nil { // page cache
		b.Fatal(err)
	}
	b.SetBytes(size)
	b.ResetTimer()
	var placeCPU, ingestCPU, placeWall time.Duration
	for i := 0; i < b.N; i++ {
		t0, c0 := time.Now(), cpuTime()
		meta, n, err := PlaceTo(context.Background(), p, "", []Input{{Path: path, Format: FormatTrips}}, opts, io.Discard)
		placeWall += time.Since(t0)
		placeCPU += cpuTime() - c0
		if err != nil {
			b.Fatal(err)
		}
		if meta.Sources[0].Rows != int64(rows) || n == 0 {
			b.Fatalf("placed %d trips of %d rows, want %d rows", n, meta.Sources[0].Rows, rows)
		}
		c0 = cpuTime()
		if _, err := Ingest(context.Background(), p, "", []Input{{Path: path, Format: FormatTrips}}, opts); err != nil {
			b.Fatal(err)
		}
		ingestCPU += cpuTime() - c0
	}
	b.StopTimer()
	total := float64(rows) * float64(b.N)
	placeRate, ingestRate := total/placeCPU.Seconds(), total/ingestCPU.Seconds()
	b.ReportMetric(total/placeWall.Seconds(), "place-rows/s")
	b.ReportMetric(placeRate, "place-rows/cpu-s")
	b.ReportMetric(ingestRate, "ingest-rows/cpu-s")
	b.ReportMetric(placeRate/ingestRate, "place/ingest-per-cpu")
}
