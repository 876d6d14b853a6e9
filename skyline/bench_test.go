package skyline

import (
	"math"
	"math/rand/v2"
	"syscall"
	"testing"
	"time"

	"narrows/regiongraph"
)

// benchEdges draws a plausible day graph: trips heavy-tailed and integer
// (many ties), speeds and detours rounded as a store would hold them, speed
// falling slightly with trips.
func benchEdges(n int, seed uint64) []regiongraph.Edge {
	rng := rand.New(rand.NewPCG(seed, 7))
	edges := make([]regiongraph.Edge, n)
	for i := range edges {
		trips := 10 + int(math.Floor(math.Exp(rng.ExpFloat64()*1.2)))
		speed := math.Round((3+rng.Float64()*15-math.Log(float64(trips)))*100) / 100
		detour := math.Round((1+rng.ExpFloat64()*0.35)*1000) / 1000
		edges[i] = regiongraph.Edge{From: i, To: i + 1, Trips: trips, SpeedMedian: speed, DetourMedian: detour}
	}
	return edges
}

// cpuTime returns the process's user and system CPU time. On a shared
// machine it measures the work better than the wall clock.
func cpuTime() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

// benchCandidates runs Candidates and reports CPU time per call too.
func benchCandidates(b *testing.B, edges []regiongraph.Edge) {
	b.ResetTimer()
	start := cpuTime()
	for b.Loop() {
		Candidates(edges, DefaultOptions())
	}
	b.ReportMetric(float64(cpuTime()-start)/float64(b.N), "cpu-ns/op")
}

func BenchmarkCandidates1M(b *testing.B) {
	benchCandidates(b, benchEdges(1_000_000, 1))
}

func BenchmarkCandidates100k(b *testing.B) {
	benchCandidates(b, benchEdges(100_000, 2))
}

// BenchmarkBruteForce100k is the O(n²) definition, for comparison with
// BenchmarkCandidates100k; run it with -benchtime=1x.
func BenchmarkBruteForce100k(b *testing.B) {
	edges := benchEdges(100_000, 2)
	pts := make([]Point, len(edges))
	for i, e := range edges {
		pts[i] = Point{e.Trips, e.SpeedMedian, e.DetourMedian}
	}
	b.ResetTimer()
	for b.Loop() {
		bruteDominators(pts)
	}
}

// BenchmarkCandidates1MDistinct has unrounded speeds and detours, so every
// value is distinct and the Fenwick tree spans a million ranks.
func BenchmarkCandidates1MDistinct(b *testing.B) {
	rng := rand.New(rand.NewPCG(3, 7))
	edges := benchEdges(1_000_000, 3)
	for i := range edges {
		edges[i].SpeedMedian += rng.Float64() * 0.01
		edges[i].DetourMedian += rng.Float64() * 0.001
	}
	benchCandidates(b, edges)
}
