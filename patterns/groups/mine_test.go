package groups

import (
	"context"
	"errors"
	"fmt"
	"math/bits"
	"math/rand/v2"
	"reflect"
	"slices"
	"testing"
)

// bruteIndex enumerates every subset of the distinct edges of days, as
// bit masks over the sorted edge list, with its connectivity and days.
type bruteIndex struct {
	items     []Edge
	connected []bool
	daysOf    []uint64 // bit d set: the subset occurs on day d
}

func newBruteIndex(days [][]Edge) bruteIndex {
	var b bruteIndex
	seen := map[Edge]bool{}
	for _, day := range days {
		for _, e := range day {
			if !seen[e] {
				seen[e] = true
				b.items = append(b.items, e)
			}
		}
	}
	slices.SortFunc(b.items, CompareEdges)
	n := len(b.items)
	dayMasks := make([]uint64, len(days))
	for d, day := range days {
		for _, e := range day {
			dayMasks[d] |= 1 << slices.Index(b.items, e)
		}
	}
	b.connected = make([]bool, 1<<n)
	b.daysOf = make([]uint64, 1<<n)
	for mask := 1; mask < 1<<n; mask++ {
		b.connected[mask] = b.isConnected(uint64(mask))
		for d, dm := range dayMasks {
			if uint64(mask)&^dm == 0 {
				b.daysOf[mask] |= 1 << d
			}
		}
	}
	return b
}

// isConnected grows a set from one edge through shared regions.
func (b bruteIndex) isConnected(mask uint64) bool {
	regions := map[int]bool{}
	first := bits.TrailingZeros64(mask)
	regions[b.items[first].From], regions[b.items[first].To] = true, true
	reached := uint64(1) << first
	for grew := true; grew; {
		grew = false
		for i, e := range b.items {
			if mask&(1<<i) != 0 && reached&(1<<i) == 0 && (regions[e.From] || regions[e.To]) {
				reached |= 1 << i
				regions[e.From], regions[e.To] = true, true
				grew = true
			}
		}
	}
	return reached == mask
}

func (b bruteIndex) group(mask uint64) Group {
	var g Group
	for i, e := range b.items {
		if mask&(1<<i) != 0 {
			g.Edges = append(g.Edges, e)
		}
	}
	g.Days = []int{}
	for d := range 64 {
		if b.daysOf[mask]&(1<<d) != 0 {
			g.Days = append(g.Days, d)
		}
	}
	return g
}

// closedBrute reports whether no connected proper superset of mask occurs
// on the same days, by looking at every superset.
func (b bruteIndex) closedBrute(mask uint64) bool {
	all := uint64(1)<<len(b.items) - 1
	for sup := (mask + 1) | mask; sup <= all && sup > mask; sup = (sup + 1) | mask {
		if b.connected[sup] && b.daysOf[sup] == b.daysOf[mask] {
			return false
		}
	}
	return true
}

// bruteMine is Mine by definition: the frequent connected subsets of at
// most maxEdges edges, or (closed mode) their closures, the largest
// connected supersets with the same days.
func bruteMine(b bruteIndex, minSupport, maxEdges int, allFrequent bool) []Group {
	all := uint64(1)<<len(b.items) - 1
	found := map[uint64]bool{}
	for mask := uint64(1); mask <= all; mask++ {
		if !b.connected[mask] || bits.OnesCount64(b.daysOf[mask]) < minSupport {
			continue
		}
		if maxEdges > 0 && bits.OnesCount64(mask) > maxEdges {
			continue
		}
		if allFrequent {
			found[mask] = true
			continue
		}
		closure := mask
		for sup := mask; sup <= all; sup = (sup + 1) | mask {
			if b.connected[sup] && b.daysOf[sup] == b.daysOf[mask] && bits.OnesCount64(sup) > bits.OnesCount64(closure) {
				closure = sup
			}
			if sup == all {
				break
			}
		}
		found[closure] = true
	}
	var out []Group
	for mask := range found {
		out = append(out, b.group(mask))
	}
	slices.SortFunc(out, func(x, y Group) int { return compareEdgeLists(x.Edges, y.Edges) })
	return out
}

func randomDays(rng *rand.Rand, regions, items, days int) [][]Edge {
	var pool []Edge
	for len(pool) < items {
		e := Edge{rng.IntN(regions), rng.IntN(regions)}
		if e.From != e.To && !slices.Contains(pool, e) {
			pool = append(pool, e)
		}
	}
	out := make([][]Edge, days)
	for d := range out {
		p := 0.3 + 0.5*rng.Float64()
		for _, e := range pool {
			if rng.Float64() < p {
				out[d] = append(out[d], e)
			}
		}
		if rng.IntN(4) == 0 && len(out[d]) > 0 { // a duplicate within a day
			out[d] = append(out[d], out[d][0])
		}
	}
	return out
}

