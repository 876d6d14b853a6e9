// Package groups finds the connected sets of edges that occur together on
// many days: the recurring groups behind a scan's findings.
//
// In: one set of directed region-pair edges per day (the day's skyline
// candidates, say) and Options: the least number of days a group must
// recur on, a bound on its size, and whether to keep every frequent group,
// the closed ones or only the maximal ones.
// Out: the Groups, each a connected edge set sorted by From, To with the
// indices of the days on which all its edges occur, sorted by edge list.
//
// The search grows connected edge sets one adjacent edge at a time over
// bitset day sets, so the days of a set are one AND away from those of its
// parent, and a closure test (no adjacent edge occurs on all the set's
// days) keeps only the closed groups. Nothing in it knows about trips,
// speeds or regions beyond their numbers.
package groups
