package regiongraph

import (
	"bufio"
	"bytes"
	"cmp"
	"context"
	"io"
	"math/rand/v2"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"strconv"
	"sync"
	"sync/atomic"
	"syscall"
	"testing"
	"time"

	"narrows/partition"
	"narrows/partition/geodesy"
)

// The benchmark city: 100 regions of about 1.4 x 2.2 km, a month of trips
// whose destinations fall off with distance from the origin (a normal
// offset of about 3 km), times as local text.
const (
	bNX, bNY = 10, 10
	bStep    = 0.02
	bDays    = 30
	bSpread  = 0.04 // degrees, standard deviation of the destination offset
)

// writeBenchCSV writes n random trips and returns the file size.
func writeBenchCSV(tb testing.TB, path string, n int) int64 {
	tb.Helper()
	f, err := os.Create(path)
	if err != nil {
		tb.Fatal(err)
	}
	w := bufio.NewWriterSize(f, 1<<20)
	w.WriteString(tripHeader)
	rng := rand.New(rand.NewPCG(99, 100))
	day0 := time.Date(2024, 3, 1, 0, 0, 0, 0, time.UTC).Unix()
	var buf []byte
	for i := 0; i < n; i++ {
		// Destinations fall off with distance; they are redrawn until they
		// are in the study area and at least 600 m away, and speeds are
		// 10-60 km/h, so that nearly every row is used.
		start := day0 + rng.Int64N(bDays*86400)
		olon, olat := gLon0+rng.Float64()*bNX*bStep, gLat0+rng.Float64()*bNY*bStep
		var dlon, dlat, straight float64
		for try := 0; try < 20; try++ {
			dlon, dlat = olon+rng.NormFloat64()*bSpread, olat+rng.NormFloat64()*bSpread
			straight = geodesy.GreatCircleMetres([2]float64{olon, olat}, [2]float64{dlon, dlat})
			if dlon > gLon0 && dlon < gLon0+bNX*bStep && dlat > gLat0 && dlat < gLat0+bNY*bStep && straight > 600 {
				break
			}
		}
		dist := straight * (1 + rng.Float64())
		dur := int64(dist/((10+50*rng.Float64())/3.6)) + 1
		buf = buf[:0]
		buf = strconv.AppendInt(buf, int64(i), 10)
		buf = append(buf, ',')
		buf = time.Unix(start, 0).UTC().AppendFormat(buf, "2006-01-02 15:04:05")
		buf = append(buf, ',')
		buf = time.Unix(start+dur, 0).UTC().AppendFormat(buf, "2006-01-02 15:04:05")
		for _, v := range []float64{olon, olat, dlon, dlat} {
			buf = append(buf, ',')
			buf = strconv.AppendFloat(buf, v, 'f', 6, 64)
		}
		buf = append(buf, ',')
		buf = strconv.AppendFloat(buf, dist, 'f', 1, 64)
		buf = append(buf, '\n')
		w.Write(buf)
	}
	if err := w.Flush(); err != nil {
		tb.Fatal(err)
	}
	fi, _ := f.Stat()
	f.Close()
	return fi.Size()
}

// countLines is the physical limit of reading the file: newlines counted
// over 1 MB reads.
func countLines(path string) (int64, error) {
	f, err := os.Open(path)
	if err != nil {
		return 0, err
	}
	defer f.Close()
	buf := make([]byte, 1<<20)
	var n int64
	for {
		k, err := f.Read(buf)
		n += int64(bytes.Count(buf[:k], []byte{'\n'}))
		if err == io.EOF {
			return n, nil
		}
		if err != nil {
			return n, err
		}
	}
}

// TestMain removes the benchmark file shared by the rounds of a benchmark.
func TestMain(m *testing.M) {
	code := m.Run()
	if benchFile.path != "" {
		os.RemoveAll(filepath.Dir(benchFile.path))
	}
	os.Exit(code)
}

var benchFile struct {
	once sync.Once
	path string
	rows int
	size int64
}

func benchCSV(b *testing.B) (string, int, int64) {
	benchFile.once.Do(func() {
		dir, err := os.MkdirTemp("", "regiongraph-bench")
		if err != nil {
			b.Fatal(err)
		}
		benchFile.path = filepath.Join(dir, "trips.csv")
		benchFile.rows = 1_000_000
		benchFile.size = writeBenchCSV(b, benchFile.path, benchFile.rows)
	})
	return benchFile.path, benchFile.rows, benchFile.size
}

