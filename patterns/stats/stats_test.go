package stats

import (
	"math"
	"math/big"
	"math/bits"
	"math/rand/v2"
	"sort"
	"testing"
)

// bruteU counts the pairs with x_i > y_j plus half the ties: the definition
// of U, independent of ranking.
func bruteU(x, y []float64) float64 {
	var u float64
	for _, a := range x {
		for _, b := range y {
			switch {
			case a > b:
				u++
			case a == b:
				u += 0.5
			}
		}
	}
	return u
}

// bruteExactP enumerates every way to split the pooled values into samples
// of the original sizes and returns the two-sided p-value
// min(1, 2·min(P(U ≤ u), P(U ≥ u))) of the observed U.
func bruteExactP(x, y []float64) float64 {
	pooled := append(append([]float64{}, x...), y...)
	m, total := len(x), len(x)+len(y)
	u := bruteU(x, y)
	var below, above, count float64
	xs := make([]float64, 0, m)
	ys := make([]float64, 0, total-m)
	for mask := uint32(0); mask < 1<<total; mask++ {
		if bits.OnesCount32(mask) != m {
			continue
		}
		xs, ys = xs[:0], ys[:0]
		for i, v := range pooled {
			if mask&(1<<i) != 0 {
				xs = append(xs, v)
			} else {
				ys = append(ys, v)
			}
		}
		v := bruteU(xs, ys)
		count++
		if v <= u {
			below++
		}
		if v >= u {
			above++
		}
	}
	return math.Min(1, 2*math.Min(below, above)/count)
}

func distinctSample(r *rand.Rand, n int, shift float64) []float64 {
	v := make([]float64, n)
	for i := range v {
		v[i] = shift + r.NormFloat64()
	}
	return v
}

func TestMannWhitneyUExactAgainstEnumeration(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	sizes := [][2]int{{1, 1}, {1, 5}, {2, 3}, {3, 3}, {4, 6}, {5, 5}, {7, 4}, {6, 8}, {8, 8}}
	for _, sz := range sizes {
		for trial := 0; trial < 4; trial++ {
			x := distinctSample(r, sz[0], float64(trial)*0.4)
			y := distinctSample(r, sz[1], 0)
			got, err := MannWhitneyU(x, y, Exact)
			if err != nil {
				t.Fatal(err)
			}
			if want := bruteU(x, y); got.U != want {
				t.Errorf("sizes %v: U = %v, pair count %v", sz, got.U, want)
			}
			if want := bruteExactP(x, y); relErr(got.P, want) > 1e-12 {
				t.Errorf("sizes %v trial %d: exact p = %.17g, enumeration %.17g", sz, trial, got.P, want)
			}
		}
	}
}

// bigUCounts returns the exact number of arrangements with U = u for
// u = 0..m·n by the recurrence f(i,j,u) = f(i−1,j,u−j) + f(i,j−1,u) (the last
// of the i+j values in order is an x, above all j y's, or a y).
func bigUCounts(m, n int) []*big.Int {
	// f[j] holds the counts for (i, j) while i advances.
	f := make([][]*big.Int, n+1)
	for j := range f {
		f[j] = []*big.Int{big.NewInt(1)} // i = 0: U is 0
	}
	for i := 1; i <= m; i++ {
		g := make([][]*big.Int, n+1)
		g[0] = []*big.Int{big.NewInt(1)}
		for j := 1; j <= n; j++ {
			c := make([]*big.Int, i*j+1)
			for u := range c {
				c[u] = new(big.Int)
				if u < len(g[j-1]) {
					c[u].Add(c[u], g[j-1][u])
				}
				if u-j >= 0 && u-j < len(f[j]) {
					c[u].Add(c[u], f[j][u-j])
				}
			}
			g[j] = c
		}
		f = g
	}
	return f[n]
}

