package patterns

import "strconv"

// Verdict is the outcome of comparing a finding across two periods.
type Verdict string

const (
	Cleared   Verdict = "cleared"   // recurred before, no longer recurs
	Eased     Verdict = "eased"     // still recurs, significantly faster or less circuitous
	Unchanged Verdict = "unchanged" // no significant change
	Worse     Verdict = "worse"     // significantly slower, more circuitous or more frequent
	New       Verdict = "new"       // recurs only after
)

// Change is the direction in which one measure of a finding changed, after
// against before, as far as the decision rule counts it: significant after
// adjustment and, for speed and detour, at least the material shift.
type Change int

const (
	NoChange Change = iota // no change both significant and material
	Up                     // higher after: recurs on more days, faster, more circuitous
	Down                   // lower after: recurs on fewer days, slower, less circuitous
)

func (c Change) String() string {
	switch c {
	case NoChange:
		return "none"
	case Up:
		return "up"
	case Down:
		return "down"
	}
	return "Change(" + strconv.Itoa(int(c)) + ")"
}

// Shift is a Mann-Whitney U test with the Hodges-Lehmann shift (after minus
// before) and its 95 % confidence interval.
type Shift struct {
	Before, After []float64 // daily values
	U             float64   // statistic of the after sample
	P             float64   // two-sided
	PAdjusted     float64   // Benjamini-Hochberg across findings
	Shift         float64   // Hodges-Lehmann estimate, after - before
	Low, High     float64   // 95 % confidence interval of Shift
	// Change is the direction of a significant, material shift.
	Change Change
}

// Assessment is one finding's verdict with its evidence.
type Assessment struct {
	Finding           Finding // from the before scan when present there, else after
	Verdict           Verdict
	InBefore, InAfter bool
	// Recurrence: days on which the group recurred / analysed days.
	DaysBefore, TotalBefore  int
	DaysAfter, TotalAfter    int
	FisherP, FisherPAdjusted float64
	// Recurrence is the direction of a significant change of the share of
	// days on which the group recurred (Fisher test).
	Recurrence Change
	Speed      Shift // daily trip-weighted median speed of the finding's edges, m/s
	Detour     Shift // daily median detour of the finding's edges
	Focus      bool  // within the focus area
}

// Comparison is the before/after study.
type Comparison struct {
	Before, After *Scan
	Assessments   []Assessment // ordered by verdict severity then rank
	Counts        map[Verdict]int
	Alpha         float64 // significance level after adjustment (default 0.05)
}

// severity orders verdicts for the report, most urgent first.
func severity(v Verdict) int {
	switch v {
	case Worse:
		return 0
	case New:
		return 1
	case Unchanged:
		return 2
	case Eased:
		return 3
	case Cleared:
		return 4
	}
	return 5
}
