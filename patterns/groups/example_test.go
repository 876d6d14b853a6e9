package groups_test

import (
	"context"
	"fmt"

	"narrows/patterns/groups"
)

func ExampleMine() {
	// Three days of candidate edges between regions 1..4.
	days := [][]groups.Edge{
		{{1, 2}, {2, 3}, {4, 1}},
		{{1, 2}, {2, 3}},
		{{1, 2}, {3, 4}},
	}
	found, err := groups.Mine(context.Background(), days, groups.Options{MinSupport: 2})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, g := range found {
		fmt.Println(g.Edges, g.Days)
	}
	// Output:
	// [{1 2}] [0 1 2]
	// [{1 2} {2 3}] [0 1]
}
