package skyline

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"narrows/regiongraph"
)

// randomDay draws a day graph from few distinct values per axis (heavy ties
// and exact duplicates), with some edges under the trip floor and some
// speeds and detours that are NaN, ±Inf or -0.
func randomDay(rng *rand.Rand, n, distinct int) []regiongraph.Edge {
	edges := make([]regiongraph.Edge, n)
	odd := []float64{math.NaN(), math.Inf(1), math.Inf(-1), math.Copysign(0, -1), 0}
	for i := range edges {
		e := regiongraph.Edge{
			From:         i,
			To:           i + 1,
			Trips:        rng.IntN(distinct + 3),
			SpeedMedian:  float64(rng.IntN(distinct)) * 0.5,
			DetourMedian: 1 + float64(rng.IntN(distinct))*0.1,
		}
		switch rng.IntN(40) {
		case 0:
			e.SpeedMedian = odd[rng.IntN(len(odd))]
		case 1:
			e.DetourMedian = odd[rng.IntN(len(odd))]
		}
		if i > 0 && rng.IntN(5) == 0 { // an exact duplicate of an earlier edge
			e = edges[rng.IntN(i)]
			e.From, e.To = i, i+1
		}
		edges[i] = e
	}
	return edges
}

// bruteCandidates applies the rules of the package documentation directly:
// eligibility, the median over trips (one speed per trip), pairwise
// dominance among the eligible edges, then the gates.
func bruteCandidates(edges []regiongraph.Edge, opts Options) Selection {
	var sel Selection
	var eligible []Point
	var speeds []float64
	for _, e := range edges {
		if e.Trips >= max(opts.MinTrips, 1) && finite(e.SpeedMedian) && finite(e.DetourMedian) {
			eligible = append(eligible, Point{e.Trips, e.SpeedMedian, e.DetourMedian})
			for range e.Trips {
				speeds = append(speeds, e.SpeedMedian)
			}
		}
	}
	if len(speeds) == 0 {
		return sel
	}
	slices.Sort(speeds)
	sel.MedianSpeed = speeds[len(speeds)/2]
	if len(speeds)%2 == 0 {
		sel.MedianSpeed = (speeds[len(speeds)/2-1] + speeds[len(speeds)/2]) / 2
	}
	for i, e := range edges {
		if e.Trips < max(opts.MinTrips, 1) || !finite(e.SpeedMedian) || !finite(e.DetourMedian) {
			continue
		}
		f := Point{e.Trips, e.SpeedMedian, e.DetourMedian}
		dom := 0
		for _, p := range eligible {
			if bruteDominates(p, f) {
				dom++
			}
		}
		if dom < max(opts.K, 1) &&
			(opts.NoDetourGate || f.Detour >= opts.DetourFloor) &&
			(opts.NoSpeedGate || f.Speed < sel.MedianSpeed) {
			sel.Indices = append(sel.Indices, i)
		}
	}
	return sel
}

// selectOptions are the rule sets the Select tests run: every k up to
// beyond selectMaxK (where Select hands over to Candidates), gates on and
// off.
func selectOptions() []Options {
	var all []Options
	for _, k := range []int{0, 1, 2, 3, 5, selectMaxK + 1} {
		for gates := range 4 {
			all = append(all, Options{
				MinTrips: 3, DetourFloor: 1.3, K: k,
				NoDetourGate: gates&1 != 0, NoSpeedGate: gates&2 != 0,
			})
		}
	}
	return all
}

// TestSelectAgainstCandidates checks Select against the full analysis on
// random days of many sizes, including sizes past the radix sort's
// threshold and the packed-key limit's neighbourhood of ties.
func TestSelectAgainstCandidates(t *testing.T) {
	cases := []struct{ n, distinct, seeds int }{
		{0, 2, 1}, {1, 2, 10}, {2, 2, 20}, {7, 2, 30}, {40, 3, 30},
		{200, 5, 20}, {1000, 8, 5}, {3000, 40, 3}, {5000, 2000, 2},
	}
	for _, c := range cases {
		for seed := range c.seeds {
			rng := rand.New(rand.NewPCG(uint64(seed), uint64(c.n)+17))
			edges := randomDay(rng, c.n, c.distinct)
			for _, opts := range selectOptions() {
				want := Candidates(edges, opts)
				got := Select(edges, opts)
				if !slices.Equal(got.Indices, want.Indices) || got.MedianSpeed != want.MedianSpeed {
					t.Fatalf("n%d d%d seed %d %+v: Select = %v median %v, Candidates %v median %v",
						c.n, c.distinct, seed, opts, got.Indices, got.MedianSpeed, want.Indices, want.MedianSpeed)
				}
			}
		}
	}
}

