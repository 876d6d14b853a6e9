package partition

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"
)

// randomSegments draws segments on a coarse lattice (scaled to the grid)
// so that shared end points, T-junctions, collinear overlaps, duplicates
// and zero-length segments are frequent, inside a bounding rectangle.
func randomSegments(rng *rand.Rand, n, lattice int) []seg {
	const scale = 1_000_000 // lattice step 1 m
	pt := func() ipt { return ipt{int64(rng.IntN(lattice+1)) * scale, int64(rng.IntN(lattice+1)) * scale} }
	var segs []seg
	for i := range n {
		a := pt()
		var b ipt
		switch rng.IntN(4) {
		case 0: // horizontal or vertical, often overlapping others
			b = a
			if rng.IntN(2) == 0 {
				b.X = int64(rng.IntN(lattice+1)) * scale
			} else {
				b.Y = int64(rng.IntN(lattice+1)) * scale
			}
		default:
			b = pt()
		}
		segs = append(segs, seg{a, b, int32(i)})
		if rng.IntN(10) == 0 { // a duplicate, reversed
			segs = append(segs, seg{b, a, int32(i)})
		}
	}
	m := int64(lattice) * scale
	c := []ipt{{-scale, -scale}, {m + scale, -scale}, {m + scale, m + scale}, {-scale, m + scale}}
	for i := range c {
		segs = append(segs, seg{c[i], c[(i+1)%4], -1})
	}
	return segs
}

// distToSeg is the distance from p to segment ab in grid units.
func distToSeg(p, a, b ipt) float64 {
	dx, dy := float64(b.X-a.X), float64(b.Y-a.Y)
	t := 0.0
	if l := dx*dx + dy*dy; l > 0 {
		t = math.Max(0, math.Min(1, (float64(p.X-a.X)*dx+float64(p.Y-a.Y)*dy)/l))
	}
	return math.Hypot(float64(a.X)+t*dx-float64(p.X), float64(a.Y)+t*dy-float64(p.Y))
}

func TestNodeBruteForce(t *testing.T) {
	for seed := range uint64(30) {
		rng := rand.New(rand.NewPCG(seed, 7))
		segs := randomSegments(rng, 5+rng.IntN(40), 4+rng.IntN(12))
		a, err := node(context.Background(), append([]seg(nil), segs...))
		if err != nil {
			t.Fatal(err)
		}
		// Oracle 1 (all pairs): edges meet only at shared vertices. Points
		// computed for crossings are rounded to the grid, so a meeting
		// within 2 grid units of a vertex of both edges is accepted.
		for i, e := range a.edges {
			p1, p2 := a.pts[e.u], a.pts[e.v]
			if e.u == e.v || !(p1.X < p2.X || (p1.X == p2.X && p1.Y < p2.Y)) {
				t.Fatalf("seed %d: edge %d has ends %v %v", seed, i, p1, p2)
			}
			for j := i + 1; j < len(a.edges); j++ {
				f := a.edges[j]
				if e.u == f.u && e.v == f.v {
					t.Fatalf("seed %d: duplicate edge %v", seed, e)
				}
				q1, q2 := a.pts[f.u], a.pts[f.v]
				for _, c := range [][3]ipt{{p1, p2, q1}, {p1, p2, q2}, {q1, q2, p1}, {q1, q2, p2}} {
					if d := distToSeg(c[2], c[0], c[1]); d < 0.5 && c[2] != c[0] && c[2] != c[1] {
						t.Errorf("seed %d: vertex %v lies on edge %v-%v without splitting it", seed, c[2], c[0], c[1])
					}
				}
				o1, o2 := orient(p1, p2, q1).sign(), orient(p1, p2, q2).sign()
				o3, o4 := orient(q1, q2, p1).sign(), orient(q1, q2, p2).sign()
				if o1*o2 < 0 && o3*o4 < 0 {
					t.Errorf("seed %d: edges %v-%v and %v-%v cross", seed, p1, p2, q1, q2)
				}
			}
		}
		// Oracle 2: the edges cover the input and nothing else. Every
		// edge's middle lies on an input segment, and points along every
		// input segment lie on an edge.
		for _, e := range a.edges {
			p1, p2 := a.pts[e.u], a.pts[e.v]
			mid := ipt{(p1.X + p2.X) / 2, (p1.Y + p2.Y) / 2}
			best := math.Inf(1)
			for _, s := range segs {
				best = math.Min(best, distToSeg(mid, s.a, s.b))
			}
			if best > 2 {
				t.Errorf("seed %d: edge %v-%v lies on no input segment (%.1f units off)", seed, p1, p2, best)
			}
		}
		for _, s := range segs {
			if s.a == s.b {
				continue // a zero-length segment bounds nothing
			}
			for _, f := range []float64{0.1, 0.37, 0.5, 0.81} {
				p := ipt{s.a.X + int64(f*float64(s.b.X-s.a.X)), s.a.Y + int64(f*float64(s.b.Y-s.a.Y))}
				best := math.Inf(1)
				for _, e := range a.edges {
					best = math.Min(best, distToSeg(p, a.pts[e.u], a.pts[e.v]))
				}
				if best > 2 {
					t.Errorf("seed %d: input %v-%v not covered at %v", seed, s.a, s.b, p)
				}
			}
		}
		// Euler's formula and the faces' summed area: the faces, holes
		// subtracted, tile the bounding rectangle.
		fs, err := a.faces(context.Background())
		if err != nil {
			t.Fatal(err)
		}
		if fs.vertices-fs.edges+fs.bounded+1 != 1+fs.components {
			t.Errorf("seed %d: Euler fails: V %d E %d F %d C %d", seed, fs.vertices, fs.edges, fs.bounded, fs.components)
		}
		if fs.bounded != len(fs.faces) {
			t.Errorf("seed %d: %d bounded faces before pruning, %d after", seed, fs.bounded, len(fs.faces))
		}
		var sum float64
		for _, f := range fs.faces {
			sum += f.area
			if f.area <= 0 {
				t.Errorf("seed %d: face of area %g", seed, f.area)
			}
		}
		c := segs[len(segs)-4:]
		w := float64(c[1].a.X-c[0].a.X) * gridMetres
		h := float64(c[2].a.Y-c[1].a.Y) * gridMetres
		if math.Abs(sum-w*h) > 1e-6*w*h {
			t.Errorf("seed %d: faces cover %.6f m², rectangle %.6f", seed, sum, w*h)
		}
	}
}

