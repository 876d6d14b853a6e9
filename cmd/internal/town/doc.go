// Package town generates a fictional town with a known network weakness and
// simulates the vehicle trips made on it. It serves the narrows demo, the
// end-to-end tests and the benchmarks; it is not part of the method.
//
// In: Options (size, seed) for Generate; SimOptions (seed, days, fleet
// size, the day the link opens, time zone) for Town.Simulate. Out: the town
// as OSM XML 0.6 (Town.WriteOSM, before or after the link), trip rows in
// the ingest CSV format, optionally GPS traces (Trace, written with
// PointsWriter or WriteGPX), and the planted truth (Town.Housing, Town.Jobs,
// Town.LinkMidpoint, Scenario) that tests check findings against.
//
// # The town
//
// Generate builds, deterministically from the seed, a street network on a
// perturbed grid: arterials (highway=primary and secondary) every few
// blocks, local streets (tertiary and residential) between them, one-way
// streets in the old quarter, a ring road (trunk) around the built-up area,
// a wide river (waterway=river) crossing the town from west to east, and a
// railway (railway=rail) running north to south with level crossings on the
// arterials only. Inside the ring the river is bridged a few times (twice
// in the town), by old
// single-lane bridges that the two directions take in turns under signals.
// Town.WriteOSM writes OSM XML that any OSM reader accepts.
//
// The planted weakness: on the two river banks, facing each other half-way
// between the two old bridges, lie a housing district (north bank) and a
// jobs district (south bank), with a strong commuting flow between them
// that has to detour over the bottleneck bridges. The planned remedy,
// Town.Link, is a new bridge straight across (two lanes each way). It is
// tagged highway=tertiary, which is not a region border (the defaults are
// motorway, trunk, primary and secondary), so the after network partitions
// into the same regions as the before network: the two periods are compared
// on the same regions, as the comparison requires. The districts face each
// other across the river, not across a road, so the partition must take the
// river as a barrier (partition Options.Barriers, on by default). Each
// district carries its name as an OSM place node (place=neighbourhood, the
// planted ones place=quarter), and the regions take their names from them.
//
// Options.RailWeakness plants a second weakness that shares the jobs
// district's region but no region pair with the first: the railway runs
// just east of the jobs district as a busy main line (full barriers, long
// waits), the two arterials south of the river do not cross it, and a
// housing district across it (Town.RailHousing) commutes to the jobs; the
// river's second old bridge moves west of the railway. The method must
// report the two as two places.
//
// # The trips
//
// Zones: one per arterial cell, split where the river or the railway runs
// through it, with residents and jobs (the planted districts hold fixed
// shares). Two trip purposes, each from a singly (production) constrained
// gravity model F_ij = P_i A_j K_ij f(d_ij) / sum_k A_k K_ik f(d_ik) with
// f(d) = exp(-beta d) on the straight-line distance between zone centres:
// commuting tours (home to work in the morning, back in the evening) and
// other trips (spread over the day). Demand depends on land use and
// distance only, not on network cost, so both periods carry the same demand
// and any change between them is the network's doing (induced demand is out
// of scope). K_ij is 1 except for the planted pair's commuting (a K-factor,
// as used when calibrating gravity models).
//
// Routes: shortest travel time over the whole street network with gonum's
// Dijkstra (graph/path.DijkstraFrom), one shortest-path tree per trip-end
// node (the town's every street node; one node per zone in the city, whose
// 6,500-node network is routed by the same algorithm on slices, checked
// against gonum's, because gonum's map-based trees are too slow there). Congestion: the BPR volume-delay function t = t0 (1 + 0.15 (v/c)^4)
// (Bureau of Public Roads, 1964) and a few rounds of the method of
// successive averages (MSA) on the weekday morning peak hour, with
// capacities per lane by road class (common practice values). The volumes
// are all traffic (residents times trip rates); the trips written are a
// sample fleet of it. Routes are fixed per network state (before or after
// the link); a trip's delay scales with the traffic at its start time,
// because the BPR delay grows with the fourth power of volume: delay(t) =
// delay(peak) (traffic(t)/traffic(peak))^4. Evening commuters meet the
// mirror image of the morning peak. Day-to-day variation (a random demand
// factor), weekday and weekend demand and profiles, and random incidents (a
// capacity cut on one loaded arterial link for a day, without rerouting) are
// drawn from the seed. Trip points lie along the zone's inner streets; a
// trip leaves by whichever end of its street gives the quicker route.
// Distance is route plus access length; duration the route time with
// lognormal noise plus access and parking time.
//
// # Determinism
//
// The same Options and SimOptions give the same bytes: all randomness comes
// from seeded generators, all collections are slices in a fixed order, and
// the parallel tree computation works in fixed chunks whose results are
// combined in chunk order, whatever the number of cores.
package town
