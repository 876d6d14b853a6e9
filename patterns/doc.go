// Package patterns mines the connected groups of skyline candidates that
// recur across days, turns them into ranked findings, and compares two
// periods.
//
// In: a regiongraph.Store and ScanOptions (period, window, day filter,
// skyline options, support).
// Out: a Scan, ranked Findings with their days and per-edge medians and
// costs; and, for two periods, a Comparison with one Verdict per finding.
package patterns
