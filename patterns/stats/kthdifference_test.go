package stats

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestKthDifferenceAgainstSorting checks the selection against the sorted
// list of all pairwise differences (the definition), with ties, negative
// zeros and mixed signs.
func TestKthDifferenceAgainstSorting(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 12))
	for trial := range 200 {
		m, n := 1+r.IntN(30), 1+r.IntN(30)
		gen := func(k int) []float64 {
			v := make([]float64, k)
			for i := range v {
				switch r.IntN(4) {
				case 0:
					v[i] = float64(r.IntN(5) - 2) // ties
				case 1:
					v[i] = math.Copysign(0, -1)
				default:
					v[i] = 100 * r.NormFloat64()
				}
			}
			return v
		}
		x, y := gen(m), gen(n)
		sorted := pairwiseDifferences(x, y)
		d, ok := newDifferences(x, y)
		if !ok {
			t.Fatalf("trial %d: finite samples refused", trial)
		}
		for k := 1; k <= m*n; k++ {
			if got, want := d.kth(k), sorted[k-1]; got != want && !(got == 0 && want == 0) {
				t.Fatalf("trial %d: k=%d of %d: %v, want %v", trial, k, m*n, got, want)
			}
		}
	}
	if _, ok := newDifferences([]float64{math.Inf(1)}, []float64{1}); ok {
		t.Error("an infinite difference was accepted")
	}
	if _, ok := newDifferences([]float64{math.NaN(), 1}, []float64{1}); ok {
		t.Error("a NaN was accepted")
	}
}
