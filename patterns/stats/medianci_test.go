package stats

import (
	"math"
	"math/big"
	"testing"
)

// TestMedianCIRankAgainstExactBinomial checks the interval's rank against
// exact rational binomial tails (big.Rat: C(n, j) / 2^n), and the interval
// itself on 1..n.
func TestMedianCIRankAgainstExactBinomial(t *testing.T) {
	for n := 1; n <= 80; n++ {
		x := make([]float64, n)
		for i := range x {
			x[i] = float64(n - i) // unsorted on purpose
		}
		tail := big.NewRat(25, 1000)
		cum := new(big.Rat)
		want := 0
		for j := 0; j <= n/2; j++ {
			term := new(big.Rat).SetFrac(new(big.Int).Binomial(int64(n), int64(j)), new(big.Int).Lsh(big.NewInt(1), uint(n)))
			next := new(big.Rat).Add(cum, term)
			if next.Cmp(tail) > 0 {
				break
			}
			cum, want = next, j+1
		}
		low, high := MedianCI(x, 0.95)
		if want == 0 {
			if !math.IsInf(low, -1) || !math.IsInf(high, 1) {
				t.Errorf("n=%d: [%v, %v], want infinite bounds", n, low, high)
			}
			continue
		}
		if low != float64(want) || high != float64(n+1-want) {
			t.Errorf("n=%d: [%v, %v], want [%d, %d]", n, low, high, want, n+1-want)
		}
	}
	// A textbook value, from memory: for n = 20 the 95 % interval is the
	// 6th to the 15th order statistic.
	x := make([]float64, 20)
	for i := range x {
		x[i] = float64(i + 1)
	}
	if low, high := MedianCI(x, 0.95); low != 6 || high != 15 {
		t.Errorf("n=20: [%v, %v], want [6, 15]", low, high)
	}
	if low, _ := MedianCI([]float64{1, math.NaN()}, 0.95); !math.IsNaN(low) {
		t.Error("a NaN sample gave an interval")
	}
}
