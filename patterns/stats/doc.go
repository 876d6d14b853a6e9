// Package stats holds the few two-sample tests the before/after comparison
// needs, written out so that every number can be checked by hand.
//
// In: plain float64 samples (daily values of one finding in two periods) or a
// 2×2 table of counts (days on which a finding recurred or not, per period).
// Out: test statistics, two-sided p-values, a shift estimate with a
// distribution-free confidence interval, and p-values adjusted for testing
// many findings at once.
//
//   - MannWhitneyU: the two-sided Mann-Whitney U (Wilcoxon rank-sum) test,
//     exact (distribution of U by counting arrangements) or with the normal
//     approximation (tie and continuity corrections).
//   - HodgesLehmann and HodgesLehmannCI: the median of all pairwise
//     differences x_i − y_j and its confidence interval from order statistics
//     of those differences.
//   - FisherExact: the two-sided Fisher exact test of a 2×2 table.
//   - BenjaminiHochberg: step-up adjusted p-values controlling the false
//     discovery rate.
//   - Median: the median of a sample, NaN for an empty one.
//
// The p-values follow the conventions of SciPy 1.10 (scipy.stats.mannwhitneyu
// and scipy.stats.fisher_exact) so that results can be compared with that
// common tool; the tests check them against values SciPy computed.
//
// The functions are pure and safe for concurrent use; none panics on any
// input. Invalid input (empty samples, NaN values, negative counts) gives an
// error or a NaN result as each function documents.
package stats