func TestUDistributionAgainstExactCounts(t *testing.T) {
	for _, sz := range [][2]int{{1, 1}, {3, 9}, {9, 3}, {12, 12}, {20, 25}, {30, 18}} {
		m, n := sz[0], sz[1]
		counts := bigUCounts(m, n)
		total := new(big.Int).Binomial(int64(m+n), int64(m))
		got := uDistribution(m, n, m*n)
		if len(got) != len(counts) {
			t.Fatalf("sizes %v: %d probabilities, want %d", sz, len(got), len(counts))
		}
		var worst, sum float64
		worstU := 0
		for u, c := range counts {
			want, _ := new(big.Rat).SetFrac(c, total).Float64()
			// Only the lower half is used (the upper tail is read through
			// the symmetry P(U = u) = P(U = m·n − u)); there the lagged
			// differences do not cancel badly.
			if e := relErr(got[u], want); u <= m*n/2 && e > worst {
				worst, worstU = e, u
			}
			sum += got[u]
		}
		t.Logf("sizes %v: worst relative error %.2g at u = %d of %d", sz, worst, worstU, m*n)
		if worst > 1e-12 {
			t.Errorf("sizes %v: worst relative error of P(U = u) is %.3g", sz, worst)
		}
		if math.Abs(sum-1) > 1e-12 {
			t.Errorf("sizes %v: probabilities sum to %.17g", sz, sum)
		}
		// A truncated tail must equal the head of the full distribution.
		head := uDistribution(m, n, m*n/3)
		for u := range head {
			if head[u] != got[u] {
				t.Fatalf("sizes %v: truncated P(U = %d) = %v, full %v", sz, u, head[u], got[u])
			}
		}
	}
}

func TestMannWhitneyUAsymptotic(t *testing.T) {
	// With ties, U by ranks must equal the pair count, and the normal
	// approximation must be close to the exact tail for moderate sizes.
	r := rand.New(rand.NewPCG(3, 4))
	for trial := 0; trial < 20; trial++ {
		x := make([]float64, 15+trial)
		y := make([]float64, 20)
		for i := range x {
			x[i] = float64(r.IntN(6)) + 0.5*float64(trial%3)
		}
		for i := range y {
			y[i] = float64(r.IntN(6))
		}
		got, err := MannWhitneyU(x, y, Asymptotic)
		if err != nil {
			t.Fatal(err)
		}
		if want := bruteU(x, y); got.U != want {
			t.Errorf("trial %d: U = %v, pair count %v", trial, got.U, want)
		}
		if got.P <= 0 || got.P > 1 {
			t.Errorf("trial %d: p = %v outside (0, 1]", trial, got.P)
		}
	}
	for _, n := range []int{20, 40} {
		x := distinctSample(r, n, 0.5)
		y := distinctSample(r, n, 0)
		exact, _ := MannWhitneyU(x, y, Exact)
		approx, _ := MannWhitneyU(x, y, Asymptotic)
		if math.Abs(exact.P-approx.P) > 0.01 {
			t.Errorf("n = %d: exact p %v and normal approximation %v differ by more than 0.01", n, exact.P, approx.P)
		}
	}
	// All values equal: no evidence of a difference.
	got, err := MannWhitneyU([]float64{2, 2, 2}, []float64{2, 2}, Asymptotic)
	if err != nil || got.P != 1 || got.U != 3 {
		t.Errorf("all equal: got %+v, %v; want U 3, p 1", got, err)
	}
}

func TestMannWhitneyUAutoMethod(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 6))
	tied := []float64{1, 2, 2, 3}
	tests := []struct {
		name string
		x, y []float64
		want Method
	}{
		{"both small, no ties", distinctSample(r, 5, 0), distinctSample(r, 6, 0), Exact},
		{"one of 8, other large", distinctSample(r, 8, 0), distinctSample(r, 40, 0), Exact},
		{"both 9", distinctSample(r, 9, 0), distinctSample(r, 9, 0), Asymptotic},
		{"small with ties", tied, distinctSample(r, 5, 0), Asymptotic},
		{"tie across samples", []float64{1, 2}, []float64{2, 3}, Asymptotic},
	}
	for _, tc := range tests {
		got, err := MannWhitneyU(tc.x, tc.y, Auto)
		if err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		if got.Method != tc.want {
			t.Errorf("%s: method %v, want %v", tc.name, got.Method, tc.want)
		}
		explicit, _ := MannWhitneyU(tc.x, tc.y, tc.want)
		if explicit.P != got.P {
			t.Errorf("%s: auto p %v differs from %v p %v", tc.name, got.P, tc.want, explicit.P)
		}
	}
}

