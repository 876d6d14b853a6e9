package stats

import (
	"math"
	"sort"

	"gonum.org/v1/gonum/stat/distuv"
)

// maxExactCIPairs bounds len(x)·len(y) for which HodgesLehmannCI reads its
// critical value from the exact distribution of U; larger samples use the
// normal approximation, which is then within one rank of the exact value
// (checked in the tests) and much cheaper.
const maxExactCIPairs = 40000

// HodgesLehmann returns the Hodges-Lehmann estimate of the shift between x
// and y: the median of all len(x)·len(y) pairwise differences x_i − y_j (the
// mean of the two middle ones when their number is even). It returns NaN if
// either sample is empty or holds a NaN.
func HodgesLehmann(x, y []float64) float64 {
	if dd, ok := newDifferences(x, y); ok {
		n := len(x) * len(y)
		if n%2 == 1 {
			return dd.kth(n/2 + 1)
		}
		return (dd.kth(n/2) + dd.kth(n/2+1)) / 2
	}
	d := pairwiseDifferences(x, y)
	if d == nil {
		return math.NaN()
	}
	n := len(d)
	if n%2 == 1 {
		return d[n/2]
	}
	return (d[n/2-1] + d[n/2]) / 2
}

// HodgesLehmannCI returns a distribution-free confidence interval, at the
// given level (for example 0.95), for the shift Δ in the model "x − Δ has the
// distribution of y".
//
// With D(1) ≤ … ≤ D(N) the sorted pairwise differences x_i − y_j (N = m·n),
// the interval is [D(k), D(N+1−k)] where k is the largest integer with
// P(U ≤ k−1) ≤ (1−level)/2 under the null distribution of the Mann-Whitney U:
// the number of differences below the true shift has exactly that
// distribution, so the interval covers Δ with probability at least level for
// continuous data. The tail is exact for N up to 40 000; beyond, k =
// ⌊N/2 + 1/2 − z·√(N(m+n+1)/12)⌋ with z the normal quantile of
// (1+level)/2. Ties make the coverage approximate.
//
// When the samples are too small for any interval to reach the level (for
// example two values each at 95 %: P(U = 0) = 1/6), the bounds are −Inf and
// +Inf. It returns NaN, NaN if either sample is empty or holds a NaN, or if
// level is not strictly between 0 and 1.
func HodgesLehmannCI(x, y []float64, level float64) (low, high float64) {
	if !(level > 0 && level < 1) {
		return math.NaN(), math.NaN()
	}
	k := ciRank(len(x), len(y), (1-level)/2)
	if dd, ok := newDifferences(x, y); ok {
		if k < 1 {
			return math.Inf(-1), math.Inf(1)
		}
		return dd.kth(k), dd.kth(len(x)*len(y) + 1 - k)
	}
	d := pairwiseDifferences(x, y)
	if d == nil {
		return math.NaN(), math.NaN()
	}
	if k < 1 {
		return math.Inf(-1), math.Inf(1)
	}
	return d[k-1], d[len(d)-k]
}

// ciRank returns the largest k with P(U ≤ k−1) ≤ tail, or 0 if there is none.
func ciRank(m, n int, tail float64) int {
	if m*n <= maxExactCIPairs {
		return ciRankExact(m, n, tail)
	}
	return ciRankNormal(m, n, tail)
}

// ciRankExact reads ciRank from the exact null distribution of U.
func ciRankExact(m, n int, tail float64) int {
	var cum float64
	k := 0
	for _, p := range uDistribution(m, n, m*n/2) {
		cum += p
		// The relative slack keeps a tail that equals the bound in exact
		// arithmetic from being lost to rounding.
		if cum > tail*(1+1e-12) {
			break
		}
		k++
	}
	return k
}

// ciRankNormal approximates ciRank with the normal distribution of U and a
// continuity correction.
func ciRankNormal(m, n int, tail float64) int {
	fm, fn := float64(m), float64(n)
	fp := fm * fn
	z := distuv.UnitNormal.Quantile(1 - tail)
	k := math.Floor(fp/2 + 0.5 - z*math.Sqrt(fp*(fm+fn+1)/12))
	if k < 1 {
		return 0
	}
	return int(k)
}

// pairwiseDifferences returns the sorted differences x_i − y_j, or nil if a
// sample is empty or holds a NaN.
func pairwiseDifferences(x, y []float64) []float64 {
	if len(x) == 0 || len(y) == 0 {
		return nil
	}
	d := make([]float64, 0, len(x)*len(y))
	for _, a := range x {
		for _, b := range y {
			v := a - b
			if math.IsNaN(v) {
				return nil
			}
			d = append(d, v)
		}
	}
	sort.Float64s(d)
	return d
}
