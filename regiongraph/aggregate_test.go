package regiongraph

import (
	"cmp"
	"math/rand/v2"
	"slices"
	"testing"
)

func TestSortByPairMatchesComparisonSort(t *testing.T) {
	rng := rand.New(rand.NewPCG(71, 72))
	for _, n := range []int{0, 1, 100, 4095, 4096, 30000} {
		const regions = 300
		recs := make([]record, n)
		for i := range recs {
			recs[i] = record{pair: uint32(1+rng.IntN(regions))<<16 | uint32(1+rng.IntN(regions)), distance: float32(i)}
		}
		want := slices.Clone(recs)
		slices.SortStableFunc(want, func(a, b record) int { return cmp.Compare(a.pair, b.pair) })
		sortByPair(recs, nil, regions)
		for i := range recs {
			if recs[i].pair != want[i].pair {
				t.Fatalf("n=%d: record %d has pair %x, want %x", n, i, recs[i].pair, want[i].pair)
			}
			if n >= 4096 && recs[i] != want[i] {
				t.Fatalf("n=%d: radix sort not stable at %d", n, i)
			}
		}
	}
}

func TestMedianDecimal(t *testing.T) {
	tests := []struct {
		in   []float32
		want float64
	}{
		{[]float32{6550.4}, 6550.4},
		{[]float32{1.1, 2.2}, func() float64 { a, b := 1.1, 2.2; return a + 0.5*(b-a) }()},
		{[]float32{0.1, 0.2, 123456.7}, 0.2},
		{[]float32{1, 2, 3, 4}, 2.5},
	}
	for _, tc := range tests {
		if got := medianDecimal(tc.in); got != tc.want {
			t.Errorf("medianDecimal(%v) = %v, want %v", tc.in, got, tc.want)
		}
		if got := quantile(tc.in, 0.5); !near(got, tc.want, 1e-6) {
			t.Errorf("quantile and medianDecimal disagree on %v: %v", tc.in, got)
		}
	}
}
