package patterns

// evidence is what the decision rule looks at.
type evidence struct {
	InBefore, InAfter       bool
	ShareBefore, ShareAfter float64
	FisherPAdjusted         float64
	SpeedShift, SpeedPAdj   float64 // m/s, after − before
	DetourShift, DetourPAdj float64
}

func evidenceOf(a *Assessment) evidence {
	return evidence{
		InBefore:        a.InBefore,
		InAfter:         a.InAfter,
		ShareBefore:     share(a.DaysBefore, a.TotalBefore),
		ShareAfter:      share(a.DaysAfter, a.TotalAfter),
		FisherPAdjusted: a.FisherPAdjusted,
		SpeedShift:      a.Speed.Shift,
		SpeedPAdj:       a.Speed.PAdjusted,
		DetourShift:     a.Detour.Shift,
		DetourPAdj:      a.Detour.PAdjusted,
	}
}

func share(days, total int) float64 {
	if total == 0 {
		return 0
	}
	return float64(days) / float64(total)
}

// changes are the significant, material changes found by decide, one per
// measure.
type changes struct {
	recurrence, speed, detour Change
}

// improved reports whether any measure changed for the better: recurring
// on fewer days, faster, less circuitous.
func (c changes) improved() bool {
	return c.recurrence == Down || c.speed == Up || c.detour == Down
}

// deteriorated reports whether any measure changed for the worse.
func (c changes) deteriorated() bool {
	return c.recurrence == Up || c.speed == Down || c.detour == Up
}

// decide applies the decision rule documented at Compare. NaN p-values
// (tests that could not be done) are never significant. It returns the
// verdict and the significant, material changes behind it.
func decide(e evidence, opts CompareOptions) (Verdict, changes) {
	significant := func(p float64) bool { return p < opts.Alpha } // false for NaN
	var c changes
	if significant(e.FisherPAdjusted) {
		switch {
		case e.ShareAfter < e.ShareBefore:
			c.recurrence = Down
		case e.ShareAfter > e.ShareBefore:
			c.recurrence = Up
		}
	}
	if significant(e.SpeedPAdj) {
		switch {
		case e.SpeedShift >= opts.MinShiftSpeed && e.SpeedShift > 0:
			c.speed = Up
		case e.SpeedShift <= -opts.MinShiftSpeed && e.SpeedShift < 0:
			c.speed = Down
		}
	}
	if significant(e.DetourPAdj) {
		switch {
		case e.DetourShift <= -opts.MinShiftDetour && e.DetourShift < 0:
			c.detour = Down
		case e.DetourShift >= opts.MinShiftDetour && e.DetourShift > 0:
			c.detour = Up
		}
	}
	better, worse := c.improved(), c.deteriorated()
	switch {
	case better && worse:
		return Unchanged, c
	case e.InBefore && !e.InAfter && c.recurrence == Down:
		return Cleared, c
	case e.InAfter && !e.InBefore && c.recurrence == Up:
		return New, c
	case worse:
		return Worse, c
	case better:
		return Eased, c
	}
	return Unchanged, c
}
