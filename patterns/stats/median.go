package stats

import (
	"math"
	"slices"
)

// Median returns the median of xs: the middle value of the sorted values
// for an odd count, the mean of the two middle values for an even count.
//
// An empty xs gives NaN: no value is the median of nothing, and a NaN
// shows up in a figure where a zero would pass for a measurement. NaN
// values in xs sort before every number (as slices.Sort orders them), so
// they count as the smallest values. xs is not modified.
func Median(xs []float64) float64 {
	n := len(xs)
	if n == 0 {
		return math.NaN()
	}
	s := slices.Clone(xs)
	slices.Sort(s)
	if n%2 == 1 {
		return s[n/2]
	}
	return (s[n/2-1] + s[n/2]) / 2
}
