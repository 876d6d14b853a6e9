// Package regiongraph projects vehicle trips onto per-day region graphs.
//
// In: a partition.Partition and trip data (trip tables as CSV or Parquet, GPS
// points as CSV, or GPX tracks), with Options (time zone, windows, quality
// thresholds).
// Out: a Store, the day-graph store: for each local day, time window and
// directed region pair, the trip count and the quartiles of speed and detour
// ratio, with the quality accounting of every input row. A Store is written
// to one Parquet file (Store.WriteParquet, to any io.Writer) and read back
// (ReadFile, ReadFileOptions); the layout is in SCHEMA.md. Stores of
// separate ingests merge (Merge). Every writer also records each day's and
// window's totals over all the edges (DayTotal), which stay known to a
// read that drops the edges under a minimum of trips (Store.DayTotals).
//
// An Edge holds no pointer, so that the millions of a city year are memory
// the garbage collector does not scan: its local day is a Day (days since
// 1970-01-01; String and ParseDay give and read YYYY-MM-DD) and its window
// a WindowIndex into the store's Meta.Windows (Meta.WindowName,
// Meta.WindowIndex), at most MaxWindows of them. The files hold both as
// text, as before.
//
// # Inputs
//
// A trip table has one row per trip with the columns trip_id (optional),
// start_time, end_time, start_lon, start_lat, end_lon, end_lat and
// distance_m; Options.Columns renames them and Options.DistanceUnit reads
// the distance in km or miles. A GPS point table has vehicle_id, time, lon,
// lat and optionally occupied; its rows need not be sorted. Each vehicle's
// points are cut into trips where the occupied flag changes (only occupied
// runs are trips) or, without that column, at time gaps and at dwells. In a
// GPX file each track segment with timed points is a trip. A trip's travel
// distance is the table's distance, or the summed great-circle length of its
// points. Times are RFC 3339, "YYYY-MM-DD HH:MM:SS" in the study's time zone,
// or Unix seconds; the time zone database is embedded.
//
// # Checks and accounting
//
// Every row ends used or counted under exactly one reason of RejectReasons,
// the first that applies in that order, so that Quality.Read equals
// Quality.Used plus the rejected rows. With Options.Strict the first row with
// bad data stops the ingest with a *RowError "file:line: reason".
//
// # Aggregation
//
// Trips are grouped by the local day and window of their start time and by
// their origin and destination regions, found through a spatial index and an
// exact point-in-polygon test that puts border points in exactly one region.
// Quantiles are exact (type 7, linear interpolation between order
// statistics). Per-trip values are held as 32-bit floats until the end of
// the ingest: 16 bytes a trip, so 10 million trips take about 160 MB, plus
// about 160 bytes per edge of the result (BenchmarkIngest10M: a peak of
// about 240 MB of heap for 10 million trips on 217,000 edges).
//
// CSV trip tables are parsed by several goroutines; the result depends
// neither on their number nor on the order of a trip table's rows.
package regiongraph
