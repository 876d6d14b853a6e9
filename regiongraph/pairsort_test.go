package regiongraph

import (
	"cmp"
	"math/rand/v2"
	"slices"
	"testing"
)

// TestPairSorterMatchesStableSort checks the counting sort of region pairs
// against the standard library's stable sort by (from, to), the oracle,
// for small ids (counting passes) and large ones (comparison sort), with
// repeated pairs, whose order must stay that of their indexes.
func TestPairSorterMatchesStableSort(t *testing.T) {
	rng := rand.New(rand.NewPCG(16, 2))
	var p pairSorter // reused across cases, as a reader does
	for _, tc := range []struct {
		name string
		n    int
		ids  int32
	}{
		{"empty", 0, 10},
		{"one", 1, 10},
		{"few ids, many repeats", 500, 3},
		{"a city", 20000, 1625},
		{"largest counted id", 3000, 1<<14 - 1},
		{"ids beyond counting", 3000, 1 << 20},
	} {
		t.Run(tc.name, func(t *testing.T) {
			from, to := make([]int32, tc.n), make([]int32, tc.n)
			for i := range from {
				from[i], to[i] = 1+rng.Int32N(tc.ids), 1+rng.Int32N(tc.ids)
			}
			want := make([]int32, tc.n)
			for i := range want {
				want[i] = int32(i)
			}
			slices.SortStableFunc(want, func(x, y int32) int {
				return cmp.Or(cmp.Compare(from[x], from[y]), cmp.Compare(to[x], to[y]))
			})
			got := make([]int32, tc.n)
			p.sort(from, to, got)
			if !slices.Equal(got, want) {
				t.Fatalf("order differs from the stable sort's at %d", firstDiff(got, want))
			}
		})
	}
}

func firstDiff(a, b []int32) int {
	for i := range a {
		if a[i] != b[i] {
			return i
		}
	}
	return -1
}
