// Package patterns mines the connected groups of skyline candidates that
// recur across days, turns them into ranked findings, and compares two
// periods.
//
// In: a regiongraph.Store and ScanOptions (period, window, day filter,
// skyline options, support).
// Out: a Scan, ranked Findings with their days and per-edge medians and
// costs; and, for two periods, a Comparison with one Verdict per finding
// and its evidence: recurrence, the shifts of daily speed and detour with
// their tests, and the direction of each change the decision rule counted.
// Speeds are in m/s; wording and units for people are the report's.
//
// The groups are mined by narrows/patterns/groups; the tests come from
// narrows/patterns/stats.
package patterns
