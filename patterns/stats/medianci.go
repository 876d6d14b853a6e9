package stats

import (
	"math"
	"slices"
)

// MedianCI returns a distribution-free confidence interval for the median
// of the population x was drawn from, at the given level (for example
// 0.95): the order statistics [x(k), x(n+1−k)] with k the largest integer
// such that P(B ≤ k−1) ≤ (1−level)/2 for B binomial(n, 1/2), the number of
// sample values below the median. The interval then covers the median with
// probability at least level for continuous data (the sign-test interval).
// Too small a sample gives −Inf, +Inf; an empty sample, one holding a NaN
// or a level outside (0, 1) gives NaN, NaN.
func MedianCI(x []float64, level float64) (low, high float64) {
	n := len(x)
	if n == 0 || !(level > 0 && level < 1) || slices.ContainsFunc(x, math.IsNaN) {
		return math.NaN(), math.NaN()
	}
	tail := (1 - level) / 2
	// cum = P(B ≤ k−1), summed term by term in logs.
	k, cum := 0, 0.0
	for j := 0; j <= n/2; j++ {
		p := math.Exp(logChoose(n, j) - float64(n)*math.Ln2)
		if cum+p > tail*(1+1e-12) {
			break
		}
		cum += p
		k = j + 1
	}
	if k < 1 {
		return math.Inf(-1), math.Inf(1)
	}
	s := slices.Clone(x)
	slices.Sort(s)
	return s[k-1], s[n-k]
}
