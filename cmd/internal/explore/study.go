package explore

import (
	"context"
	"fmt"
	"time"

	"narrows/partition"
	"narrows/patterns"
	"narrows/regiongraph"
)

// Study is what the page explores.
type Study struct {
	Title   string
	Store   *regiongraph.Store // every edge of the study, before exclusions
	Regions *partition.Partition
	Scheme  []partition.NetworkLine // drawn on the map (optional)
	// Scan holds the study's scan options (period, window, days, the
	// thresholds); Before and After, "D1..D2", make it a comparison with
	// the Compare options when both are set.
	Scan          patterns.ScanOptions
	Before, After string
	Compare       patterns.CompareOptions
	Exclusions    patterns.Exclusions
	// Focus is the study's focus area as written in a study file (region
	// ids "12,15" or "LON,LAT@METRES"; "" for none); ParseFocus reads that
	// text (nil: the page cannot set a focus). It replaces Compare.Focus.
	Focus      string
	ParseFocus func(string) (*patterns.Focus, error)
	// Save writes the choices into the study file and returns what it
	// wrote (nil: nothing to save into, as for a bare store).
	Save func(Choices) (string, error)
	// Report writes the report of the study file as saved, from the
	// regions and day graphs held here, and returns the files written
	// (nil: no report, as for a bare store).
	Report func(context.Context) ([]string, error)
	// NoCache derives everything afresh on every request: the reference
	// that the server's cache is measured and checked against.
	NoCache bool
}

// Choices are the planner's choices as they go into the study file: the
// scan options as set on the page (Exclude holding only the study's own
// plain list of days), the periods and the exclusions with reasons.
type Choices struct {
	Scan          patterns.ScanOptions
	Before, After string
	Exclusions    patterns.Exclusions
	// Focus is the focus area's text (see Study.Focus).
	Focus string
}

// Settings are the page's controls.
type Settings struct {
	// Before and After ("YYYY-MM-DD..YYYY-MM-DD") compare two periods when
	// both are set; From and To bound the single period otherwise.
	Before string `json:"before"`
	After  string `json:"after"`
	From   string `json:"from"`
	To     string `json:"to"`
	Window string `json:"window"`
	Days   string `json:"days"`
	// The thresholds.
	MinTrips    int     `json:"min_trips"`
	Support     float64 `json:"support"`
	K           int     `json:"k"`
	DetourFloor float64 `json:"detour_floor"`
	SpeedGate   bool    `json:"speed_gate"`
	// Focus is the focus area: region ids "12,15" or "LON,LAT@METRES";
	// a comparison marks the findings there and matches them first.
	Focus string `json:"focus"`
}

// settingsOf returns the page's settings for the choices.
func settingsOf(c Choices) Settings {
	return Settings{
		Before: c.Before, After: c.After, From: c.Scan.From, To: c.Scan.To,
		Window: c.Scan.Window, Days: string(c.Scan.Days),
		MinTrips: c.Scan.Skyline.MinTrips, Support: c.Scan.Support, K: c.Scan.Skyline.K,
		DetourFloor: c.Scan.Skyline.DetourFloor, SpeedGate: !c.Scan.Skyline.NoSpeedGate,
		Focus: c.Focus,
	}
}

// apply returns the choices with the settings applied, or an error
// saying which setting is out of range.
func (s Settings) apply(c Choices, windows []regiongraph.Window, parseFocus func(string) (*patterns.Focus, error), regions int) (Choices, error) {
	if s.Focus != "" {
		if parseFocus == nil {
			return c, fmt.Errorf("focus: this study cannot take a focus area")
		}
		f, err := parseFocus(s.Focus)
		if err != nil {
			return c, fmt.Errorf("focus: %v", err)
		}
		for _, id := range f.Regions {
			if id < 1 || id > regions {
				return c, fmt.Errorf("focus: there is no region %d (regions are 1 to %d)", id, regions)
			}
		}
	}
	if (s.Before == "") != (s.After == "") {
		return c, fmt.Errorf("give both periods to compare, or neither")
	}
	for _, p := range []struct{ name, v string }{{"before", s.Before}, {"after", s.After}} {
		if p.v == "" {
			continue
		}
		if _, _, err := patterns.ParsePeriod(p.v); err != nil {
			return c, fmt.Errorf("%s: %v", p.name, err)
		}
	}
	for _, d := range []struct{ name, v string }{{"from", s.From}, {"to", s.To}} {
		if d.v == "" {
			continue
		}
		if _, err := time.Parse(time.DateOnly, d.v); err != nil {
			return c, fmt.Errorf("%s: %q is not a date YYYY-MM-DD", d.name, d.v)
		}
	}
	if s.Window != "" {
		known := false
		for _, w := range windows {
			known = known || w.Name == s.Window
		}
		if !known {
			return c, fmt.Errorf("window: the day graphs have no window %q", s.Window)
		}
	}
	o := c.Scan
	o.From, o.To, o.Window, o.Days = s.From, s.To, s.Window, patterns.DaySelector(s.Days)
	o.Skyline.MinTrips, o.Support, o.Skyline.K = s.MinTrips, s.Support, s.K
	o.Skyline.DetourFloor, o.Skyline.NoSpeedGate = s.DetourFloor, !s.SpeedGate
	switch o.Days {
	case patterns.AllDays, patterns.Weekdays, patterns.Weekends:
	default:
		return c, fmt.Errorf("days: want all, weekdays or weekends, got %q", s.Days)
	}
	if err := o.Validate(); err != nil {
		return c, err
	}
	c.Scan, c.Before, c.After, c.Focus = o, s.Before, s.After, s.Focus
	return c, nil
}
