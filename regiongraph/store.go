package regiongraph

// Edge is one directed region pair on one local day and time window.
// Units are metres, seconds and metres per second.
type Edge struct {
	Day    string // local calendar day, YYYY-MM-DD
	Window string // time window name
	From   int    // origin region id
	To     int    // destination region id
	Trips  int

	SpeedP25, SpeedMedian, SpeedP75    float64 // m/s
	DetourP25, DetourMedian, DetourP75 float64 // travel distance / great-circle distance

	DistanceMedian float64 // metres
	DurationMedian float64 // seconds

	// Sums over the edge's trips, so costs add up exactly across trips.
	DistanceSum float64 // metres of travel
	StraightSum float64 // metres of great-circle origin-destination distance
	DurationSum float64 // seconds
}

// Window is a named time-of-day window [Start, End) in minutes after local
// midnight. A trip belongs to the window of its start time.
type Window struct {
	Name        string
	StartMinute int
	EndMinute   int
}

// Source describes one input file of an ingest.
type Source struct {
	Path   string // as given
	SHA256 string // hex
	Rows   int64
}

// Quality accounts for every input row: Read = Used + sum of Rejected.
type Quality struct {
	Read     int64
	Used     int64
	Rejected map[string]int64 // reason -> rows, every reason of RejectReasons
}

// Meta is the store's provenance.
type Meta struct {
	RegionsSHA256 string
	TimeZone      string
	Windows       []Window
	Quality       Quality
	Sources       []Source
}

// Store is the day-graph store. Edges are sorted by Day, Window, From, To.
type Store struct {
	Meta  Meta
	Edges []Edge

	// regionsGeoJSON is the partition the store was built on, as written by
	// partition.WriteGeoJSON; see Regions.
	regionsGeoJSON []byte
}
