package patterns

// ScanColumns are the measure columns of the day-graph store
// (regiongraph/SCHEMA.md) that a scan and its findings use, besides the
// day, window, regions and trips: the values of a DailyValue.
func ScanColumns() []string {
	return []string{"speed_median_mps", "detour_median", "distance_sum_m", "straight_sum_m", "duration_sum_s"}
}

// StoreColumns are the measure columns that a scan, a comparison and
// their reports use: ScanColumns and the median duration the comparison's
// travel times come from. A reader may leave the others (the quartiles
// and the median distance) undecoded.
func StoreColumns() []string {
	return append(ScanColumns(), "duration_median_s")
}