func TestOrient(t *testing.T) {
	// Exact where float64 fails: points far apart, nearly collinear.
	big := int64(1) << 40
	a, b := ipt{0, 0}, ipt{big, big + 1}
	c := ipt{2 * big, 2*big + 2}
	if orient(a, b, c).sign() != 0 {
		t.Errorf("collinear points reported off the line")
	}
	if orient(a, b, ipt{c.X, c.Y + 1}).sign() != 1 || orient(a, b, ipt{c.X, c.Y - 1}).sign() != -1 {
		t.Errorf("side of a nearly collinear point wrong")
	}
	if got := mul64(-3, 5).float(); got != -15 {
		t.Errorf("mul64(-3, 5) = %v", got)
	}
	x := mul64(big, big).sub(mul64(big, big-1))
	if x.float() != float64(big) {
		t.Errorf("128-bit difference %v, want %v", x.float(), float64(big))
	}
}

func TestClipSegment(t *testing.T) {
	r := rect{0, 0, 10_000_000, 5_000_000} // 10 m x 5 m
	tests := []struct {
		px, py, qx, qy float64
		a, b           ipt
		ok             bool
	}{
		{1, 1, 2, 2, ipt{1e6, 1e6}, ipt{2e6, 2e6}, true},      // inside
		{-5, 2, 15, 2, ipt{0, 2e6}, ipt{10e6, 2e6}, true},     // through
		{-1, -1, -2, -3, ipt{}, ipt{}, false},                 // outside
		{5, 2.5, 5, 20, ipt{5e6, 2.5e6}, ipt{5e6, 5e6}, true}, // leaves at the top
		{-10, 0, 20, 15, ipt{0, 5e6}, ipt{0, 5e6}, false},     // touches a corner only
		{0, -1, 0, 6, ipt{0, 0}, ipt{0, 5e6}, true},           // along the left side
		{-2, 1, 3, 6, ipt{0, 3e6}, ipt{2e6, 5e6}, true},       // cuts a corner
		{-2, 4, 4, 10, ipt{}, ipt{}, false},                   // misses
		{11, 1, 9, 2, ipt{10e6, 1.5e6}, ipt{9e6, 2e6}, true},  // enters from the right
	}
	for i, tc := range tests {
		a, b, ok := r.clipSegment(tc.px, tc.py, tc.qx, tc.qy)
		if ok != tc.ok || (ok && (a != tc.a || b != tc.b)) {
			t.Errorf("case %d: got %v %v %v, want %v %v %v", i, a, b, ok, tc.a, tc.b, tc.ok)
		}
	}
}

func TestNestedIslands(t *testing.T) {
	// Squares nested in the study rectangle, none touching: each face is
	// the ring between two squares, so every island must become a hole of
	// the face just outside it, whatever order the holes are found in.
	const m = 1_000_000 // 1 m
	square := func(lo, hi int64, way int32) []seg {
		c := []ipt{{lo * m, lo * m}, {hi * m, lo * m}, {hi * m, hi * m}, {lo * m, hi * m}}
		var s []seg
		for i := range c {
			s = append(s, seg{c[i], c[(i+1)%4], way})
		}
		return s
	}
	for _, order := range [][]int64{{0, 10, 20, 30}, {30, 20, 10, 0}, {20, 0, 30, 10}} {
		var segs []seg
		for i, lo := range order {
			segs = append(segs, square(lo, 100-lo, int32(i))...)
		}
		a, err := node(context.Background(), segs)
		if err != nil {
			t.Fatal(err)
		}
		fs, err := a.faces(context.Background())
		if err != nil {
			t.Fatal(err)
		}
		if len(fs.faces) != 4 {
			t.Fatalf("order %v: %d faces, want 4", order, len(fs.faces))
		}
		got := map[float64]int{}
		for _, f := range fs.faces {
			got[math.Round(f.area)] = len(f.rings)
		}
		// Rings 100-80, 80-60, 60-40 (one hole each) and the 40 m core.
		want := map[float64]int{100*100 - 80*80: 2, 80*80 - 60*60: 2, 60*60 - 40*40: 2, 40 * 40: 1}
		for area, rings := range want {
			if got[area] != rings {
				t.Errorf("order %v: faces by area and rings %v, want %v", order, got, want)
				break
			}
		}
	}
}
