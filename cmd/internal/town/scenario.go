package town

import (
	"fmt"
	"time"
)

// Period is a half-open range of local days [From, To).
type Period struct {
	From, To time.Time
	name     string // "before" or "after"
}

// Plan describes a demo scenario: the days simulated, the two periods to
// compare and when the link opens.
type Plan struct {
	// Location is the study time zone (Etc/GMT-1).
	Location *time.Location
	// Before and After are the periods compared: four weeks each.
	Before, After Period
	// LinkOpens is the first day with the link, nil for the control.
	LinkOpens *time.Time
	// Change, when not nil, changes the whole town ("season", "growth").
	Change *NetworkChange

	// kind is "link" (the link opens at the start of After) or "control"
	// (nothing changes).
	kind string
	// start is the first day (local midnight); days the number of days.
	start time.Time
	days  int
	// tripsPerDay is the weekday fleet sample.
	tripsPerDay int
}

// Scenario returns the demo plan of the given kind: eight weeks from Monday
// 2 March 2026, four before and four after; in "link" the new bridge opens
// on the first day of the fifth week, in "control" it never opens.
func Scenario(kind string) (Plan, error) {
	if p, ok := networkScenario(kind); ok {
		return p, nil
	}
	if kind != "link" && kind != "control" {
		return Plan{}, fmt.Errorf("town: unknown scenario %q (want \"link\", \"control\", \"season\" or \"growth\")", kind)
	}
	loc := studyLocation()
	start := time.Date(2026, 3, 2, 0, 0, 0, 0, loc)
	mid := start.AddDate(0, 0, 28)
	end := start.AddDate(0, 0, 56)
	p := Plan{kind: kind, Location: loc, start: start, days: 56,
		Before:      Period{name: "before", From: start, To: mid},
		After:       Period{name: "after", From: mid, To: end},
		tripsPerDay: 8000}
	if kind == "link" {
		p.LinkOpens = &mid
	}
	return p, nil
}

// SimOptions returns the simulation options of the plan with the given seed
// and the other settings at their defaults.
func (p Plan) SimOptions(seed int64) SimOptions {
	o := defaultSimOptions()
	o.Seed = seed
	o.Location = p.Location
	o.Start = p.start
	o.Days = p.days
	o.TripsPerDay = p.tripsPerDay
	o.LinkOpens = p.LinkOpens
	o.Change = p.Change
	return o
}
