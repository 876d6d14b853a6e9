package patterns

import (
	"context"
	"errors"
	"fmt"
	"runtime"
	"slices"
	"testing"

	"narrows/regiongraph"
	"narrows/skyline"
)

// TestDayCandidatesMatchesOneByOne checks the shared-out per-day skyline
// against skyline.Candidates called day by day (the oracle), and that the
// progress reaches each day once, in order.
func TestDayCandidatesMatchesOneByOne(t *testing.T) {
	store := scanTestStore(9, 12, 40, 200, []scanPlant{scanPlantA})
	var graphs [][]regiongraph.Edge
	for i := 0; i < len(store.Edges); {
		j := i
		for j < len(store.Edges) && store.Edges[j].Day == store.Edges[i].Day {
			j++
		}
		graphs = append(graphs, store.Edges[i:j])
		i = j
	}
	opts := DefaultScanOptions().Skyline
	for _, procs := range []int{1, 2, 7} {
		t.Run(fmt.Sprintf("procs-%d", procs), func(t *testing.T) {
			defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(procs))
			var seen []int
			got, err := dayCandidates(context.Background(), graphs, opts, func(_ string, done, total int) {
				if total != len(graphs) {
					t.Errorf("total %d, want %d", total, len(graphs))
				}
				seen = append(seen, done)
			})
			if err != nil {
				t.Fatal(err)
			}
			nonEmpty := 0
			for d, g := range graphs {
				want := skyline.Candidates(g, opts).Indices
				if !slices.Equal(got[d], want) {
					t.Errorf("day %d: %v, want %v", d, got[d], want)
				}
				if len(want) > 0 {
					nonEmpty++
				}
			}
			if nonEmpty == 0 {
				t.Error("no day has candidates: the check compares nothing")
			}
			for i, d := range seen {
				if d != i+1 {
					t.Fatalf("progress %v, want 1..%d in order", seen, len(graphs))
				}
			}
			if len(seen) != len(graphs) {
				t.Errorf("progress reported %d days, want %d", len(seen), len(graphs))
			}
		})
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := dayCandidates(ctx, graphs, opts, nil); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled: error %v, want context.Canceled", err)
	}
}
