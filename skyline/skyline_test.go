package skyline

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"narrows/regiongraph"
)

// bruteDominates is the definition in DESIGN.md, written out directly.
func bruteDominates(e, f Point) bool {
	if e.Trips < f.Trips || e.Speed > f.Speed || e.Detour < f.Detour {
		return false
	}
	return e.Trips > f.Trips || e.Speed < f.Speed || e.Detour > f.Detour
}

func bruteDominators(points []Point) []int {
	out := make([]int, len(points))
	for i, f := range points {
		for j, e := range points {
			if i != j && bruteDominates(e, f) {
				out[i]++
			}
		}
	}
	return out
}

// bruteLayers peels skylines off one at a time.
func bruteLayers(points []Point) []int {
	layers := make([]int, len(points))
	left := len(points)
	for layer := 1; left > 0; layer++ {
		var peel []int
		for i, f := range points {
			if layers[i] != 0 {
				continue
			}
			dominated := false
			for j, e := range points {
				if layers[j] == 0 && j != i && bruteDominates(e, f) {
					dominated = true
					break
				}
			}
			if !dominated {
				peel = append(peel, i)
			}
		}
		for _, i := range peel {
			layers[i] = layer
		}
		left -= len(peel)
	}
	return layers
}

// randomPoints draws points from few distinct values per axis, so ties and
// exact duplicates are common.
func randomPoints(rng *rand.Rand, n, distinct int) []Point {
	pts := make([]Point, n)
	for i := range pts {
		pts[i] = Point{
			Trips:  1 + rng.IntN(distinct),
			Speed:  float64(rng.IntN(distinct)) * 0.5,
			Detour: 1 + float64(rng.IntN(distinct))*0.1,
		}
		if i > 0 && rng.IntN(5) == 0 { // an exact duplicate of an earlier point
			pts[i] = pts[rng.IntN(i)]
		}
	}
	return pts
}

func TestAgainstBruteForce(t *testing.T) {
	cases := []struct {
		n, distinct, seeds int
	}{
		{1, 3, 5},
		{2, 2, 20},
		{10, 2, 50},
		{40, 3, 50},
		{100, 4, 40},
		{300, 6, 20},
		{500, 1000, 10}, // mostly distinct: deep recursion, few ties
		{700, 3, 10},    // tiny value sets: huge tie classes
		{2000, 12, 3},   // deep recursion with ties on every axis
	}
	for _, c := range cases {
		for seed := range c.seeds {
			name := fmt.Sprintf("n%d_d%d_seed%d", c.n, c.distinct, seed)
			rng := rand.New(rand.NewPCG(uint64(seed), uint64(c.n)))
			pts := randomPoints(rng, c.n, c.distinct)
			wantDom := bruteDominators(pts)
			if got := Dominators(pts); !slices.Equal(got, wantDom) {
				t.Fatalf("%s: Dominators = %v, want %v", name, got, wantDom)
			}
			if got, want := Layers(pts), bruteLayers(pts); !slices.Equal(got, want) {
				t.Fatalf("%s: Layers = %v, want %v", name, got, want)
			}
			for _, k := range []int{1, 2, 3, 7} {
				var want []int
				for i, d := range wantDom {
					if d < k {
						want = append(want, i)
					}
				}
				if got := Skyband(pts, k); !slices.Equal(got, want) {
					t.Fatalf("%s: Skyband(k=%d) = %v, want %v", name, k, got, want)
				}
			}
		}
	}
}