func TestMannWhitneyUErrors(t *testing.T) {
	big := make([]float64, 1100)
	for i := range big {
		big[i] = float64(i)
	}
	tests := []struct {
		name   string
		x, y   []float64
		method Method
	}{
		{"empty x", nil, []float64{1}, Auto},
		{"empty y", []float64{1}, []float64{}, Auto},
		{"NaN", []float64{1, math.NaN()}, []float64{1}, Auto},
		{"Inf", []float64{1}, []float64{math.Inf(-1)}, Asymptotic},
		{"exact too large", big, big, Exact},
		{"unknown method", []float64{1}, []float64{2}, Method(9)},
	}
	for _, tc := range tests {
		if _, err := MannWhitneyU(tc.x, tc.y, tc.method); err == nil {
			t.Errorf("%s: no error", tc.name)
		}
	}
	// Auto falls back to the normal approximation instead.
	small := []float64{-1, -2, -3}
	got, err := MannWhitneyU(small, append(big, big...), Auto)
	if err != nil || got.Method != Asymptotic {
		t.Errorf("auto beyond the exact limit: %+v, %v", got, err)
	}
}

func TestHodgesLehmannProperties(t *testing.T) {
	r := rand.New(rand.NewPCG(7, 8))
	for trial := 0; trial < 50; trial++ {
		x := distinctSample(r, 1+r.IntN(9), 0)
		y := distinctSample(r, 1+r.IntN(9), 0)
		hl := HodgesLehmann(x, y)
		// Half the pairwise differences lie on each side of the median.
		var below, above int
		for _, a := range x {
			for _, b := range y {
				if a-b < hl {
					below++
				} else if a-b > hl {
					above++
				}
			}
		}
		if below > len(x)*len(y)/2 || above > len(x)*len(y)/2 {
			t.Errorf("trial %d: %d differences below and %d above the estimate %v of %d", trial, below, above, hl, len(x)*len(y))
		}
		// Shifting x shifts the estimate; swapping negates it.
		const c = 3.25
		shifted := make([]float64, len(x))
		for i := range x {
			shifted[i] = x[i] + c
		}
		if d := HodgesLehmann(shifted, y) - hl - c; math.Abs(d) > 1e-12 {
			t.Errorf("trial %d: shift equivariance off by %v", trial, d)
		}
		if d := HodgesLehmann(y, x) + hl; math.Abs(d) > 1e-12 {
			t.Errorf("trial %d: antisymmetry off by %v", trial, d)
		}
		low, high := HodgesLehmannCI(x, y, 0.9)
		if !(low <= hl && hl <= high) && !math.IsInf(low, -1) {
			t.Errorf("trial %d: estimate %v outside its interval [%v, %v]", trial, hl, low, high)
		}
	}
	if !math.IsNaN(HodgesLehmann(nil, []float64{1})) || !math.IsNaN(HodgesLehmann([]float64{math.NaN()}, []float64{1})) {
		t.Error("empty or NaN sample: want NaN")
	}
}

// bruteTail enumerates the null distribution of U for sizes m, n and returns
// P(U ≤ u) for every u.
func bruteTail(m, n int) []float64 {
	counts := make([]float64, m*n+1)
	var total float64
	for mask := uint32(0); mask < 1<<(m+n); mask++ {
		if bits.OnesCount32(mask) != m {
			continue
		}
		// Bit i set: the i-th smallest value is an x. U counts the y's
		// below each x.
		u, ys := 0, 0
		for i := 0; i < m+n; i++ {
			if mask&(1<<i) != 0 {
				u += ys
			} else {
				ys++
			}
		}
		counts[u]++
		total++
	}
	cum := make([]float64, len(counts))
	var c float64
	for u, k := range counts {
		c += k
		cum[u] = c / total
	}
	return cum
}

func TestCIRankAgainstEnumeration(t *testing.T) {
	for _, sz := range [][2]int{{2, 2}, {3, 4}, {5, 5}, {6, 9}, {10, 10}} {
		cum := bruteTail(sz[0], sz[1])
		for _, level := range []float64{0.8, 0.9, 0.95, 0.99} {
			tail := (1 - level) / 2
			want := 0
			for k := 1; k <= len(cum); k++ {
				if cum[k-1] <= tail {
					want = k
				}
			}
			if got := ciRank(sz[0], sz[1], tail); got != want {
				t.Errorf("sizes %v level %v: k = %d, enumeration %d", sz, level, got, want)
			}
		}
	}
	// For two samples of two, no interval reaches 95 %.
	low, high := HodgesLehmannCI([]float64{1, 2}, []float64{0, 5}, 0.95)
	if !math.IsInf(low, -1) || !math.IsInf(high, 1) {
		t.Errorf("tiny samples: [%v, %v], want infinite bounds", low, high)
	}
	for _, level := range []float64{0, 1, -0.5, math.NaN()} {
		if low, _ := HodgesLehmannCI([]float64{1, 2, 3}, []float64{1, 2, 3}, level); !math.IsNaN(low) {
			t.Errorf("level %v: want NaN", level)
		}
	}
}

