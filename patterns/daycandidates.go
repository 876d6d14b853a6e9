package patterns

import (
	"context"
	"runtime"
	"sync"

	"narrows/regiongraph"
	"narrows/skyline"
)

// dayCandidates computes each day's skyline candidates (indices into that
// day's graph). The days are independent, so they are shared among up to
// GOMAXPROCS workers; each result goes to its own day's slot, so the output
// does not depend on the order the workers finish in. Progress is reported
// from the calling goroutine, in day order, as the days are done.
func dayCandidates(ctx context.Context, graphs [][]regiongraph.Edge, opts skyline.Options, progress func(stage string, done, total int)) ([][]int, error) {
	n := len(graphs)
	indices := make([][]int, n)
	done := make([]chan struct{}, n)
	for d := range done {
		done[d] = make(chan struct{})
	}
	next := make(chan int)
	stop := make(chan struct{})
	var wg sync.WaitGroup
	for range min(runtime.GOMAXPROCS(0), max(n, 1)) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for d := range next {
				indices[d] = skyline.Select(graphs[d], opts).Indices
				close(done[d])
			}
		}()
	}
	go func() {
		defer close(next)
		for d := range n {
			select {
			case next <- d:
			case <-stop:
				return
			}
		}
	}()
	var err error
	for d := range n {
		select {
		case <-done[d]:
		case <-ctx.Done():
			err = ctx.Err()
		}
		if err != nil {
			break
		}
		if progress != nil {
			progress("candidates", d+1, n)
		}
	}
	close(stop)
	wg.Wait()
	if err != nil {
		return nil, err
	}
	return indices, nil
}