func TestSmallCases(t *testing.T) {
	cases := []struct {
		name       string
		points     []Point
		dominators []int
		layers     []int
	}{
		{"empty", nil, []int{}, []int{}},
		{"one", []Point{{5, 3, 1.5}}, []int{0}, []int{1}},
		{"identical pair", []Point{{5, 3, 1.5}, {5, 3, 1.5}}, []int{0, 0}, []int{1, 1}},
		{"strict on trips only", []Point{{6, 3, 1.5}, {5, 3, 1.5}}, []int{0, 1}, []int{1, 2}},
		{"strict on speed only", []Point{{5, 3, 1.5}, {5, 2, 1.5}}, []int{1, 0}, []int{2, 1}},
		{"strict on detour only", []Point{{5, 3, 1.5}, {5, 3, 1.6}}, []int{1, 0}, []int{2, 1}},
		{"trade-off", []Point{{9, 5, 1.5}, {5, 3, 1.5}}, []int{0, 0}, []int{1, 1}},
		{"chain with duplicate top", []Point{{9, 1, 2}, {9, 1, 2}, {5, 3, 1.5}, {1, 9, 1}},
			[]int{0, 0, 2, 3}, []int{1, 1, 2, 3}},
		// NaN is the worst value on its axis.
		{"NaN speed", []Point{{5, math.NaN(), 1.5}, {5, 3, 1.5}}, []int{1, 0}, []int{2, 1}},
		{"NaN both equal", []Point{{5, math.NaN(), math.NaN()}, {5, math.NaN(), math.NaN()}}, []int{0, 0}, []int{1, 1}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := Dominators(c.points); !slices.Equal(got, c.dominators) {
				t.Errorf("Dominators = %v, want %v", got, c.dominators)
			}
			if got := Layers(c.points); !slices.Equal(got, c.layers) {
				t.Errorf("Layers = %v, want %v", got, c.layers)
			}
		})
	}
	if got := Skyband([]Point{{1, 1, 1}}, 0); got != nil {
		t.Errorf("Skyband with k=0 = %v, want nil", got)
	}
}

func edge(from, to, trips int, speed, detour float64) regiongraph.Edge {
	day, _ := regiongraph.ParseDay("2026-03-02")
	return regiongraph.Edge{Day: day, Window: 0, From: from, To: to, Trips: trips,
		SpeedMedian: speed, DetourMedian: detour}
}

func TestCandidates(t *testing.T) {
	// Trip-weighted median speed of the eligible edges below: speeds
	// 4 (20 trips), 4.5 (15), 5 (30), 8 (10), 10 (55); total 130, half = 65
	// reached exactly at 5, so the median is (5+8)/2 = 6.5.
	edges := []regiongraph.Edge{
		edge(1, 2, 20, 4, 1.5),          // 0: skyline, passes both gates
		edge(1, 3, 30, 5, 1.2),          // 1: skyline (most trips among slow), detour under floor
		edge(2, 3, 10, 8, 1.9),          // 2: skyline (longest detour), too fast
		edge(3, 1, 55, 10, 1.0),         // 3: skyline (most trips), too fast, too direct
		edge(3, 2, 5, 1, 3.0),           // 4: under MinTrips
		edge(2, 1, 15, 4.5, 1.4),        // 5: dominated by 0 only
		edge(4, 1, 12, math.NaN(), 2.0), // 6: no speed: not eligible
	}
	cases := []struct {
		name    string
		opts    func(*Options)
		indices []int
	}{
		{"defaults", func(*Options) {}, []int{0}},
		{"k=2", func(o *Options) { o.K = 2 }, []int{0, 5}},
		{"no detour gate", func(o *Options) { o.NoDetourGate = true }, []int{0, 1}},
		{"no speed gate", func(o *Options) { o.NoSpeedGate = true }, []int{0, 2}},
		{"no gates", func(o *Options) { o.NoSpeedGate, o.NoDetourGate = true, true }, []int{0, 1, 2, 3}},
		{"floor 1.6", func(o *Options) { o.DetourFloor = 1.6 }, nil},
		{"k=0 is k=1", func(o *Options) { o.K = 0 }, []int{0}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			opts := DefaultOptions()
			c.opts(&opts)
			res := Candidates(edges, opts)
			if !slices.Equal(res.Indices, c.indices) {
				t.Errorf("Indices = %v, want %v", res.Indices, c.indices)
			}
			if res.MedianSpeed != 6.5 {
				t.Errorf("MedianSpeed = %v, want 6.5", res.MedianSpeed)
			}
			if want := []int{1, 1, 1, 1, 0, 2, 0}; !slices.Equal(res.Layer, want) {
				t.Errorf("Layer = %v, want %v", res.Layer, want)
			}
			if want := []int{0, 0, 0, 0, 0, 1, 0}; !slices.Equal(res.Dominators, want) {
				t.Errorf("Dominators = %v, want %v", res.Dominators, want)
			}
		})
	}
}

