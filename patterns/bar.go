package patterns

import "narrows/skyline"

// fixedBar is the bar a pair had to clear to be weak, held at its
// before-period level: the skyline's gates with the day's median speed
// replaced by the before period's (periodData.barSpeed). The dominance of
// the skyline is left out, since it is relative to the rest of each day:
// when the worst pair improves, others join the skyline, and a fixed but
// still busy pair would never leave it.
type fixedBar struct {
	detourFloor float64 // skyline.Options.DetourFloor, or no gate
	detourGate  bool
	speed       float64 // m/s; no gate when speedGate is false
	speedGate   bool
}

func newFixedBar(o skyline.Options, barSpeed float64) *fixedBar {
	return &fixedBar{detourFloor: o.DetourFloor, detourGate: !o.NoDetourGate, speed: barSpeed, speedGate: !o.NoSpeedGate}
}

// met reports whether an edge's day clears the bar: at least as
// circuitous as the detour floor and slower than the fixed speed.
func (b *fixedBar) met(e *edgeDay) bool {
	if b.detourGate && !(e.detour >= b.detourFloor) {
		return false
	}
	if b.speedGate && !(e.speed < b.speed) {
		return false
	}
	return true
}
