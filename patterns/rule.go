package patterns

// Evidence is what the decision rule looks at: the numbers that decide a
// verdict, and nothing else.
type Evidence struct {
	InBefore, InAfter bool
	// BarShareBefore and BarShareAfter are the shares of each period's
	// days on which the finding met the fixed bar.
	BarShareBefore, BarShareAfter float64
	// CostRelative and TimeRelative are the adjusted changes of the cost
	// and of the travel time per trip as shares of their before level
	// (−0.5: half); CostP and TimeP their Benjamini-Hochberg adjusted
	// p-values.
	CostRelative, CostP float64
	TimeRelative, TimeP float64
}

// EvidenceOf gathers the evidence of an assessment.
func EvidenceOf(a *Assessment) Evidence {
	c, t := a.Effects[Cost], a.Effects[TravelTime]
	return Evidence{
		InBefore: a.InBefore, InAfter: a.InAfter,
		BarShareBefore: a.BarShare(0), BarShareAfter: a.BarShare(1),
		CostRelative: c.Relative, CostP: c.Adjusted.PAdjusted,
		TimeRelative: t.Relative, TimeP: t.Adjusted.PAdjusted,
	}
}

// Decision is the outcome of Decide.
type Decision struct {
	Verdict Verdict
	Basis   Basis
	// Cost and Time are the directions of the significant, material
	// changes of the adjusted cost and travel time (NoChange otherwise).
	Cost, Time Change
}

// Decide is the decision rule, a pure function of the evidence and the
// options. With α = opts.Alpha, a deciding measure changed when its
// adjusted p-value is below α and its adjusted change is at least the
// material share in size: opts.MaterialCost for the cost, opts.MaterialTime
// for the travel time. Better is a fall of either, worse a rise. Then, in
// order:
//
//  1. better and worse (one measure each way): Unchanged, basis mixed;
//  2. a finding of the before period, better, and either its adjusted cost
//     fell by at least opts.ClearCost (significantly) or it met the fixed
//     bar on fewer than opts.ClearBarShare of the after days (and on fewer
//     than before): Cleared, basis cost or bar;
//  3. worse, and a finding of the after period only: New;
//  4. worse: Worse;
//  5. better: Eased;
//  6. otherwise Unchanged.
//
// The basis of rules 3 to 5 is the cost when it changed, else the travel
// time. NaN p-values (tests that could not be done) are never
// significant; a NaN share never clears.
func Decide(e Evidence, opts CompareOptions) Decision {
	significant := func(p float64) bool { return p < opts.Alpha } // false for NaN
	var d Decision
	if significant(e.CostP) {
		switch {
		case e.CostRelative <= -opts.MaterialCost:
			d.Cost = Down
		case e.CostRelative >= opts.MaterialCost:
			d.Cost = Up
		}
	}
	if significant(e.TimeP) {
		switch {
		case e.TimeRelative <= -opts.MaterialTime:
			d.Time = Down
		case e.TimeRelative >= opts.MaterialTime:
			d.Time = Up
		}
	}
	better := d.Cost == Down || d.Time == Down
	worse := d.Cost == Up || d.Time == Up
	basis := BasisTime
	if d.Cost != NoChange {
		basis = BasisCost
	}
	switch {
	case better && worse:
		d.Verdict, d.Basis = Unchanged, BasisMixed
	case e.InBefore && better && significant(e.CostP) && e.CostRelative <= -opts.ClearCost:
		d.Verdict, d.Basis = Cleared, BasisCost
	case e.InBefore && better && e.BarShareAfter < opts.ClearBarShare && e.BarShareAfter < e.BarShareBefore:
		d.Verdict, d.Basis = Cleared, BasisBar
	case worse && !e.InBefore:
		d.Verdict, d.Basis = New, basis
	case worse:
		d.Verdict, d.Basis = Worse, basis
	case better:
		d.Verdict, d.Basis = Eased, basis
	default:
		d.Verdict, d.Basis = Unchanged, BasisNone
	}
	return d
}