func maskOf(b bruteIndex, edges []Edge) uint64 {
	var mask uint64
	for _, e := range edges {
		mask |= 1 << slices.Index(b.items, e)
	}
	return mask
}

func TestMineAgainstBruteForce(t *testing.T) {
	ctx := context.Background()
	for seed := range 60 {
		rng := rand.New(rand.NewPCG(uint64(seed), 4))
		regions := 3 + rng.IntN(4)
		items := min(4+rng.IntN(7), regions*(regions-1))
		days := randomDays(rng, regions, items, 3+rng.IntN(10))
		b := newBruteIndex(days)
		for _, minSupport := range []int{1, 2, 3, len(days)} {
			for _, maxEdges := range []int{0, 1, 2, 3} {
				for _, allFrequent := range []bool{false, true} {
					name := fmt.Sprintf("seed%d/support%d/max%d/all%v", seed, minSupport, maxEdges, allFrequent)
					got, err := Mine(ctx, days, Options{MinSupport: minSupport, MaxEdges: maxEdges, AllFrequent: allFrequent})
					if err != nil {
						t.Fatalf("%s: %v", name, err)
					}
					want := bruteMine(b, minSupport, maxEdges, allFrequent)
					if len(got) == 0 && len(want) == 0 {
						continue
					}
					if !reflect.DeepEqual(got, want) {
						t.Fatalf("%s: days %v\nMine  = %v\nbrute = %v", name, days, got, want)
					}
					if allFrequent {
						continue
					}
					for _, g := range got {
						if !b.closedBrute(maskOf(b, g.Edges)) {
							t.Fatalf("%s: group %v is not closed", name, g)
						}
					}
				}
			}
		}
	}
}

// allElectronics is Table 6.1 of Han, Kamber and Pei, Data Mining:
// Concepts and Techniques, 3rd ed. (transactions T100..T900 over items
// I1..I5), written down from memory.
var allElectronics = [][]int{
	{1, 2, 5}, {2, 4}, {2, 3}, {1, 2, 4}, {1, 3},
	{2, 3}, {1, 3}, {1, 2, 3, 5}, {1, 2, 3},
}

// allElectronicsFrequent are the book's frequent item sets at a minimum
// support count of 2 (the L1, L2 and L3 of its Apriori walk-through, from
// memory), keyed by their items.
var allElectronicsFrequent = map[string]int{
	"[1]": 6, "[2]": 7, "[3]": 6, "[4]": 2, "[5]": 2,
	"[1 2]": 4, "[1 3]": 4, "[1 5]": 2, "[2 3]": 4, "[2 4]": 2, "[2 5]": 2,
	"[1 2 3]": 2, "[1 2 5]": 2,
}

// starDays takes item Ik as the edge from hub region 0 to region k, so
// every item set is connected.
func starDays(transactions [][]int) [][]Edge {
	days := make([][]Edge, len(transactions))
	for d, items := range transactions {
		for _, it := range items {
			days[d] = append(days[d], Edge{0, it})
		}
	}
	return days
}

func itemsOf(g Group) []int {
	var items []int
	for _, e := range g.Edges {
		items = append(items, e.To)
	}
	return items
}

func TestMineAllElectronics(t *testing.T) {
	days := starDays(allElectronics)
	groups, err := Mine(context.Background(), days, Options{MinSupport: 2, AllFrequent: true})
	if err != nil {
		t.Fatal(err)
	}
	got := map[string]int{}
	for _, g := range groups {
		got[fmt.Sprint(itemsOf(g))] = len(g.Days)
	}
	if !reflect.DeepEqual(got, allElectronicsFrequent) {
		t.Errorf("frequent sets = %v\nbook: %v", got, allElectronicsFrequent)
	}

	// The closed sets carry the same information: the support of any set is
	// the largest support of a closed set containing it.
	closed, err := Mine(context.Background(), days, Options{MinSupport: 2})
	if err != nil {
		t.Fatal(err)
	}
	derived := map[string]int{}
	for mask := 1; mask < 1<<5; mask++ {
		var set []int
		for i := range 5 {
			if mask&(1<<i) != 0 {
				set = append(set, i+1)
			}
		}
		best := 0
		for _, g := range closed {
			if items := itemsOf(g); isSubset(set, items) {
				best = max(best, len(g.Days))
			}
		}
		if best >= 2 {
			derived[fmt.Sprint(set)] = best
		}
	}
	if !reflect.DeepEqual(derived, allElectronicsFrequent) {
		t.Errorf("frequent sets derived from closed sets = %v\nbook: %v", derived, allElectronicsFrequent)
	}
	// {I1,I2,I3,I5} occurs once (T800) only, below the minimum support.
	for _, g := range closed {
		if fmt.Sprint(itemsOf(g)) == "[1 2 3 5]" {
			t.Errorf("infrequent set %v reported", g)
		}
	}
}

