package town

import (
	"bytes"
	"context"
	"crypto/sha256"
	"errors"
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"
	"time"

	"github.com/paulmach/orb"
	"github.com/paulmach/osm"
	"github.com/paulmach/osm/osmxml"
	"gonum.org/v1/gonum/graph/path"
)

// TestGridDetourRatio checks the geometry of the routing: on a fine square
// grid the shortest path between two nodes is a Manhattan path, and for
// directions uniform on the circle the mean of Manhattan over straight-line
// distance is E|cos|+|sin| = 4/pi = 1.2732 (a mathematical fact). Points are
// drawn uniformly in the disc inscribed in the grid (a disc, unlike a square,
// makes the directions between two random points uniform), snapped to the
// nearest node, and only pairs at least 20 spacings apart count, so that the
// snapping hardly matters.
func TestGridDetourRatio(t *testing.T) {
	const n, spacing = 101, 50.0
	nw, err := gridNetwork(n, spacing)
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(7, 11))
	radius := float64(n-1) * spacing / 2
	snap := func() int {
		for {
			x, y := (rng.Float64()*2-1)*radius, (rng.Float64()*2-1)*radius
			if x*x+y*y > radius*radius {
				continue
			}
			i := int(math.Round((x + radius) / spacing))
			j := int(math.Round((y + radius) / spacing))
			return j*n + i
		}
	}
	origins := make([]int, 60)
	for k := range origins {
		origins[k] = snap()
	}
	lengths, err := nw.shortestLengths(origins...)
	if err != nil {
		t.Fatal(err)
	}
	var sum float64
	var pairs int
	for k, o := range origins {
		ox, oy := nw.nodePoint(o)
		for d := 0; d < 60; d++ {
			v := snap()
			vx, vy := nw.nodePoint(v)
			// Oracle: on the grid the shortest path is the Manhattan distance.
			if manhattan := math.Abs(vx-ox) + math.Abs(vy-oy); math.Abs(lengths[k][v]-manhattan) > 1e-6 {
				t.Fatalf("path %d->%d: %v m, Manhattan %v m", o, v, lengths[k][v], manhattan)
			}
			straight := math.Hypot(vx-ox, vy-oy)
			if straight < 20*spacing {
				continue
			}
			sum += lengths[k][v] / straight
			pairs++
		}
	}
	mean := sum / float64(pairs)
	want := 4 / math.Pi
	t.Logf("mean detour %.4f over %d pairs (4/pi = %.4f)", mean, pairs, want)
	if pairs < 1500 {
		t.Fatalf("only %d pairs far enough apart", pairs)
	}
	if math.Abs(mean/want-1) > 0.02 {
		t.Errorf("mean detour ratio %.4f, want within 2%% of 4/pi = %.4f", mean, want)
	}
}

func TestGridNetworkErrors(t *testing.T) {
	for _, c := range []struct {
		n       int
		spacing float64
	}{{1, 10}, {0, 10}, {2001, 10}, {5, 0}, {5, -1}, {5, math.NaN()}, {5, math.Inf(1)}} {
		if _, err := gridNetwork(c.n, c.spacing); err == nil {
			t.Errorf("gridNetwork(%d, %v): no error", c.n, c.spacing)
		}
	}
	nw, _ := gridNetwork(3, 10)
	if _, err := nw.shortestLengths(9); err == nil {
		t.Error("shortestLengths(9) on 9 nodes: no error")
	}
}

