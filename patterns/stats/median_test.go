package stats

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

func TestMedianSmall(t *testing.T) {
	for _, tc := range []struct {
		in   []float64
		want float64
	}{
		{[]float64{3}, 3},
		{[]float64{5, 1, 3}, 3},
		{[]float64{4, 1, 3, 2}, 2.5},
		{[]float64{2, 2}, 2},
		{[]float64{-1, 1}, 0},
		{[]float64{math.Inf(1), 1, 2}, 2},
	} {
		if got := Median(tc.in); got != tc.want {
			t.Errorf("Median(%v) = %v, want %v", tc.in, got, tc.want)
		}
	}
	for _, in := range [][]float64{nil, {}} {
		if got := Median(in); !math.IsNaN(got) {
			t.Errorf("Median(%v) = %v, want NaN", in, got)
		}
	}
}

// TestMedianAgainstSorting checks Median against its definition on the
// sorted values, for even and odd lengths, and that the input is left as it
// was.
func TestMedianAgainstSorting(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	for n := 1; n <= 40; n++ {
		for trial := 0; trial < 20; trial++ {
			xs := make([]float64, n)
			for i := range xs {
				if trial%2 == 0 {
					xs[i] = float64(rng.IntN(5)) // many ties
				} else {
					xs[i] = rng.NormFloat64() * 100
				}
			}
			orig := slices.Clone(xs)
			sorted := slices.Clone(xs)
			slices.Sort(sorted)
			var want float64
			if n%2 == 1 {
				want = sorted[(n-1)/2]
			} else {
				want = (sorted[n/2-1] + sorted[n/2]) / 2
			}
			if got := Median(xs); got != want {
				t.Fatalf("n %d: Median(%v) = %v, want %v", n, orig, got, want)
			}
			if !slices.Equal(xs, orig) {
				t.Fatalf("n %d: Median modified its input: %v, was %v", n, xs, orig)
			}
			// As many values lie strictly below the median as strictly
			// above it, or the ties at the median make up the difference.
			below, above := 0, 0
			for _, x := range xs {
				if x < want {
					below++
				} else if x > want {
					above++
				}
			}
			if below > n/2 || above > n/2 {
				t.Fatalf("n %d: %d values below and %d above the median %v of %v", n, below, above, want, xs)
			}
		}
	}
}

func TestMedianNaNSortsFirst(t *testing.T) {
	nan := math.NaN()
	if got := Median([]float64{3, nan, 1}); got != 1 {
		t.Errorf("Median(3, NaN, 1) = %v, want 1 (NaN counts as the smallest)", got)
	}
	if got := Median([]float64{nan, 2, 4, 6}); got != 3 {
		t.Errorf("Median(NaN, 2, 4, 6) = %v, want 3", got)
	}
}