func TestCIRankNormalApproximation(t *testing.T) {
	// The normal approximation used for large samples must agree with the
	// exact critical rank to within one where both can be computed.
	for _, sz := range [][2]int{{20, 30}, {60, 60}, {100, 150}, {201, 200}, {300, 300}} {
		exact := ciRankExact(sz[0], sz[1], 0.025)
		approx := ciRankNormal(sz[0], sz[1], 0.025)
		if d := exact - approx; d < -1 || d > 1 {
			t.Errorf("sizes %v: exact rank %d, normal approximation %d", sz, exact, approx)
		}
	}
}

func TestHodgesLehmannCICoverage(t *testing.T) {
	if testing.Short() {
		t.Skip("simulation")
	}
	r := rand.New(rand.NewPCG(9, 10))
	const reps, shift = 2000, 1.7
	for _, sz := range [][2]int{{6, 7}, {12, 15}} {
		// Guaranteed coverage 1 − 2·P(U ≤ k−1) of the interval for this size.
		k := ciRank(sz[0], sz[1], 0.025)
		nominal := 1 - 2*uLowerTail(sz[0], sz[1], k-1)
		covered := 0
		for i := 0; i < reps; i++ {
			x := distinctSample(r, sz[0], shift)
			y := distinctSample(r, sz[1], 0)
			if low, high := HodgesLehmannCI(x, y, 0.95); low <= shift && shift <= high {
				covered++
			}
		}
		rate := float64(covered) / reps
		se := math.Sqrt(nominal * (1 - nominal) / reps)
		if nominal < 0.95 || math.Abs(rate-nominal) > 4*se {
			t.Errorf("sizes %v: coverage %.4f, guaranteed %.4f (±%.4f)", sz, rate, nominal, 4*se)
		}
		t.Logf("sizes %v: 95 %% interval covered the shift in %.1f %% of %d samples (exact coverage %.2f %%)", sz, 100*rate, reps, 100*nominal)
	}
}

// bigFisherP sums, in exact rational arithmetic, the hypergeometric
// probabilities of every table with the margins of t that is no more likely
// than t.
func bigFisherP(t [2][2]int) float64 {
	row0, row1, col0 := t[0][0]+t[0][1], t[1][0]+t[1][1], t[0][0]+t[1][0]
	prob := func(k int) *big.Rat {
		num := new(big.Int).Mul(new(big.Int).Binomial(int64(row0), int64(k)), new(big.Int).Binomial(int64(row1), int64(col0-k)))
		return new(big.Rat).SetFrac(num, new(big.Int).Binomial(int64(row0+row1), int64(col0)))
	}
	observed := prob(t[0][0])
	sum := new(big.Rat)
	for k := max(0, col0-row1); k <= min(row0, col0); k++ {
		if q := prob(k); q.Cmp(observed) <= 0 {
			sum.Add(sum, q)
		}
	}
	f, _ := sum.Float64()
	return f
}

func TestFisherExactAgainstExactArithmetic(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 12))
	tables := [][2][2]int{{{1, 1}, {1, 1}}, {{5, 0}, {0, 5}}, {{10, 10}, {10, 10}}, {{0, 7}, {3, 2}}, {{30, 0}, {0, 30}}, {{3, 1}, {1, 3}}}
	for i := 0; i < 200; i++ {
		tables = append(tables, [2][2]int{{r.IntN(25), r.IntN(25)}, {r.IntN(25), 1 + r.IntN(25)}})
	}
	var worst float64
	for _, tb := range tables {
		if tb[0][0]+tb[0][1] == 0 || tb[0][0]+tb[1][0] == 0 || tb[0][1]+tb[1][1] == 0 {
			continue
		}
		p, _ := FisherExact(tb)
		want := bigFisherP(tb)
		e := relErr(p, math.Min(1, want))
		worst = math.Max(worst, e)
		if e > 1e-9 {
			t.Errorf("%v: p = %.17g, exact arithmetic %.17g", tb, p, want)
		}
	}
	t.Logf("max relative error against exact rational arithmetic: %.2g", worst)
}

