package route

import "fmt"

// Options sets how the network is built.
type Options struct {
	// SpeedsKMH are the free-flow speeds by highway class used where a way
	// has no maxspeed tag. Defaults (DefaultSpeedsKMH) are urban free-flow
	// figures from memory, common practice for a first screening: motorway
	// 100, trunk 80, primary 60, secondary 50, tertiary 40, unclassified and
	// residential 30, living_street 10; links a step below their road.
	SpeedsKMH map[string]float64 `toml:"speeds_kmh"`
	// UseMaxSpeed takes a way's maxspeed tag, where it has one, as its
	// free-flow speed (default true).
	UseMaxSpeed bool `toml:"use_maxspeed"`
	// MaxSpeedShare scales a tagged maxspeed to a free-flow speed
	// (default 1: drivers at the limit).
	MaxSpeedShare float64 `toml:"maxspeed_share"`
	// SnapMetres is how far a trip end or a candidate's end may lie from
	// the nearest node (default 500 m for trip ends, whose points are often
	// inside blocks; candidates' ends use a tenth of it).
	SnapMetres float64 `toml:"snap_metres"`
}

// DefaultSpeedsKMH returns the default free-flow speeds by class.
func DefaultSpeedsKMH() map[string]float64 {
	return map[string]float64{
		"motorway": 100, "trunk": 80, "primary": 60, "secondary": 50, "tertiary": 40,
		"unclassified": 30, "residential": 30, "living_street": 10,
		"motorway_link": 60, "trunk_link": 50, "primary_link": 40, "secondary_link": 40, "tertiary_link": 30,
	}
}

// DefaultOptions returns the defaults documented on each field.
func DefaultOptions() Options {
	return Options{SpeedsKMH: DefaultSpeedsKMH(), UseMaxSpeed: true, MaxSpeedShare: 1, SnapMetres: 500}
}

func (o *Options) check() error {
	for c, v := range o.SpeedsKMH {
		if !(v > 0 && v <= 300) {
			return fmt.Errorf("route: speed for %q is %v km/h, want more than 0 and at most 300", c, v)
		}
	}
	if !(o.MaxSpeedShare > 0 && o.MaxSpeedShare <= 2) {
		return fmt.Errorf("route: maxspeed_share %v, want more than 0 and at most 2", o.MaxSpeedShare)
	}
	if !(o.SnapMetres > 0) {
		return fmt.Errorf("route: snap_metres %v, want more than 0", o.SnapMetres)
	}
	return nil
}

// classRank orders highway classes from the highest (0) down; unknown
// classes rank last.
func classRank(class string) int {
	for i, c := range classOrder {
		if c == class {
			return i
		}
	}
	return len(classOrder)
}

var classOrder = [...]string{"motorway", "trunk", "primary", "secondary", "tertiary", "unclassified", "residential", "living_street"}

// ClassRank is classRank for link classes too: a link ranks with its road.
func ClassRank(class string) int {
	if n := len(class); n > 5 && class[n-5:] == "_link" {
		return classRank(class[:n-5])
	}
	return classRank(class)
}