// BenchmarkIngestCSV reports trip rows per second from a 1M-row CSV, and the
// same for a plain line count of the file in the same run.
func BenchmarkIngestCSV(b *testing.B) {
	path, rows, size := benchCSV(b)
	p := gridPartition(bNX, bNY, gLon0, gLat0, bStep)
	opts := DefaultOptions()
	opts.TimeZone = "Europe/Berlin"
	// Warm the page cache so both measurements read from memory.
	if _, err := countLines(path); err != nil {
		b.Fatal(err)
	}
	var lineTime time.Duration
	b.SetBytes(size)
	b.ReportAllocs()
	b.ResetTimer()
	var ingestTime, ingestCPU time.Duration
	for i := 0; i < b.N; i++ {
		t0, c0 := time.Now(), cpuTime()
		s, err := Ingest(context.Background(), p, "", []Input{{Path: path, Format: FormatTrips}}, opts)
		ingestTime += time.Since(t0)
		ingestCPU += cpuTime() - c0
		if err != nil {
			b.Fatal(err)
		}
		if s.Meta.Quality.Read != int64(rows) {
			b.Fatalf("read %d rows, want %d", s.Meta.Quality.Read, rows)
		}
		t0 = time.Now()
		if n, err := countLines(path); err != nil || n != int64(rows)+1 {
			b.Fatalf("line count %d, %v", n, err)
		}
		lineTime += time.Since(t0)
	}
	b.StopTimer()
	ingestRate := float64(rows) * float64(b.N) / ingestTime.Seconds()
	lineRate := float64(rows) * float64(b.N) / lineTime.Seconds()
	b.ReportMetric(ingestRate, "rows/s")
	b.ReportMetric(lineRate, "linecount-rows/s")
	b.ReportMetric(ingestRate/lineRate, "ratio-to-linecount")
	// CPU time per row (all threads, including the garbage collector) does
	// not depend on how busy the machine is; 2 cores give at most
	// 2 s / (CPU time per row) rows per second.
	cpuPerRow := float64(ingestCPU.Nanoseconds()) / (float64(rows) * float64(b.N))
	b.ReportMetric(cpuPerRow, "cpu-ns/row")
	b.ReportMetric(2e9/cpuPerRow, "rows/s-on-2-idle-cores")
}

// cpuTime is the process's user and system time so far.
func cpuTime() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

// BenchmarkIngest10M ingests 10 million trips (a 1 GB CSV written to a
// temporary folder first, its days shuffled) and reports the peak heap in
// use, sampled every 5 ms, and the peak of the Go runtime's total memory
// from the OS: for Ingest, which returns the store in memory, and for the
// streamed ingest of "narrows ingest" (IngestTo, the file discarded).
func BenchmarkIngest10M(b *testing.B) {
	if testing.Short() {
		b.Skip("writes a 1 GB file")
	}
	dir := b.TempDir()
	path := filepath.Join(dir, "trips10m.csv")
	const rows = 10_000_000
	writeBenchCSV(b, path, rows)
	p := gridPartition(bNX, bNY, gLon0, gLat0, bStep)
	opts := DefaultOptions()
	opts.TimeZone = "Europe/Berlin"
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		var s *Store
		var err error
		inuse, sys, elapsed, cpu := measurePeak(func() {
			s, err = Ingest(context.Background(), p, "", []Input{{Path: path}}, opts)
		})
		if err != nil {
			b.Fatal(err)
		}
		b.ReportMetric(float64(inuse)/(1<<20), "peak-heap-inuse-MB")
		b.ReportMetric(float64(sys)/(1<<20), "peak-runtime-MB")
		b.ReportMetric(float64(rows)/elapsed.Seconds(), "rows/s")
		b.ReportMetric(float64(cpu.Nanoseconds())/rows, "cpu-ns/row")
		b.ReportMetric(float64(s.Meta.Quality.Used), "used")
		b.ReportMetric(float64(len(s.Edges)), "edges")
		s = nil
		var n Written
		inuse, sys, _, _ = measurePeak(func() {
			_, n, err = IngestTo(context.Background(), p, "", []Input{{Path: path}}, opts, io.Discard, nil)
		})
		if err != nil {
			b.Fatal(err)
		}
		b.ReportMetric(float64(inuse)/(1<<20), "streamed-peak-heap-inuse-MB")
		b.ReportMetric(float64(sys)/(1<<20), "streamed-peak-runtime-MB")
		b.ReportMetric(float64(n.Spilled)/(1<<20), "streamed-spilled-MB")
	}
}