// TestBPR checks the volume-delay function against values worked by hand
// from t = t0 (1 + 0.15 (v/c)^4).
func TestBPR(t *testing.T) {
	for _, c := range []struct {
		t0, v, c, want float64
	}{
		{60, 0, 1000, 60},
		{60, 1000, 1000, 69},         // 60 * 1.15
		{60, 2000, 1000, 204},        // 60 * (1 + 0.15*16)
		{10, 500, 1000, 10.09375},    // 10 * (1 + 0.15/16)
		{30, 1500, 1000, 52.78125},   // 30 * (1 + 0.15*5.0625)
		{60, 100, 0, math.Inf(1)},    // no capacity
		{60, 100, -5, math.Inf(1)},   // nonsense capacity
		{0, 5000, 1000, 0},           // zero free-flow time stays zero
		{45, 3000, 1000, 45 * 13.15}, // 1 + 0.15*81
	} {
		if got := bpr(c.t0, c.v, c.c); math.Abs(got-c.want) > 1e-9 && !(math.IsInf(got, 1) && math.IsInf(c.want, 1)) {
			t.Errorf("bpr(%v, %v, %v) = %v, want %v", c.t0, c.v, c.c, got, c.want)
		}
	}
}

// TestMSATwoRoutes assigns a demand over two parallel links and compares
// with the user equilibrium found by bisection on t1(v) = t2(D - v).
func TestMSATwoRoutes(t *testing.T) {
	nw := &network{pos: []xy{{0, 0}, {1000, 0}, {500, 300}}}
	// Route 1: the direct link 0->1. Route 2: 0->2->1, longer but wider.
	nw.links = []link{
		{from: 0, to: 1, length: 1000, t0: 60, capacity: 800},
		{from: 0, to: 2, length: 600, t0: 45, capacity: 2000},
		{from: 2, to: 1, length: 600, t0: 45, capacity: 2000},
	}
	nw.finish()
	const demand = 2400.0
	od := &odMatrix{ends: []int32{0, 1}, m: 2, v: []float64{0, demand, 0, 0}}
	a, err := msa(context.Background(), nw, od, 40)
	if err != nil {
		t.Fatal(err)
	}
	t1 := func(v float64) float64 { return bpr(60, v, 800) }
	t2 := func(v float64) float64 { return 2 * bpr(45, v, 2000) }
	lo, hi := 0.0, demand
	for k := 0; k < 100; k++ {
		mid := (lo + hi) / 2
		if t1(mid) < t2(demand-mid) {
			lo = mid
		} else {
			hi = mid
		}
	}
	if got := a.Volume[0]; math.Abs(got-lo)/demand > 0.02 {
		t.Errorf("MSA volume on link 1 = %.1f, equilibrium %.1f", got, lo)
	}
	gaps := a.RelativeGaps
	if len(gaps) != 39 {
		t.Fatalf("%d gaps, want 39", len(gaps))
	}
	if !(gaps[len(gaps)-1] < gaps[0]/5) || gaps[len(gaps)-1] > 0.01 {
		t.Errorf("relative gap did not fall: first %.4g, last %.4g", gaps[0], gaps[len(gaps)-1])
	}
}

