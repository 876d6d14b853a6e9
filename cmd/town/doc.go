// Package town generates a fictional town with a known network weakness and
// simulates the vehicle trips made on it. It serves the narrows demo, the
// end-to-end tests and the benchmarks; it is not part of the method.
//
// # The town
//
// Generate builds, deterministically from Options (size and seed), a street
// network on a perturbed grid: arterials (highway=primary and secondary)
// every few blocks, local streets (tertiary and residential) between them, a
// ring road (trunk) around the built-up area, a river (waterway=river) that
// crosses the town from west to east and is bridged in only a few places, and
// a railway (railway=rail) running north to south with level crossings on the
// arterials only. Town.WriteOSM writes it as an OSM XML 0.6 file that any OSM
// reader accepts (bounds, nodes, ways with nd refs and tags).
//
// The planted weakness: on the two river banks, facing each other between two
// bridges that are far apart, lie a housing district (north bank) and a jobs
// district (south bank). Every trip between them detours to a bridge. The
// planned remedy, Town.Link, is a new local bridge straight across. It is
// tagged highway=tertiary, which is not a region border (only motorway,
// trunk, primary and secondary are), so the partition of the "after" network
// into regions equals the partition of the "before" network: the two periods
// are compared on the same regions, as the comparison requires.
//
// # The trips
//
// Town.Simulate writes trip rows (the ingest CSV format) for a run of days.
// Demand: one zone per arterial cell (cells cut by the river or the railway
// are split), population and jobs per zone, and a singly constrained gravity
// model T_ij = P_i A_j K_ij f(d_ij) / sum_k A_k K_ik f(d_ik) with f(d) =
// exp(-beta d) on the straight-line distance d between zone centres. Demand
// depends on land use and distance only, not on network cost, so the before
// and after periods carry the same demand and any change between them is the
// network's doing (induced demand is out of scope). K_ij is 1 except for the
// planted pair (a K-factor, as used when calibrating gravity models).
//
// Routes: shortest travel time over the whole street network (gonum graph
// paths, one shortest-path tree per trip-end node), with congestion from the
// BPR volume-delay function t = t0 (1 + 0.15 (v/c)^4) (Bureau of Public
// Roads, 1964) and a few rounds of the method of successive averages (MSA) on
// the weekday peak hour. The volumes are all traffic (the town's population
// times a trip rate); the trips written are a sample fleet of that traffic.
// Routes are fixed per network state (before or after the link opens); the
// delay of a trip scales with the traffic at its start time, because the BPR
// delay grows with the fourth power of volume: excess(h) = excess(peak) *
// (volume(h)/volume(peak))^4. Day-to-day variation (a random demand factor),
// weekday and weekend profiles and random incidents (a capacity cut on one
// arterial link for a day, without rerouting) are drawn from the seed.
//
// # Determinism
//
// The same Options and SimOptions give the same bytes: all randomness comes
// from seeded generators, all collections are slices in a fixed order, and
// the parallel tree computation sums its partial results in a fixed order.
package town