func isSubset(a, b []int) bool {
	for _, x := range a {
		if !slices.Contains(b, x) {
			return false
		}
	}
	return true
}

func TestMineEdgeCases(t *testing.T) {
	a, b, c, d := Edge{1, 2}, Edge{2, 3}, Edge{3, 4}, Edge{4, 5}
	x := Edge{8, 9}
	back := Edge{2, 1}
	cases := []struct {
		name string
		days [][]Edge
		opts Options
		want []Group
	}{
		{"no days", nil, Options{MinSupport: 1}, nil},
		{"one empty day", [][]Edge{{}}, Options{MinSupport: 1}, nil},
		{"one day", [][]Edge{{b, a, x}}, Options{MinSupport: 1},
			[]Group{{[]Edge{a, b}, []int{0}}, {[]Edge{x}, []int{0}}}},
		{"support all days", [][]Edge{{a, b}, {a, b, c}, {a}}, Options{MinSupport: 3},
			[]Group{{[]Edge{a}, []int{0, 1, 2}}}},
		{"support above days", [][]Edge{{a}, {a}}, Options{MinSupport: 3}, nil},
		{"day without candidates", [][]Edge{{a, b}, {}, {b, a}}, Options{MinSupport: 2},
			[]Group{{[]Edge{a, b}, []int{0, 2}}}},
		{"zero support taken as one", [][]Edge{{a}}, Options{}, []Group{{[]Edge{a}, []int{0}}}},
		{"both directions are two connected edges", [][]Edge{{a, back}, {a, back}}, Options{MinSupport: 2},
			[]Group{{[]Edge{a, back}, []int{0, 1}}}},
		{"together but not connected", [][]Edge{{a, x}, {a, x}}, Options{MinSupport: 2},
			[]Group{{[]Edge{a}, []int{0, 1}}, {[]Edge{x}, []int{0, 1}}}},
		{"nested closed groups", [][]Edge{{a, b}, {a, b}, {a}}, Options{MinSupport: 2},
			[]Group{{[]Edge{a}, []int{0, 1, 2}}, {[]Edge{a, b}, []int{0, 1}}}},
		// A chain that always recurs whole is reported whole even beyond
		// the bound, instead of as its many two-edge pieces.
		{"closure beyond MaxEdges", [][]Edge{{a, b, c, d}, {a, b, c, d}}, Options{MinSupport: 2, MaxEdges: 2},
			[]Group{{[]Edge{a, b, c, d}, []int{0, 1}}}},
		{"all frequent with bound", [][]Edge{{a, b, c}}, Options{MinSupport: 1, MaxEdges: 2, AllFrequent: true},
			[]Group{{[]Edge{a}, []int{0}}, {[]Edge{a, b}, []int{0}}, {[]Edge{b}, []int{0}},
				{[]Edge{b, c}, []int{0}}, {[]Edge{c}, []int{0}}}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			got, err := Mine(context.Background(), tc.days, tc.opts)
			if err != nil {
				t.Fatal(err)
			}
			if !reflect.DeepEqual(got, tc.want) {
				t.Errorf("Mine = %v, want %v", got, tc.want)
			}
		})
	}
}

func TestMineErrors(t *testing.T) {
	days := [][]Edge{{{1, 2}}}
	if _, err := Mine(context.Background(), days, Options{MaxEdges: -1}); err == nil {
		t.Error("negative MaxEdges accepted")
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := Mine(ctx, days, Options{MinSupport: 1}); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled Mine: err = %v, want context.Canceled", err)
	}
}

