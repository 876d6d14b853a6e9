// Package skyline finds each day's skyline candidates among the edges of a
// day graph.
//
// In: the edges of one day and time window (regiongraph.Edge) and Options
// (minimum trips, badness gates, skyband depth k).
// Out: a Result: the candidate edges (those dominated by fewer than k other
// edges on more trips, lower speed and longer detour, that pass the gates),
// each edge's dominator count and skyline layer, and the day's trip-weighted
// median speed. Select returns only the candidates and the median speed,
// the same as Candidates', at a third to a fifth of the cost. Skyband, Layers
// and Dominators apply the same dominance to plain Points.
//
// # Dominance
//
// Edge e dominates edge f when e has at least as many trips, a median speed
// no higher and a median detour ratio no lower than f, and is strictly
// better on at least one of the three. Edges with identical values do not
// dominate each other, so duplicates share their fate. Layer 1 is the
// skyline; layer L+1 is the skyline of what remains after removing layers
// 1..L (peeling), which equals the length of the longest chain of
// dominators ending at the edge.
//
// # Algorithm
//
// Points are ranked on each axis, identical points are merged (with their
// multiplicity) and sorted by trips descending, then speed ascending, then
// detour descending. In that order every dominator of a point comes before
// it, so the dominators of point i are exactly the earlier points j with
// speed(j) <= speed(i) and detour(j) >= detour(i). Both the dominator counts
// (a sum over those j) and the layers (one more than the maximum layer over
// those j) are then computed in a single in-order divide and conquer over the
// sorted sequence (often called CDQ divide and conquer): solve the left half,
// add the left half's contributions to the right half with a sweep over
// speed and a Fenwick tree over detour ranks, then solve the right half.
// Each level costs O(n log n), so the whole costs O(n log² n) time and O(n)
// memory, exact under any ties. The Fenwick tree of each step spans only
// the detour ranks of its block's left half, so it stays in cache; small
// blocks are finished by direct comparison; the sorts are radix sorts on
// order-preserving integer keys. A day of a million edges takes about half
// a second to a second on one core.
//
// # Select
//
// Select needs no counts or layers, only whether a gate-passing point has
// fewer than K dominators, and one sweep answers that in O(n log n). Points
// are ordered as above (trips by rank, speed by rank, detour by its float
// key within each run of equal trips and speed, saving the third full
// sort), so a point's dominators are the earlier points, other than its
// identical copies, no worse on speed and detour. The sweep keeps a Fenwick
// tree over speed ranks whose nodes hold the lowest detour key in their
// range (for K = 1: the staircase of the points seen so far), or the K
// lowest with multiplicity for K up to 16; each run of identical points is
// first tested, if it passes the gates, then inserted, gated out or not
// (it can still dominate). A node covers its child's range, so an insertion
// stops at the first node that already holds K keys no higher than its
// own. Deeper skybands (K > 16) go to the full analysis.
//
// # Gates
//
// Candidates must also look bad on their own: a detour ratio at least
// Options.DetourFloor and a speed strictly below the day's trip-weighted
// median speed over the eligible edges. Dominance is counted among all
// eligible edges, before the gates. This choice does not change which edges
// are candidates: an edge that dominates a gate-passing edge is at least as
// slow and as roundabout, so it passes the gates too. It only matters for the
// Dominators and Layer reported for edges that fail a gate, which then
// describe their position among all the day's busy edges.
package skyline
