// Package patterns mines the connected groups of skyline candidates that
// recur across days, turns them into ranked findings, and compares two
// periods.
//
// In: a regiongraph.Store and ScanOptions (period, window, day filter,
// skyline options, support).
// Out: a Scan, ranked Findings with their days and per-edge medians and
// costs; and, for two periods, a Comparison with one Verdict per finding
// and its evidence: the finding's daily measures (cost, travel time,
// trips, speed, detour, extra km) in both periods, its comparison group of
// like region pairs, the raw, group and adjusted changes with their tests,
// the fixed bar, the skyline recurrence as context, the basis of the
// verdict (Decide, a pure function), and the change of the whole network.
// Speeds are in m/s; wording and units for people are the report's.
//
// The groups are mined by narrows/patterns/groups; the tests come from
// narrows/patterns/stats.
package patterns
