package regiongraph

import (
	"cmp"
	"fmt"
	"slices"
	"strings"
)

// A YieldError is an ingest that used no row, or fewer than
// Options.MinUsedShare of the rows read: most often a wrong distance unit,
// column mapping or time zone, which a store of next to nothing would only
// show later as "no days".
type YieldError struct {
	Files    []string // the inputs, as given
	Quality  Quality
	MinShare float64
	Top      []ReasonCount // the most frequent reasons, most first (up to 3)
	Hint     string        // what to check, from the top reason
}

// ReasonCount is the number of rows rejected for a reason.
type ReasonCount struct {
	Reason Reason
	Rows   int64
}

func (e *YieldError) Error() string {
	var b strings.Builder
	b.WriteString("regiongraph: ")
	if len(e.Files) > 0 {
		b.WriteString(strings.Join(e.Files, ", ") + ": ")
	}
	if e.Quality.Used == 0 {
		fmt.Fprintf(&b, "no row of %d used", e.Quality.Read)
	} else {
		fmt.Fprintf(&b, "%d of %d rows used (%.2g %%), under the least share %g",
			e.Quality.Used, e.Quality.Read, 100*float64(e.Quality.Used)/float64(e.Quality.Read), e.MinShare)
	}
	for i, rc := range e.Top {
		sep := "; "
		if i == 0 {
			sep = "; rejected: "
		}
		fmt.Fprintf(&b, "%s%s %d", sep, rc.Reason, rc.Rows)
	}
	if e.Hint != "" {
		b.WriteString(". " + e.Hint)
	}
	return b.String()
}

// hints say what to check when a reason rejects most rows.
var hints = map[Reason]string{
	ReasonUnbalancedQuote: "Check the file's quoting (a stray \" opens a field)",
	ReasonUnparseable:     "Check the column mapping (Columns): a column may hold other values than its name says",
	ReasonMissingField:    "Check the column mapping (Columns) and the field separator (a comma)",
	ReasonDSTGap:          "Check the time zone: times without offset are read in it",
	ReasonDSTOverlap:      "Check the time zone: times without offset are read in it",
	ReasonImplausibleTime: "Check the time column (seconds or milliseconds?) and EarliestTime/LatestTime",
	ReasonDuplicateRow:    "The rows repeat earlier rows: is a file given twice?",
	ReasonDuplicateTripID: "Check the trip_id column: its values repeat",
	ReasonDuplicatePoint:  "The points repeat earlier points: is a file given twice?",
	ReasonOutside:         "Check that the regions cover the trips and that longitude and latitude are not swapped",
	ReasonIntraRegion:     "The regions may be too large for these trips",
	ReasonShortTrip:       "Check MinStraightMetres and the coordinate columns",
	ReasonBadDuration:     "Check the time zone and the start and end time columns",
	ReasonGPSJump:         "Check MaxJumpKMH and the coordinate columns",
	ReasonBadSpeed:        "Check the distance unit (m, km, mi) and the time columns",
	ReasonDetourFloor:     "Check the distance unit (m, km, mi) and the distance column",
	ReasonNotOccupied:     "Check the occupied column's values",
	ReasonStationary:      "Check DwellMinutes and DwellMetres",
	ReasonOutsideTimes:    "Check the time zone and the windows",
}

// checkYield returns a *YieldError when the ingest used no row or too few.
func checkYield(st *settings, q Quality, sources []Source) error {
	if q.Used > 0 && float64(q.Used) >= st.opts.MinUsedShare*float64(q.Read) {
		return nil
	}
	e := &YieldError{Quality: q, MinShare: st.opts.MinUsedShare}
	for _, src := range sources {
		e.Files = append(e.Files, src.Path)
	}
	for _, r := range RejectReasons() {
		if n := q.Rejected[string(r)]; n > 0 {
			e.Top = append(e.Top, ReasonCount{r, n})
		}
	}
	// Stable: ties keep the order of RejectReasons.
	slices.SortStableFunc(e.Top, func(a, b ReasonCount) int { return cmp.Compare(b.Rows, a.Rows) })
	e.Top = e.Top[:min(3, len(e.Top))]
	if len(e.Top) > 0 {
		e.Hint = hints[e.Top[0].Reason]
	} else {
		e.Hint = "The files hold no rows after their header lines"
	}
	return e
}