// measurePeak runs f after a garbage collection and returns the peak heap
// in use and the peak of the runtime's memory from the OS, sampled every
// 5 ms, and f's wall and CPU time.
func measurePeak(f func()) (inuse, sys uint64, elapsed, cpu time.Duration) {
	runtime.GC()
	var peakInuse, peakSys atomic.Uint64
	stop := make(chan struct{})
	done := make(chan struct{})
	go func() {
		defer close(done)
		var ms runtime.MemStats
		tick := time.NewTicker(5 * time.Millisecond)
		defer tick.Stop()
		for {
			runtime.ReadMemStats(&ms)
			if ms.HeapInuse > peakInuse.Load() {
				peakInuse.Store(ms.HeapInuse)
			}
			if ms.Sys-ms.HeapReleased > peakSys.Load() {
				peakSys.Store(ms.Sys - ms.HeapReleased)
			}
			select {
			case <-stop:
				return
			case <-tick.C:
			}
		}
	}()
	t0, c0 := time.Now(), cpuTime()
	f()
	elapsed, cpu = time.Since(t0), cpuTime()-c0
	close(stop)
	<-done
	return peakInuse.Load(), peakSys.Load(), elapsed, cpu
}

// BenchmarkLocateAndorra places random points on the regions of the real
// Andorra extract: the cost of the region lookup on OSM polygons.
func BenchmarkLocateAndorra(b *testing.B) {
	regions, err := partition.ReadFile(context.Background(), filepath.Join("..", "..", "shared", "data", "osm", "andorra.osm.pbf"), partition.DefaultOptions())
	if err != nil {
		b.Skipf("regions of andorra.osm.pbf: %v", err)
	}
	loc, err := newLocator(regions)
	if err != nil {
		b.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(81, 82))
	bd := regions.Bound
	pts := make([][2]float64, 4096)
	for i := range pts {
		pts[i] = [2]float64{bd.Min[0] + rng.Float64()*(bd.Max[0]-bd.Min[0]), bd.Min[1] + rng.Float64()*(bd.Max[1]-bd.Min[1])}
	}
	vertices := 0
	for _, r := range regions.Regions {
		for _, ring := range r.Polygon {
			vertices += len(ring)
		}
	}
	interior := 0
	for _, r := range loc.cellRegion {
		if r >= 0 {
			interior++
		}
	}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		loc.locate(pts[i%len(pts)])
	}
	b.ReportMetric(float64(len(regions.Regions)), "regions")
	b.ReportMetric(float64(vertices), "vertices")
	b.ReportMetric(float64(interior)/float64(len(loc.cellRegion)), "interior-cell-share")
}

// yearStore returns a synthetic store of a year of day graphs over 2,000
// regions: 3,670 edges a day (1.34 M in all) in one window.
func yearStore() *Store { return syntheticStore(365, 2000, 3670, "am") }

