package stats

import (
	"math"
	"sort"
)

// BenjaminiHochberg returns the Benjamini-Hochberg adjusted p-values of p, in
// the same order: with the m valid p-values sorted ascending as p(1) ≤ … ≤
// p(m), the adjusted value of p(i) is min over j ≥ i of m·p(j)/j, capped at
// 1. Rejecting every hypothesis whose adjusted p-value is below α controls
// the false discovery rate at α for independent (or positively dependent)
// tests.
//
// NaN entries (tests that could not be done) are left out of m and stay NaN
// in the result; values outside [0, 1] are clamped into it first. The input
// is not modified.
func BenjaminiHochberg(p []float64) []float64 {
	adjusted := make([]float64, len(p))
	order := make([]int, 0, len(p))
	for i, v := range p {
		if math.IsNaN(v) {
			adjusted[i] = math.NaN()
			continue
		}
		order = append(order, i)
	}
	clamp := func(v float64) float64 { return math.Min(1, math.Max(0, v)) }
	sort.SliceStable(order, func(a, b int) bool { return clamp(p[order[a]]) < clamp(p[order[b]]) })
	m := float64(len(order))
	running := 1.0
	for rank := len(order); rank >= 1; rank-- {
		i := order[rank-1]
		running = math.Min(running, clamp(p[i])*(m/float64(rank)))
		adjusted[i] = running
	}
	return adjusted
}
