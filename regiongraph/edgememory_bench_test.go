package regiongraph

import (
	"flag"
	"runtime"
	"runtime/metrics"
	"testing"
	"unsafe"
)

var edgeMemoryEdges = flag.Int("edge-memory-edges", 1<<20, "edges BenchmarkEdgeMemory holds (a city year scanned at --min-trips 3 keeps about 6 M)")

// textEdge is an Edge with its day and window held as text, as Edge held
// them before Day and WindowIndex: two strings, four words of which two
// are pointers the collector follows.
type textEdge struct {
	Day    string
	Window string
	From   int
	To     int
	Trips  int

	SpeedP25, SpeedMedian, SpeedP75    float64
	DetourP25, DetourMedian, DetourP75 float64
	DistanceMedian, DurationMedian     float64
	DistanceSum, StraightSum           float64
	DurationSum                        float64
}

// BenchmarkEdgeMemory compares an Edge held by value (Day, WindowIndex)
// with one held by text (textEdge) side by side, on -edge-memory-edges
// edges of a year of days in two windows:
//   - op=fill allocates the slice and fills every edge in store order, as
//     the reader does (with text, each write of a string is a pointer
//     write, barriered while the collector marks);
//   - op=gc times a full collection with the slice live: with text the
//     collector scans every edge, by value the slice is noscan memory.
//
// It reports the bytes of an edge, the time per edge of a fill, and the
// time and the collector's CPU per collection.
func BenchmarkEdgeMemory(b *testing.B) {
	n := *edgeMemoryEdges
	days := make([]string, 365)
	for i := range days {
		days[i] = Day(20514 + i).String() // 2026-03-02 on
	}
	windows := []string{"am", "pm"}
	perDay := max(1, n/len(days))
	b.Run("edge=text/op=fill", func(b *testing.B) {
		for b.Loop() {
			es := make([]textEdge, n)
			for i := range es {
				e := &es[i]
				e.Day, e.Window = days[min(i/perDay, len(days)-1)], windows[i&1]
				e.From, e.To, e.Trips = i&1023+1, i>>10&1023+1, 3
				e.SpeedMedian, e.DetourMedian, e.DurationSum = 8, 1.3, 600
			}
			runtime.KeepAlive(es)
		}
		b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(n), "ns/edge")
		b.ReportMetric(float64(unsafe.Sizeof(textEdge{})), "B/edge")
	})
	b.Run("edge=value/op=fill", func(b *testing.B) {
		for b.Loop() {
			es := make([]Edge, n)
			for i := range es {
				e := &es[i]
				e.Day, e.Window = Day(20514+min(i/perDay, len(days)-1)), WindowIndex(i&1)
				e.From, e.To, e.Trips = i&1023+1, i>>10&1023+1, 3
				e.SpeedMedian, e.DetourMedian, e.DurationSum = 8, 1.3, 600
			}
			runtime.KeepAlive(es)
		}
		b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(n), "ns/edge")
		b.ReportMetric(float64(unsafe.Sizeof(Edge{})), "B/edge")
	})
	b.Run("edge=text/op=gc", func(b *testing.B) {
		es := make([]textEdge, n)
		for i := range es {
			es[i].Day, es[i].Window = days[min(i/perDay, len(days)-1)], windows[i&1]
		}
		gcWork(b, func() { runtime.KeepAlive(es) })
	})
	b.Run("edge=value/op=gc", func(b *testing.B) {
		es := make([]Edge, n)
		for i := range es {
			es[i].Day, es[i].Window = Day(20514+min(i/perDay, len(days)-1)), WindowIndex(i&1)
		}
		gcWork(b, func() { runtime.KeepAlive(es) })
	})
}

// gcWork times full collections while keep's data is live, and reports
// the collector's CPU time per collection (runtime/metrics).
func gcWork(b *testing.B, keep func()) {
	sample := []metrics.Sample{{Name: "/cpu/classes/gc/total:cpu-seconds"}, {Name: "/gc/cycles/total:gc-cycles"}}
	runtime.GC()
	metrics.Read(sample)
	cpu0, cycles0 := sample[0].Value.Float64(), sample[1].Value.Uint64()
	b.ResetTimer()
	for b.Loop() {
		runtime.GC()
	}
	b.StopTimer()
	metrics.Read(sample)
	keep()
	if cycles := sample[1].Value.Uint64() - cycles0; cycles > 0 {
		b.ReportMetric((sample[0].Value.Float64()-cpu0)/float64(cycles)*1e3, "ms-gc-cpu/gc")
	}
}
