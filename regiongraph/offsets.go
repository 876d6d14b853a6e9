package regiongraph

import "fmt"

// OffsetMismatchError describes times whose UTC offset is not the time
// zone's (Quality.OffsetMismatch): each is placed at the instant it names,
// but days and time windows are cut in zone, so trips land on the wrong
// day or window when the zone is not the data's. Ingest returns it under
// Options.Strict; otherwise the caller decides whether to warn.
func OffsetMismatchError(q Quality, zone string) error {
	return fmt.Errorf("regiongraph: %d of the %d times with a UTC offset have an offset other than time zone %s's at that instant: days and windows are cut in %s, so the time zone is most likely not the data's",
		q.OffsetMismatch, q.OffsetTimes, zone, zone)
}
