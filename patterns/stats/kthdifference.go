package stats

import (
	"math"
	"slices"
)

// differences gives order statistics of the pairwise differences x_i − y_j
// without forming them: kth selects the k-th smallest (1-based) by
// bisection over the ordered bit patterns of float64, counting with two
// pointers over the sorted samples, O((m+n)·64) time instead of the
// O(m·n·log(m·n)) of sorting all m·n differences. Since float subtraction
// is monotone, the count of x_i − y_j ≤ t is exact for the computed
// differences, so kth returns exactly the value that sorting them would.
type differences struct {
	x, y []float64 // ascending
}

// newDifferences sorts copies of x and y; ok is false if a sample is empty
// or a difference is NaN or infinite (then use pairwiseDifferences).
func newDifferences(x, y []float64) (differences, bool) {
	if len(x) == 0 || len(y) == 0 {
		return differences{}, false
	}
	d := differences{slices.Clone(x), slices.Clone(y)}
	slices.Sort(d.x)
	slices.Sort(d.y)
	for _, v := range []float64{d.x[0] - d.y[len(d.y)-1], d.x[len(d.x)-1] - d.y[0]} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return differences{}, false
		}
	}
	if math.IsNaN(d.x[0]) || math.IsNaN(d.y[0]) {
		return differences{}, false
	}
	return d, true
}

// countAtMost counts the pairs with x_i − y_j ≤ t.
func (d differences) countAtMost(t float64) int {
	n, count, j := len(d.y), 0, 0
	// For each x_i, ascending, the pairs with y_j large enough; the first
	// such j only moves up as x_i grows.
	for _, a := range d.x {
		for j < n && a-d.y[j] > t {
			j++
		}
		count += n - j
	}
	return count
}

// kth returns the k-th smallest difference, 1 ≤ k ≤ m·n.
func (d differences) kth(k int) float64 {
	lo, hi := orderedBits(d.x[0]-d.y[len(d.y)-1]), orderedBits(d.x[len(d.x)-1]-d.y[0])
	// Invariant: count(hi) ≥ k; find the smallest such value.
	for lo < hi {
		mid := lo + (hi-lo)/2
		if d.countAtMost(fromOrderedBits(mid)) >= k {
			hi = mid
		} else {
			lo = mid + 1
		}
	}
	return fromOrderedBits(hi)
}

// orderedBits maps a float64 to a uint64 in the same order (−0 and +0
// together as +0).
func orderedBits(f float64) uint64 {
	if f == 0 {
		f = 0
	}
	b := math.Float64bits(f)
	if b>>63 == 1 {
		return ^b
	}
	return b | 1<<63
}

func fromOrderedBits(u uint64) float64 {
	if u>>63 == 1 {
		return math.Float64frombits(u &^ (1 << 63))
	}
	return math.Float64frombits(^u)
}