// TestSelectAgainstBruteForce checks Select against the definitions
// written out pairwise (bruteCandidates).
func TestSelectAgainstBruteForce(t *testing.T) {
	for _, n := range []int{1, 5, 30, 150, 400} {
		for seed := range 8 {
			rng := rand.New(rand.NewPCG(uint64(seed), uint64(n)))
			edges := randomDay(rng, n, 2+seed)
			for _, opts := range selectOptions() {
				want := bruteCandidates(edges, opts)
				got := Select(edges, opts)
				if !slices.Equal(got.Indices, want.Indices) || got.MedianSpeed != want.MedianSpeed {
					t.Fatalf("n%d seed %d %+v: Select = %v median %v, brute force %v median %v",
						n, seed, opts, got.Indices, got.MedianSpeed, want.Indices, want.MedianSpeed)
				}
			}
		}
	}
}

// TestSelectHandExample is the worked example of ExampleCandidates with a
// twin and a near twin of the first edge: the twin shares its fate (no
// dominance between identical edges), the near twin with one trip fewer is
// dominated by both. The speed gate is off: the twins pull the day's median
// speed down to their own 3.5 m/s.
func TestSelectHandExample(t *testing.T) {
	edges := []regiongraph.Edge{
		edge(1, 2, 60, 3.5, 1.9),
		edge(2, 1, 55, 4.0, 1.8),
		edge(1, 3, 120, 12, 1.1),
		edge(3, 4, 25, 2.5, 1.5),
		edge(4, 5, 4, 1.0, 3.0),
		edge(5, 6, 60, 3.5, 1.9),
		edge(6, 7, 59, 3.5, 1.9),
	}
	for _, c := range []struct {
		k    int
		want []int
	}{
		{1, []int{0, 3, 5}},
		{2, []int{0, 3, 5}},
		{3, []int{0, 3, 5, 6}}, // 6>7 has two dominators; 2>1 has three
		{4, []int{0, 1, 3, 5, 6}},
	} {
		opts := DefaultOptions()
		opts.K, opts.NoSpeedGate = c.k, true
		if got := Select(edges, opts); !slices.Equal(got.Indices, c.want) {
			t.Errorf("k=%d: Indices = %v, want %v", c.k, got.Indices, c.want)
		}
	}
}

func FuzzSelect(f *testing.F) {
	f.Add([]byte{12, 2, 3, 12, 2, 3, 11, 2, 3, 20, 9, 0}, uint8(1))
	f.Add([]byte{5, 5, 5, 5, 5, 5, 4, 4, 4, 255, 254, 253}, uint8(0x12))
	f.Fuzz(func(t *testing.T, data []byte, flags uint8) {
		odd := []float64{math.NaN(), math.Inf(1), math.Inf(-1), math.Copysign(0, -1)}
		value := func(b byte, scale float64) float64 {
			if b >= 252 {
				return odd[b-252]
			}
			return float64(b%8) * scale
		}
		var edges []regiongraph.Edge
		for i := 0; i+2 < len(data) && len(edges) < 300; i += 3 {
			edges = append(edges, edge(i, i+1, int(data[i]%16), value(data[i+1], 0.5), 1+value(data[i+2], 0.1)))
		}
		opts := Options{
			MinTrips: 2, DetourFloor: 1.3, K: int(flags & 0x1f),
			NoDetourGate: flags&0x20 != 0, NoSpeedGate: flags&0x40 != 0,
		}
		got := Select(edges, opts)
		for name, want := range map[string]Selection{
			"Candidates":  {Candidates(edges, opts).Indices, Candidates(edges, opts).MedianSpeed},
			"brute force": bruteCandidates(edges, opts),
		} {
			if !slices.Equal(got.Indices, want.Indices) || got.MedianSpeed != want.MedianSpeed {
				t.Fatalf("Select = %v median %v, %s %v median %v", got.Indices, got.MedianSpeed, name, want.Indices, want.MedianSpeed)
			}
		}
	})
}

// BenchmarkDay runs the full analysis and Select on the same days; compare
// them with benchstat -col /fn.
func BenchmarkDay(b *testing.B) {
	for _, day := range []struct {
		name  string
		edges []regiongraph.Edge
	}{
		{"edges=3k", benchEdges(3_000, 4)}, // a city day at --min-trips 3
		{"edges=100k", benchEdges(100_000, 2)},
		{"edges=1M", benchEdges(1_000_000, 1)},
	} {
		for _, fn := range []struct {
			name string
			run  func([]regiongraph.Edge, Options)
		}{
			{"Candidates", func(e []regiongraph.Edge, o Options) { Candidates(e, o) }},
			{"Select", func(e []regiongraph.Edge, o Options) { Select(e, o) }},
		} {
			b.Run(fmt.Sprintf("%s/fn=%s", day.name, fn.name), func(b *testing.B) {
				start := cpuTime()
				for b.Loop() {
					fn.run(day.edges, DefaultOptions())
				}
				b.ReportMetric(float64(cpuTime()-start)/float64(b.N), "cpu-ns/op")
			})
		}
	}
}
