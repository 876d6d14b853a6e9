package stats

import "math"

// fisherRelativeTolerance decides which tables count as "at most as likely as
// the observed one": SciPy 1.10 compares probabilities with a relative
// tolerance of 1e-7, so that tables equally likely in exact arithmetic are not
// split by rounding.
const fisherRelativeTolerance = 1e-7

// FisherExact performs the two-sided Fisher exact test of independence of
// rows and columns of a 2×2 table of counts
//
//	table[0][0] table[0][1]
//	table[1][0] table[1][1]
//
// With the margins fixed, table[0][0] has a hypergeometric distribution; the
// p-value is the summed probability of every table no more likely than the
// observed one (within a relative tolerance of 1e-7), as in SciPy 1.10's
// scipy.stats.fisher_exact. Probabilities are computed from log-gamma values
// so that large counts neither overflow nor lose precision.
//
// oddsRatio is the sample odds ratio table[0][0]·table[1][1] /
// (table[0][1]·table[1][0]) (+Inf when the denominator is zero), again as in
// SciPy. When a row or column sums to zero the test is uninformative: p is 1
// and oddsRatio is NaN. Negative counts give NaN, NaN.
func FisherExact(table [2][2]int) (p float64, oddsRatio float64) {
	a, b, c, d := table[0][0], table[0][1], table[1][0], table[1][1]
	if a < 0 || b < 0 || c < 0 || d < 0 {
		return math.NaN(), math.NaN()
	}
	row0, row1 := a+b, c+d
	col0, col1 := a+c, b+d
	if row0 == 0 || row1 == 0 || col0 == 0 || col1 == 0 {
		return 1, math.NaN()
	}
	if b > 0 && c > 0 {
		oddsRatio = float64(a) * float64(d) / (float64(b) * float64(c))
	} else {
		oddsRatio = math.Inf(1)
	}

	// table[0][0] ~ Hypergeometric: draws row0 from row0+row1 items of
	// which col0 are "successes".
	total := row0 + row1
	logDenominator := logChoose(total, col0)
	logPMF := func(k int) float64 {
		return logChoose(row0, k) + logChoose(row1, col0-k) - logDenominator
	}
	lo := max(0, col0-row1)
	hi := min(row0, col0)
	observed := math.Exp(logPMF(a))
	threshold := observed * (1 + fisherRelativeTolerance)
	for k := lo; k <= hi; k++ {
		if q := math.Exp(logPMF(k)); q <= threshold {
			p += q
		}
	}
	return math.Min(1, p), oddsRatio
}

// logChoose returns log C(n, k) for 0 ≤ k ≤ n.
func logChoose(n, k int) float64 {
	return lgamma(n+1) - lgamma(k+1) - lgamma(n-k+1)
}

func lgamma(n int) float64 {
	v, _ := math.Lgamma(float64(n))
	return v
}