func TestFisherExactEdgeCases(t *testing.T) {
	tests := []struct {
		table     [2][2]int
		wantP     float64
		wantOdds  float64
		nanP      bool
		nanOdds   bool
		symmetric bool
	}{
		{table: [2][2]int{{0, 0}, {3, 4}}, wantP: 1, nanOdds: true},
		{table: [2][2]int{{0, 5}, {0, 3}}, wantP: 1, nanOdds: true},
		{table: [2][2]int{{5, 0}, {0, 3}}, wantP: 1.0 / 56, wantOdds: math.Inf(1)}, // k = 2..5 have weights 10, 30, 15, 1 of C(8,5) = 56; only k = 5 is as unlikely
		{table: [2][2]int{{0, 5}, {3, 0}}, wantP: 1.0 / 56, wantOdds: 0},
		{table: [2][2]int{{-1, 5}, {3, 0}}, nanP: true, nanOdds: true},
	}
	for _, tc := range tests {
		p, odds := FisherExact(tc.table)
		if tc.nanP != math.IsNaN(p) || (!tc.nanP && relErr(p, tc.wantP) > 1e-12) {
			t.Errorf("%v: p = %v, want %v", tc.table, p, tc.wantP)
		}
		if tc.nanOdds != math.IsNaN(odds) || (!tc.nanOdds && odds != tc.wantOdds) {
			t.Errorf("%v: odds ratio = %v, want %v", tc.table, odds, tc.wantOdds)
		}
	}
	// Swapping the rows or the columns does not change a two-sided p.
	a, _ := FisherExact([2][2]int{{9, 51}, {1, 59}})
	b, _ := FisherExact([2][2]int{{1, 59}, {9, 51}})
	c, _ := FisherExact([2][2]int{{51, 9}, {59, 1}})
	if relErr(a, b) > 1e-12 || relErr(a, c) > 1e-12 {
		t.Errorf("row/column swaps changed p: %v %v %v", a, b, c)
	}
}

// bhByDefinition computes the adjusted p-value of each p_i directly:
// min(1, min over p_j ≥ p_i of m·p_j / #{k: p_k ≤ p_j}).
func bhByDefinition(p []float64) []float64 {
	m := float64(len(p))
	out := make([]float64, len(p))
	for i := range p {
		best := 1.0
		for _, pj := range p {
			if pj < p[i] {
				continue
			}
			rank := 0
			for _, pk := range p {
				if pk <= pj {
					rank++
				}
			}
			best = math.Min(best, m*pj/float64(rank))
		}
		out[i] = best
	}
	return out
}

func TestBenjaminiHochberg(t *testing.T) {
	// Worked by hand: m = 4, sorted 0.005, 0.01, 0.03, 0.04 give
	// 0.02, 0.02, 0.04, 0.04 (4·0.01/2 = 0.02; 4·0.03/3 = 0.04 = 4·0.04/4).
	got := BenjaminiHochberg([]float64{0.01, 0.04, 0.03, 0.005})
	want := []float64{0.02, 0.04, 0.04, 0.02}
	for i := range want {
		if math.Abs(got[i]-want[i]) > 1e-15 {
			t.Errorf("hand example: adjusted %v, want %v", got, want)
			break
		}
	}
	r := rand.New(rand.NewPCG(13, 14))
	for trial := 0; trial < 200; trial++ {
		p := make([]float64, 1+r.IntN(12))
		for i := range p {
			p[i] = r.Float64()
			if r.IntN(4) == 0 {
				p[i] = math.Round(p[i]*10) / 10 // ties
			}
		}
		got := BenjaminiHochberg(p)
		want := bhByDefinition(p)
		for i := range p {
			if math.Abs(got[i]-want[i]) > 1e-12 {
				t.Fatalf("%v: adjusted %v, definition %v", p, got, want)
			}
			if got[i] < p[i] || got[i] > 1 {
				t.Fatalf("%v: adjusted %v below the raw value or above 1", p, got)
			}
		}
		// Order preserved: a smaller p never gets a larger adjusted p.
		idx := make([]int, len(p))
		for i := range idx {
			idx[i] = i
		}
		sort.Slice(idx, func(a, b int) bool { return p[idx[a]] < p[idx[b]] })
		for k := 1; k < len(idx); k++ {
			if got[idx[k]] < got[idx[k-1]] {
				t.Fatalf("%v: adjusted values not monotone: %v", p, got)
			}
		}
	}
	// NaN stays NaN and does not count towards m.
	got = BenjaminiHochberg([]float64{0.02, math.NaN(), 0.04})
	if got[0] != 0.04 || !math.IsNaN(got[1]) || got[2] != 0.04 {
		t.Errorf("with NaN: %v, want [0.04 NaN 0.04]", got)
	}
	if len(BenjaminiHochberg(nil)) != 0 {
		t.Error("nil input: want empty result")
	}
}
