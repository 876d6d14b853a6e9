// Scenarios that change the whole town and build nothing: a season and a
// year of growth.

package town

import "time"

// NetworkChange changes the whole town from a day on: trip numbers and
// driving speeds scale everywhere alike, and no link is built, so that no
// pair improves or worsens more than the rest.
type NetworkChange struct {
	// From is the first day of the change (its calendar day counts).
	From time.Time
	// Demand scales the trips of every day from From (0.75: a quarter
	// fewer). Congestion in route choice is left as it was, so that every
	// pair keeps its routes.
	Demand float64
	// Speed scales the driving speed of every trip from From (1.1: a tenth
	// faster); parking and access times stay.
	Speed float64
}

// networkScenarios are the scenarios of the whole town: "season" (from the
// start of the after period a quarter fewer trips, a tenth faster, as in a
// holiday season) and "growth" (a quarter more trips, a tenth slower).
var networkScenarios = map[string]struct{ demand, speed float64 }{
	"season": {0.75, 1.1},
	"growth": {1.25, 1 / 1.1},
}

// networkScenario returns the plan of a whole-town scenario, or ok false
// when kind is not one.
func networkScenario(kind string) (p Plan, ok bool) {
	s, ok := networkScenarios[kind]
	if !ok {
		return Plan{}, false
	}
	p, err := Scenario("control")
	if err != nil {
		return Plan{}, false
	}
	p.kind = kind
	p.Change = &NetworkChange{From: p.After.From, Demand: s.demand, Speed: s.speed}
	return p, true
}

// scale returns the day's demand and duration factors under the change
// (1 and 1 before it, or without one).
func (c *NetworkChange) scale(day time.Time) (demand, duration float64) {
	if c == nil || day.Before(time.Date(c.From.Year(), c.From.Month(), c.From.Day(), 0, 0, 0, 0, day.Location())) {
		return 1, 1
	}
	return c.Demand, 1 / c.Speed
}

// Opening returns the day the scenario's change begins: the link's opening
// day, or the first day of a NetworkChange; nil for the control.
func (p Plan) Opening() *time.Time {
	switch {
	case p.LinkOpens != nil:
		return p.LinkOpens
	case p.Change != nil:
		return &p.Change.From
	}
	return nil
}
