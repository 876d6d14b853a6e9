// Package skyline finds each day's skyline candidates among the edges of a
// day graph.
//
// In: the edges of one day and time window (regiongraph.Edge) and Options
// (minimum trips, badness gates, skyband depth k).
// Out: a Result: the candidate edges (those dominated by fewer than k other
// edges on more trips, lower speed and longer detour, that pass the gates)
// and each edge's skyline layer.
package skyline
