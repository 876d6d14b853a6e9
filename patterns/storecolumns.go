package patterns

// StoreColumns are the measure columns of the day-graph store
// (regiongraph/SCHEMA.md) that a scan, a comparison and their reports
// use, besides the day, window, regions and trips; a reader may leave the
// others (the quartiles and the median distance) undecoded.
func StoreColumns() []string {
	return []string{"speed_median_mps", "detour_median", "duration_median_s", "distance_sum_m", "straight_sum_m", "duration_sum_s"}
}
