// Package regiongraph projects vehicle trips onto per-day region graphs.
//
// In: a partition.Partition and trip data (trip tables as CSV or Parquet, GPS
// points as CSV, or GPX tracks), with Options (time zone, windows, quality
// thresholds).
// Out: a Store, the day-graph store: for each local day, time window and
// directed region pair, the trip count and the quartiles of speed and detour
// ratio, with the quality accounting of every input row. A Store is written
// to and read from one Parquet file.
package regiongraph
