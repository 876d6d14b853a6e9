package skyline

import (
	"math"
	"slices"
)

// radixMin is the length under which sortIndices uses a comparison sort:
// below it the radix sort's histograms cost more than they save.
const radixMin = 512

// keyed is one element being sorted.
type keyed struct {
	key uint64
	idx int32
}

// sorter holds the buffers of sortIndices for reuse.
type sorter struct {
	src, dst []keyed
}

// sortIndices sorts order stably by keys[order[i]] ascending, using a
// least-significant-digit radix sort on bytes that skips the bytes all
// keys share.
func (s *sorter) sortIndices(order []int32, keys []uint64) {
	n := len(order)
	if n < radixMin {
		slices.SortStableFunc(order, func(a, b int32) int {
			ka, kb := keys[a], keys[b]
			switch {
			case ka < kb:
				return -1
			case ka > kb:
				return 1
			}
			return 0
		})
		return
	}
	var counts [8][256]int
	if cap(s.src) < n {
		s.src, s.dst = make([]keyed, n), make([]keyed, n)
	}
	src, dst := s.src[:n], s.dst[:n]
	for i, idx := range order {
		k := keys[idx]
		src[i] = keyed{k, idx}
		for b := range 8 {
			counts[b][byte(k>>(8*b))]++
		}
	}
	for b := range 8 {
		c := &counts[b]
		if c[byte(src[0].key>>(8*b))] == n {
			continue // every key has this byte
		}
		sum := 0
		for d := range c {
			c[d], sum = sum, sum+c[d]
		}
		shift := uint(8 * b)
		for _, e := range src {
			d := byte(e.key >> shift)
			dst[c[d]] = e
			c[d]++
		}
		src, dst = dst, src
	}
	for i := range order {
		order[i] = src[i].idx
	}
}

// floatKey maps x to an unsigned key with the same order; -0 equals +0 and
// NaN sorts last, after +Inf.
func floatKey(x float64) uint64 {
	if math.IsNaN(x) {
		return math.MaxUint64
	}
	if x == 0 {
		x = 0 // fold -0 into +0
	}
	b := math.Float64bits(x)
	if b>>63 == 1 {
		return ^b
	}
	return b | 1<<63
}

// intKey maps x to an unsigned key with the same order.
func intKey(x int) uint64 { return uint64(int64(x)) ^ 1<<63 }