// TestMSAConvergesOnTown: the relative gap on the demo town falls round by
// round (allowing for the noise of MSA) and ends small.
func TestMSAConvergesOnTown(t *testing.T) {
	tw, err := Generate(defaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	o := defaultSimOptions()
	o.Days, o.TripsPerDay, o.MSARounds = 1, 10, 8
	_, st := simulate(t, tw, o)
	g := st.assignments[0].RelativeGaps
	t.Logf("relative gaps %.4f", g)
	if len(g) != 7 {
		t.Fatalf("%d gaps, want 7", len(g))
	}
	if !(g[len(g)-1] < g[0]/3) || g[len(g)-1] > 0.03 {
		t.Errorf("relative gap: first %.4f, last %.4f; want a fall by 3x to below 0.03", g[0], g[len(g)-1])
	}
}

func hashOf(t *testing.T, opts Options, sim SimOptions) [32]byte {
	t.Helper()
	tw, err := Generate(opts)
	if err != nil {
		t.Fatal(err)
	}
	h := sha256.New()
	if err := tw.WriteOSM(h, true); err != nil {
		t.Fatal(err)
	}
	if _, err := tw.Simulate(context.Background(), sim, h); err != nil {
		t.Fatal(err)
	}
	var out [32]byte
	copy(out[:], h.Sum(nil))
	return out
}

func TestDeterministic(t *testing.T) {
	p, err := Scenario("link")
	if err != nil {
		t.Fatal(err)
	}
	so := p.SimOptions(3)
	so.Days, so.TripsPerDay = 3, 1500
	opens := p.start.AddDate(0, 0, 1)
	so.LinkOpens = &opens
	so.IncidentRate = 1 // every day, so the incident code is covered too
	a := hashOf(t, Options{Size: SizeTown, Seed: 5}, so)
	b := hashOf(t, Options{Size: SizeTown, Seed: 5}, so)
	if a != b {
		t.Fatal("same seeds, different bytes")
	}
	if c := hashOf(t, Options{Size: SizeTown, Seed: 6}, so); c == a {
		t.Error("different town seed, same bytes")
	}
	so2 := so
	so2.Seed = 4
	if c := hashOf(t, Options{Size: SizeTown, Seed: 5}, so2); c == a {
		t.Error("different simulation seed, same bytes")
	}
}

// readOSM parses the OSM XML with the osmxml reader and checks it.
func readOSM(t *testing.T, data []byte) (nodes map[osm.NodeID]*osm.Node, ways []*osm.Way, bounds *osm.Bounds) {
	t.Helper()
	sc := osmxml.New(context.Background(), bytes.NewReader(data))
	defer sc.Close()
	nodes = make(map[osm.NodeID]*osm.Node)
	for sc.Scan() {
		switch e := sc.Object().(type) {
		case *osm.Node:
			if e.ID <= 0 {
				t.Fatalf("node id %d not positive", e.ID)
			}
			nodes[e.ID] = e
		case *osm.Way:
			ways = append(ways, e)
		case *osm.Bounds:
			bounds = e
		}
	}
	if err := sc.Err(); err != nil {
		t.Fatalf("osmxml: %v", err)
	}
	if bounds == nil {
		t.Fatal("no <bounds>")
	}
	for _, w := range ways {
		if len(w.Nodes) < 2 {
			t.Errorf("way %d has %d nodes", w.ID, len(w.Nodes))
		}
		for _, nd := range w.Nodes {
			if _, ok := nodes[nd.ID]; !ok {
				t.Fatalf("way %d refers to missing node %d", w.ID, nd.ID)
			}
		}
	}
	return nodes, ways, bounds
}

func TestWriteOSM(t *testing.T) {
	for _, size := range []Size{SizeTown, sizeCity} {
		t.Run(string(size), func(t *testing.T) {
			if size == sizeCity && testing.Short() {
				t.Skip("city in -short")
			}
			start := time.Now()
			tw, err := Generate(Options{Size: size, Seed: 1})
			if err != nil {
				t.Fatal(err)
			}
			t.Logf("generated %s in %v: %d nodes, %d ways", tw.Name, time.Since(start), len(tw.nodes), len(tw.ways))
			var before, after bytes.Buffer
			if err := tw.WriteOSM(&before, false); err != nil {
				t.Fatal(err)
			}
			if err := tw.WriteOSM(&after, true); err != nil {
				t.Fatal(err)
			}
			if !bytes.HasPrefix(before.Bytes(), []byte(`<?xml version="1.0" encoding="UTF-8"?>`+"\n"+`<osm version="0.6"`)) {
				t.Errorf("file does not start with an OSM 0.6 header: %q", before.Bytes()[:80])
			}
			nb, wb, bb := readOSM(t, before.Bytes())
			na, wa, _ := readOSM(t, after.Bytes())
			if len(na) != len(nb)+len(tw.linkNodes) || len(wa) != len(wb)+1 {
				t.Errorf("after has %d nodes, %d ways; before %d, %d", len(na), len(wa), len(nb), len(wb))
			}
			count := func(ways []*osm.Way, f func(osm.Tags) bool) int {
				n := 0
				for _, w := range ways {
					if f(w.Tags) {
						n++
					}
				}
				return n
			}
			roadBridges := func(tg osm.Tags) bool { return tg.Find("highway") != "" && tg.Find("bridge") == "yes" }
			rivers := count(wb, func(tg osm.Tags) bool { return tg.Find("waterway") == "river" })
			rails := count(wb, func(tg osm.Tags) bool { return tg.Find("railway") == "rail" })
			ring := count(wb, func(tg osm.Tags) bool { return tg.Find("highway") == "trunk" })
			primary := count(wb, func(tg osm.Tags) bool { return tg.Find("highway") == "primary" })
			secondary := count(wb, func(tg osm.Tags) bool { return tg.Find("highway") == "secondary" })
			local := count(wb, func(tg osm.Tags) bool { return tg.Find("highway") == "residential" || tg.Find("highway") == "tertiary" })
			oneway := count(wb, func(tg osm.Tags) bool { return tg.Find("oneway") == "yes" })
			if rivers != 1 || rails == 0 || ring == 0 || primary == 0 || secondary == 0 || local == 0 || oneway == 0 {
				t.Errorf("rivers %d, railway ways %d, ring %d, primary %d, secondary %d, local %d, one-way %d", rivers, rails, ring, primary, secondary, local, oneway)
			}
			// River bridges: the ring twice plus the arterial bridges; the
			// ring also bridges the railway twice. The link adds one.
			want := 2 + len(tw.lay.bridgeCols) + 2
			if got := count(wb, roadBridges); got != want {
				t.Errorf("%d road bridges before, want %d", got, want)
			}
			if got := count(wa, roadBridges); got != want+1 {
				t.Errorf("%d road bridges after, want %d", got, want+1)
			}
			crossings := 0
			for _, n := range nb {
				if n.Tags.Find("railway") == "level_crossing" {
					crossings++
				}
			}
			if want := tw.lay.ny - 1; crossings != want {
				t.Errorf("%d level crossings, want %d (one per inner east-west arterial)", crossings, want)
			}
			for _, w := range wb {
				if hw := w.Tags.Find("highway"); hw != "" {
					if w.Tags.Find("name") == "" || w.Tags.Find("maxspeed") == "" || w.Tags.Find("lanes") == "" {
						t.Fatalf("way %d (%s) lacks name, maxspeed or lanes: %v", w.ID, hw, w.Tags)
					}
				}
			}
			lk := tw.Link
			if lk.Tag("highway") != "tertiary" || lk.Tag("bridge") != "yes" {
				t.Errorf("link tags %v", lk.tags)
			}
			// The planted points and the link lie inside the bounds.
			b := orb.Bound{Min: orb.Point{bb.MinLon, bb.MinLat}, Max: orb.Point{bb.MaxLon, bb.MaxLat}}
			for _, p := range [][2]float64{tw.Housing.Centre, tw.Jobs.Centre, tw.LinkMidpoint} {
				if !b.Contains(p) {
					t.Errorf("point %v outside bounds %v", p, b)
				}
			}
			if tw.Housing.Centre[1] <= tw.Jobs.Centre[1] {
				t.Errorf("housing %v is not north of jobs %v", tw.Housing.Centre, tw.Jobs.Centre)
			}
		})
	}
}

func TestGenerateUnknownSize(t *testing.T) {
	if _, err := Generate(Options{Size: "village"}); err == nil || !strings.Contains(err.Error(), "village") {
		t.Errorf("err = %v, want one naming the size", err)
	}
	tw, err := Generate(Options{})
	if err != nil || tw.size != SizeTown {
		t.Errorf("zero Options: %v, size %q; want the town", err, tw.size)
	}
}

func TestSimulateOptionErrors(t *testing.T) {
	tw, err := Generate(defaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name string
		edit func(*SimOptions)
	}{
		{"days", func(o *SimOptions) { o.Days = -1 }},
		{"trips", func(o *SimOptions) { o.TripsPerDay = -5 }},
		{"rounds", func(o *SimOptions) { o.MSARounds = 1000 }},
		{"incidents", func(o *SimOptions) { o.IncidentRate = 1.5 }},
		{"incidents NaN", func(o *SimOptions) { o.IncidentRate = math.NaN() }},
		{"variation", func(o *SimOptions) { o.DayVariation = -0.1 }},
		{"zone nodes", func(o *SimOptions) { o.ZoneNodes = -1 }},
	} {
		o := defaultSimOptions()
		c.edit(&o)
		if _, err := tw.Simulate(context.Background(), o, &bytes.Buffer{}); err == nil {
			t.Errorf("%s: no error", c.name)
		}
	}
	if _, err := (&Town{}).Simulate(context.Background(), defaultSimOptions(), &bytes.Buffer{}); err == nil {
		t.Error("zero Town: no error")
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := tw.Simulate(ctx, defaultSimOptions(), &bytes.Buffer{}); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled context: err = %v", err)
	}
}

func TestScenario(t *testing.T) {
	if _, err := Scenario("other"); err == nil {
		t.Error("unknown kind: no error")
	}
	for _, kind := range []string{"link", "control"} {
		p, err := Scenario(kind)
		if err != nil {
			t.Fatal(err)
		}
		if !p.Before.To.Equal(p.After.From) || !p.Before.From.Equal(p.start) || p.After.To.Sub(p.start) != time.Duration(p.days)*24*time.Hour {
			t.Errorf("%s: periods %v / %v do not tile %d days from %v", kind, p.Before, p.After, p.days, p.start)
		}
		if (kind == "link") != (p.LinkOpens != nil) {
			t.Errorf("%s: LinkOpens %v", kind, p.LinkOpens)
		}
		if _, off := p.start.Zone(); off != 3600 {
			t.Errorf("%s: start offset %d s, want +01:00", kind, off)
		}
	}
}

// TestHeapTreeMatchesGonum compares the package's heap Dijkstra with
// gonum's DijkstraFrom (the oracle) on the town and the city under
// perturbed weights: the same distances, and on the town (routed by gonum)
// the same settle order.
func TestHeapTreeMatchesGonum(t *testing.T) {
	for _, size := range []Size{SizeTown, sizeCity} {
		tw, err := Generate(Options{Size: size, Seed: 3})
		if err != nil {
			t.Fatal(err)
		}
		nw, err := tw.networkOf(true)
		if err != nil {
			t.Fatal(err)
		}
		rng := rand.New(rand.NewPCG(1, 2))
		w := make([]float64, len(nw.links))
		for i, l := range nw.links {
			w[i] = l.t0 * (1 + rng.Float64())
		}
		n := len(nw.pos)
		a, b := newTree(n), newTree(n)
		for k := 0; k < 5; k++ {
			root := rng.IntN(n)
			nw.heapTree(root, w, a)
			sh := path.DijkstraFrom(nw.nodes[root], weighted{nw, w})
			for v := 0; v < n; v++ {
				if a.dist[v] != sh.WeightTo(int64(v)) {
					t.Fatalf("%s root %d node %d: heap %v, gonum %v", size, root, v, a.dist[v], sh.WeightTo(int64(v)))
				}
			}
			if size == SizeTown { // the town is routed with gonum: compare whole trees
				nw.shortestTree(root, w, b)
				nw.heapTree(root, w, a)
				if !slices.Equal(a.order, b.order) {
					t.Fatalf("root %d: orders differ", root)
				}
			}
		}
	}
}

func TestSimulateProgress(t *testing.T) {
	tw, err := Generate(defaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	o := defaultSimOptions()
	o.Days, o.TripsPerDay = 3, 200
	var calls [][2]int
	o.Progress = func(done, total int) { calls = append(calls, [2]int{done, total}) }
	if _, err := tw.Simulate(context.Background(), o, &bytes.Buffer{}); err != nil {
		t.Fatal(err)
	}
	if want := [][2]int{{1, 3}, {2, 3}, {3, 3}}; !slices.Equal(calls, want) {
		t.Errorf("progress calls %v, want %v", calls, want)
	}
}
