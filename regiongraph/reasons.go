package regiongraph

// A Reason is why an input row was not used. Its text is the key of the
// row count in Quality.Rejected and in the store's quality metadata.
type Reason string

// Rejection reasons. Every input row (a trip table row, a GPS point, a GPX
// track point) ends either used or counted under exactly one reason: the
// first that applies in the order of RejectReasons. Points count with the
// trip they belong to.
const (
	ReasonUnbalancedQuote Reason = "unbalanced quote"    // a quoted field not closed within MaxQuotedLines lines and MaxQuotedBytes bytes, or text after its closing quote: the record is its first line
	ReasonUnparseable     Reason = "unparseable"         // a value that is not a number, time or flag, or out of range
	ReasonMissingField    Reason = "missing field"       // an empty required field, or too few fields
	ReasonDSTGap          Reason = "time in DST gap"     // a local time without offset that the clocks skip (spring forward)
	ReasonDSTOverlap      Reason = "time in DST overlap" // a local time without offset that the clocks show twice (fall back)
	ReasonImplausibleTime Reason = "implausible time"    // a time before EarliestTime or after LatestTime
	ReasonDuplicateRow    Reason = "duplicate row"       // the same text as an earlier row (of any input file); the first is kept
	ReasonDuplicateTripID Reason = "duplicate trip id"   // a trip_id of an earlier row with other values; the first is kept
	ReasonDuplicatePoint  Reason = "duplicate point"     // a GPS point of the same vehicle, time and place as an earlier one
	ReasonOutside         Reason = "outside study area"  // origin or destination in no region
	ReasonIntraRegion     Reason = "intra-region"        // origin and destination in the same region
	ReasonShortTrip       Reason = "short trip"          // great-circle origin-destination under MinStraightMetres, or fewer than two points
	ReasonBadDuration     Reason = "bad duration"        // duration not positive or over MaxDuration
	ReasonGPSJump         Reason = "gps jump"            // implied speed between consecutive points over MaxJumpKMH
	ReasonBadSpeed        Reason = "bad speed"           // travel speed outside MinSpeedKMH..MaxSpeedKMH
	ReasonDetourFloor     Reason = "detour below floor"  // travel distance / great-circle distance under MinDetour
	ReasonNotOccupied     Reason = "not occupied"        // GPS point while the occupied flag is off
	ReasonStationary      Reason = "stationary"          // GPS point inside a dwell (parked vehicle)
	ReasonOutsideTimes    Reason = "outside time window" // start time in none of the windows
)

// reasonUsed is the outcome of a row that passes every check.
const reasonUsed Reason = ""

// RejectReasons returns the rejection reasons in the order they are checked
// and reported.
func RejectReasons() []Reason {
	return []Reason{ReasonUnbalancedQuote, ReasonUnparseable, ReasonMissingField,
		ReasonDSTGap, ReasonDSTOverlap, ReasonImplausibleTime,
		ReasonDuplicateRow, ReasonDuplicateTripID, ReasonDuplicatePoint, ReasonOutside, ReasonIntraRegion,
		ReasonShortTrip, ReasonBadDuration, ReasonGPSJump, ReasonBadSpeed, ReasonDetourFloor,
		ReasonNotOccupied, ReasonStationary, ReasonOutsideTimes}
}

// isDataError reports whether r marks bad data, on which Strict stops. The
// other reasons are filters that well-formed data meets too (trips leaving
// the study area or staying in one region, parked or vacant vehicles, times
// outside the windows), and duplicates, which overlapping exports of sound
// data hold too.
func (r Reason) isDataError() bool {
	switch r {
	case ReasonUnbalancedQuote, ReasonUnparseable, ReasonMissingField, ReasonDSTGap, ReasonDSTOverlap,
		ReasonImplausibleTime, ReasonBadDuration, ReasonGPSJump, ReasonBadSpeed, ReasonDetourFloor:
		return true
	}
	return false
}