// benchmarkDays draws a year of daily candidates over a 45 x 45 grid of
// about 2,000 regions: hot spots each with 4 to 4+spread-1 chronic edges
// between neighbouring regions, each spot present on a share of days drawn
// from [pLow, pHigh), and the rest of each day's 300 candidates drawn at
// random between nearby regions.
func benchmarkDays(seed uint64, hotSpots, spread int, pLow, pHigh float64) [][]Edge {
	const side, perDay = 45, 300
	rng := rand.New(rand.NewPCG(seed, 11))
	region := func(x, y int) int { return y*side + x }
	nearby := func(r int) int {
		x, y := r%side, r/side
		for {
			nx, ny := x+rng.IntN(5)-2, y+rng.IntN(5)-2
			if nx >= 0 && ny >= 0 && nx < side && ny < side && (nx != x || ny != y) {
				return region(nx, ny)
			}
		}
	}
	type chronic struct {
		edge Edge
		p    float64
	}
	var hot []chronic
	for range hotSpots {
		centre := region(rng.IntN(side), rng.IntN(side))
		p := pLow + (pHigh-pLow)*rng.Float64()
		for range 4 + rng.IntN(spread) {
			from := centre
			if rng.IntN(2) == 0 {
				from = nearby(centre)
			}
			hot = append(hot, chronic{Edge{from, nearby(from)}, min(0.9, p*(0.7+0.6*rng.Float64()))})
		}
	}
	days := make([][]Edge, 365)
	for d := range days {
		day := make([]Edge, 0, perDay)
		for _, c := range hot {
			if rng.Float64() < c.p {
				day = append(day, c.edge)
			}
		}
		for len(day) < perDay {
			from := rng.IntN(side * side)
			day = append(day, Edge{from, nearby(from)})
		}
		days[d] = day
	}
	return days
}

func BenchmarkMineYear(b *testing.B) {
	benchmarkMine(b, benchmarkDays(1, 40, 5, 0.1, 0.7))
}

// BenchmarkMineYearDense has larger, more persistent hot spots: 60 spots
// of 4 to 15 edges each, present on 30 % to 90 % of days.
func BenchmarkMineYearDense(b *testing.B) {
	benchmarkMine(b, benchmarkDays(2, 60, 12, 0.3, 0.9))
}

func benchmarkMine(b *testing.B, days [][]Edge) {
	opts := Options{MinSupport: 37, MaxEdges: 6} // support 0.1 of 365 days
	var groups []Group
	for b.Loop() {
		var err error
		if groups, err = Mine(context.Background(), days, opts); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(len(groups)), "groups")
}

func TestMaximalOnly(t *testing.T) {
	a, b, c := Edge{1, 2}, Edge{2, 3}, Edge{7, 8}
	days := [][]Edge{{a, b, c}, {a, b}, {a}, {c}}
	got, err := Mine(context.Background(), days, Options{MinSupport: 2, MaximalOnly: true})
	if err != nil {
		t.Fatal(err)
	}
	want := fmt.Sprint([]Group{{[]Edge{a, b}, []int{0, 1}}, {[]Edge{c}, []int{0, 3}}})
	if fmt.Sprint(got) != want {
		t.Errorf("Mine(MaximalOnly) = %v, want %v", got, want)
	}
}

// TestMaxVisitsBoundsWork: on one dense cluster that recurs every day, a
// few groups cost many closedness tests each; the bound counts those
// tests, so the search stops near the bound however large the cluster.
func TestMaxVisitsBoundsWork(t *testing.T) {
	var day []Edge
	for a := 1; a <= 20; a++ {
		day = append(day, Edge{From: 0, To: a}, Edge{From: a, To: 0})
	}
	days := [][]Edge{day, day, day, day}
	// Every edge touches region 0, so each of the 40 has 39 neighbours; one
	// step of the search tests at most MaxEdges x 39 of them for
	// closedness, and a closure at most 40 x 39.
	const bound, maxEdges = 5000, 4
	res, err := MineBounded(context.Background(), days, Options{MinSupport: 2, MaxEdges: maxEdges, MaxVisits: bound})
	if err != nil {
		t.Fatal(err)
	}
	if !res.Truncated {
		t.Fatalf("not truncated after %d units of work", res.Visited)
	}
	if step := maxEdges*39 + 40*39; res.Visited > bound+step {
		t.Errorf("visited %d, want at most the bound %d plus one step (%d)", res.Visited, bound, step)
	}
	full, err := MineBounded(context.Background(), days, Options{MinSupport: 2, MaxEdges: maxEdges})
	if err != nil {
		t.Fatal(err)
	}
	// All 40 edges are adjacent, so the connected groups of at most 4
	// edges are the C(40,1) + ... + C(40,4) = 102,090 subsets; each visit
	// tests at least 36 neighbours, and the work counts them.
	if full.Truncated || full.Visited < 102090*36 {
		t.Errorf("unbounded search: %d units, truncated %v; want the visits and the tests, at least %d", full.Visited, full.Truncated, 102090*36)
	}
}
