package town

import (
	"math"
	"math/rand/v2"
)

// profile is a daily profile of trip start times: a mixture of normal
// distributions over the hours of the day, truncated to [first, last).
type profile struct {
	parts       []profilePart
	first, last float64 // hours
	// perMinute is the density (share of the profile's trips per second)
	// at each minute of the day.
	perMinute [1440]float64
}

type profilePart struct{ weight, mean, sd float64 } // hours

// profiles are the start-time profiles of the trip purposes: commuting out
// in the morning and back in the evening; other trips (errands, visits,
// business) over the day, with an evening hump on weekdays and a broad
// midday one at weekends.
type profiles struct {
	commuteAM, commutePM, otherWeekday, otherWeekend profile
}

func newProfiles() *profiles {
	return &profiles{
		commuteAM:    newProfile([]profilePart{{1, 7.8, 0.7}}, 5, 12),
		commutePM:    newProfile([]profilePart{{1, 17.3, 1.0}}, 12, 23.75),
		otherWeekday: newProfile([]profilePart{{0.7, 12.5, 3.0}, {0.3, 18.3, 1.6}}, 5.5, 23.75),
		otherWeekend: newProfile([]profilePart{{1, 13.5, 3.2}}, 6, 23.75),
	}
}

func newProfile(parts []profilePart, first, last float64) profile {
	p := profile{parts: parts, first: first, last: last}
	var sum float64
	for m := range p.perMinute {
		h := (float64(m) + 0.5) / 60
		if h < p.first || h >= p.last {
			continue
		}
		var d float64
		for _, c := range parts {
			z := (h - c.mean) / c.sd
			d += c.weight * math.Exp(-z*z/2) / (c.sd * math.Sqrt(2*math.Pi))
		}
		p.perMinute[m] = d
		sum += d
	}
	for m := range p.perMinute {
		p.perMinute[m] /= sum * 60
	}
	return p
}

// draw returns a start time in seconds after midnight.
func (p *profile) draw(rng *rand.Rand) float64 {
	for {
		u := rng.Float64()
		c := p.parts[len(p.parts)-1]
		for _, part := range p.parts {
			if u < part.weight {
				c = part
				break
			}
			u -= part.weight
		}
		h := c.mean + c.sd*rng.NormFloat64()
		if h >= p.first && h < p.last {
			return h * 3600
		}
	}
}

// density returns the share of the profile's trips per second at sec.
func (p *profile) density(sec float64) float64 {
	m := int(sec / 60)
	if m < 0 || m >= len(p.perMinute) {
		return 0
	}
	return p.perMinute[m]
}
