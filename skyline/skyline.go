package skyline

// Options sets the candidate rules. The zero value is not the default; use
// DefaultOptions.
type Options struct {
	// MinTrips excludes edges with fewer trips (default 10).
	MinTrips int
	// DetourFloor: candidates need a median detour ratio at least this
	// (default 1.3). NoDetourGate switches the gate off.
	DetourFloor  float64
	NoDetourGate bool
	// NoSpeedGate switches off the gate "median speed below the day's
	// trip-weighted median speed".
	NoSpeedGate bool
	// K widens the skyline to the k-skyband: edges dominated by fewer than
	// K others (default 1, the plain skyline).
	K int
}