// syntheticStore returns a store of perDay random edges a day and window
// among the given number of regions, trips falling off exponentially
// (about 5 % of the edges have 10 or more), and values of full float64
// precision, the hardest case for compression.
func syntheticStore(days, regions, perDay int, windows ...string) *Store {
	rng := rand.New(rand.NewPCG(7, 8))
	s := &Store{Meta: Meta{RegionsSHA256: "ab12", TimeZone: "Europe/Berlin", Quality: Quality{Rejected: map[string]int64{}}}}
	for _, r := range RejectReasons() {
		s.Meta.Quality.Rejected[string(r)] = 0
	}
	for i, w := range windows {
		s.Meta.Windows = append(s.Meta.Windows, Window{w, 60 * i, 60 * (i + 1)})
	}
	day0 := time.Date(2024, 1, 1, 0, 0, 0, 0, time.UTC)
	type pair struct{ from, to int }
	sorted := slices.Sorted(slices.Values(windows))
	for d := 0; d < days; d++ {
		day := DayOf(day0.AddDate(0, 0, d))
		for _, name := range sorted {
			w := WindowIndex(slices.Index(windows, name))
			seen := make(map[pair]bool, perDay)
			var pairs []pair
			for len(pairs) < perDay {
				p := pair{1 + rng.IntN(regions), 1 + rng.IntN(regions)} // region ids from 1
				if p.from != p.to && !seen[p] {
					seen[p] = true
					pairs = append(pairs, p)
				}
			}
			slices.SortFunc(pairs, func(a, b pair) int { return cmp.Or(cmp.Compare(a.from, b.from), cmp.Compare(a.to, b.to)) })
			for _, p := range pairs {
				trips := 1 + int(rng.ExpFloat64()*3)
				speed := 3 + 12*rng.Float64()
				detour := 1 + rng.Float64()
				dist := 1000 + 9000*rng.Float64()
				s.Edges = append(s.Edges, Edge{Day: day, Window: w, From: p.from, To: p.to, Trips: trips,
					SpeedP25: speed * 0.8, SpeedMedian: speed, SpeedP75: speed * 1.2,
					DetourP25: detour * 0.9, DetourMedian: detour, DetourP75: detour * 1.1,
					DistanceMedian: dist, DurationMedian: dist / speed,
					DistanceSum: dist * float64(trips), StraightSum: dist / detour * float64(trips), DurationSum: dist / speed * float64(trips)})
			}
		}
	}
	// The accounting of an ingest that used as many rows as the busiest
	// window holds trips.
	perWindow := map[WindowIndex]int64{}
	for _, e := range s.Edges {
		perWindow[e.Window] += int64(e.Trips)
		s.Meta.Quality.Used = max(s.Meta.Quality.Used, perWindow[e.Window])
	}
	s.Meta.Quality.Read = s.Meta.Quality.Used
	return s
}

// BenchmarkReadStore reads a year's store of 1.34 M edges (yearStore) in
// full and with the minimum trips of a scan, and reports file rows per
// second, the edges kept and the peak heap in use.
func BenchmarkReadStore(b *testing.B) {
	s := yearStore()
	path := filepath.Join(b.TempDir(), "graphs.parquet")
	t0 := time.Now()
	if err := createFile(path, s.WriteParquet); err != nil {
		b.Fatal(err)
	}
	write := time.Since(t0)
	fi, err := os.Stat(path)
	if err != nil {
		b.Fatal(err)
	}
	rows := len(s.Edges)
	b.Logf("wrote %d edges, %.1f MB, in %.2f s", rows, float64(fi.Size())/1e6, write.Seconds())
	s = nil
	for _, bc := range []struct {
		name string
		opts ReadOptions
	}{{"all", ReadOptions{}}, {"min-trips-10", ReadOptions{MinTrips: 10}}} {
		b.Run(bc.name, func(b *testing.B) {
			var kept int
			var peak uint64
			b.ReportAllocs()
			for b.Loop() {
				var err error
				var got *Store
				peak = peakHeap(func() { got, err = ReadFileOptions(path, bc.opts) })
				if err != nil {
					b.Fatal(err)
				}
				kept = len(got.Edges)
			}
			b.ReportMetric(float64(rows)*float64(b.N)/b.Elapsed().Seconds(), "rows/s")
			b.ReportMetric(float64(kept), "edges")
			b.ReportMetric(float64(peak)/(1<<20), "peak-heap-MB")
		})
	}
}

// peakHeap runs f and returns the peak heap in use, sampled every
// millisecond.
func peakHeap(f func()) uint64 {
	runtime.GC()
	var peak atomic.Uint64
	stop, done := make(chan struct{}), make(chan struct{})
	go func() {
		defer close(done)
		var ms runtime.MemStats
		tick := time.NewTicker(time.Millisecond)
		defer tick.Stop()
		for {
			runtime.ReadMemStats(&ms)
			if ms.HeapInuse > peak.Load() {
				peak.Store(ms.HeapInuse)
			}
			select {
			case <-stop:
				return
			case <-tick.C:
			}
		}
	}()
	f()
	close(stop)
	<-done
	return peak.Load()
}