func TestCandidatesEmpty(t *testing.T) {
	for _, edges := range [][]regiongraph.Edge{nil, {edge(1, 2, 3, 4, 2)}} {
		res := Candidates(edges, DefaultOptions())
		if len(res.Indices) != 0 || res.MedianSpeed != 0 || len(res.Layer) != len(edges) {
			t.Errorf("Candidates(%d edges, none eligible) = %+v", len(edges), res)
		}
	}
}

// TestCandidatesAgainstBruteForce checks the whole rule set, gates and
// skyband, on random days against the definitions.
func TestCandidatesAgainstBruteForce(t *testing.T) {
	for seed := range 30 {
		rng := rand.New(rand.NewPCG(uint64(seed), 99))
		pts := randomPoints(rng, 200, 8)
		edges := make([]regiongraph.Edge, len(pts))
		for i, p := range pts {
			edges[i] = edge(i, i+1, p.Trips+5, p.Speed, p.Detour)
		}
		opts := Options{MinTrips: 8, DetourFloor: 1.3, K: 1 + seed%3}
		res := Candidates(edges, opts)

		var eligible []Point
		var speeds []float64
		for _, e := range edges {
			if e.Trips >= opts.MinTrips {
				p := Point{e.Trips, e.SpeedMedian, e.DetourMedian}
				eligible = append(eligible, p)
				for range e.Trips { // expand to one value per trip
					speeds = append(speeds, e.SpeedMedian)
				}
			}
		}
		slices.Sort(speeds)
		median := speeds[len(speeds)/2]
		if len(speeds)%2 == 0 {
			median = (speeds[len(speeds)/2-1] + speeds[len(speeds)/2]) / 2
		}
		if res.MedianSpeed != median {
			t.Fatalf("seed %d: MedianSpeed = %v, want %v (median over trips)", seed, res.MedianSpeed, median)
		}
		var want []int
		for i, e := range edges {
			if e.Trips < opts.MinTrips {
				continue
			}
			f := Point{e.Trips, e.SpeedMedian, e.DetourMedian}
			dom := 0
			for _, p := range eligible {
				if bruteDominates(p, f) {
					dom++
				}
			}
			if dom < opts.K && f.Detour >= opts.DetourFloor && f.Speed < median {
				want = append(want, i)
			}
		}
		if !slices.Equal(res.Indices, want) {
			t.Fatalf("seed %d: Indices = %v, want %v", seed, res.Indices, want)
		}
	}
}

func FuzzSkyband(f *testing.F) {
	f.Add([]byte{1, 2, 3, 3, 2, 1, 1, 2, 3, 0, 0, 0}, uint8(1))
	f.Add([]byte{5, 5, 5, 5, 5, 5, 4, 4, 4}, uint8(2))
	f.Fuzz(func(t *testing.T, data []byte, k uint8) {
		var pts []Point
		for i := 0; i+2 < len(data) && len(pts) < 200; i += 3 {
			pts = append(pts, Point{int(data[i] % 8), float64(data[i+1] % 8), float64(data[i+2] % 8)})
		}
		dom := bruteDominators(pts)
		var want []int
		for i, d := range dom {
			if d < int(k) {
				want = append(want, i)
			}
		}
		if got := Skyband(pts, int(k)); !slices.Equal(got, want) {
			t.Fatalf("Skyband = %v, want %v", got, want)
		}
		if got, want := Layers(pts), bruteLayers(pts); !slices.Equal(got, want) {
			t.Fatalf("Layers = %v, want %v", got, want)
		}
	})
}
