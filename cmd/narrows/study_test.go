package main

import (
	"os"
	"path/filepath"
	"reflect"
	"testing"
	"time"

	"github.com/paulmach/orb"

	"narrows/partition"
	"narrows/partition/geodesy"
	"narrows/patterns"
	"narrows/regiongraph"
	"narrows/skyline"
)

// TestStudyKeysReachTheOptions sets every key of a study file to a value
// other than its default and checks the field each one fills, in the
// field's own unit.
func TestStudyKeysReachTheOptions(t *testing.T) {
	const text = `title = "t"
time_zone = "Etc/GMT-1"
output = "o"
name = "n"

[regions]
osm = "a.osm"
bbox = "1,2,3,4"
roads = ["primary"]
barriers = ["rail"]
snap_metres = 5
min_area_km2 = 0.5
min_compactness = 0.25
max_sliver_width_metres = 50
extend_metres = 60
min_water_area_km2 = 0.2
max_region_km2 = 9
split_roads = ["unclassified"]
min_border_road_metres = 12
network_roads = ["residential"]
route_roads = ["primary", "residential"]
exact = true

[trips]
files = ["t.csv"]
format = "points"
columns = {start_time = "pickup"}
distance_unit = "km"
strict = true
min_od_metres = 100
max_duration = "2h"
min_speed_kmh = 2
max_speed_kmh = 120
min_detour = 0.9
max_jump_speed_kmh = 180
gap_minutes = 6
dwell_minutes = 4
dwell_metres = 40
max_quoted_lines = 3
max_quoted_bytes = 1000
earliest_time = 2020-01-01T00:00:00Z
latest_time = 2030-01-01T00:00:00Z
min_used_share = 0.2

[[windows]]
name = "am"
from = "07:00"
to = "10:00"

[scan]
window = "am"
days = "weekends"
exclude = ["2026-03-03"]
min_trips = 5
support = 0.5
k = 2
detour_floor = 1.5
no_detour_gate = true
no_speed_gate = true
max_edges = 3
maximal_only = true
reference_speed_kmh = 36
from = "2026-03-02"
to = "2026-03-09"

[compare]
before = "2026-03-02..2026-03-08"
after = "2026-03-09..2026-03-15"
focus = "12,15"
alpha = 0.1
min_publish = 5
`
	path := filepath.Join(t.TempDir(), "study.toml")
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	s, err := loadStudy(path)
	if err != nil {
		t.Fatal(err)
	}
	am, err := regiongraph.ParseWindow("am=07:00-10:00")
	if err != nil {
		t.Fatal(err)
	}
	bbox := orb.Bound{Min: orb.Point{1, 2}, Max: orb.Point{3, 4}}
	tests := []struct {
		key       string
		got, want any
	}{
		{"title", s.Title, "t"},
		{"time_zone", s.Trips.TimeZone, "Etc/GMT-1"},
		{"output", s.Output, "o"},
		{"name", s.Name, "n"},
		{"regions", s.Regions.Options, partition.Options{BBox: &bbox, Roads: []string{"primary"}, Barriers: []string{"rail"},
			SnapMetres: 5, MinAreaKM2: 0.5, MinCompactness: 0.25, MaxSliverWidthMetres: 50, Exact: true,
			ExtendMetres: 60, MinWaterAreaKM2: 0.2, MaxRegionKM2: 9, SplitRoads: []string{"unclassified"}, MinBorderRoadMetres: 12, NetworkRoads: []string{"residential"}, RouteRoads: []string{"primary", "residential"}}},
		{"trips.files", s.Trips.Files, []string{"t.csv"}},
		{"trips.format", s.Trips.Format, regiongraph.FormatPoints},
		{"trips", s.Trips.Options, regiongraph.Options{TimeZone: "Etc/GMT-1", Windows: []regiongraph.Window{am},
			Columns: map[string]string{"start_time": "pickup"}, DistanceUnit: "km", Strict: true,
			MinStraightMetres: 100, MaxDuration: 2 * time.Hour, MinSpeedKMH: 2, MaxSpeedKMH: 120, MinDetour: 0.9,
			MaxJumpKMH: 180, GapMinutes: 6, DwellMinutes: 4, DwellMetres: 40,
			MaxQuotedLines: 3, MaxQuotedBytes: 1000, MinUsedShare: 0.2,
			EarliestTime: time.Date(2020, 1, 1, 0, 0, 0, 0, time.UTC), LatestTime: time.Date(2030, 1, 1, 0, 0, 0, 0, time.UTC)}},
		{"scan", s.Scan.ScanOptions, patterns.ScanOptions{From: "2026-03-02", To: "2026-03-09", Window: "am",
			Days: patterns.Weekends, Exclude: []string{"2026-03-03"}, Support: 0.5, MaxGroupEdges: 3, MaximalOnly: true,
			JoinCorrelation: 0.5, MaxGroupVisits: 2_000_000,
			ReferenceSpeed: geodesy.MPS(36),
			Skyline:        skyline.Options{MinTrips: 5, DetourFloor: 1.5, NoDetourGate: true, NoSpeedGate: true, K: 2}}},
		{"compare.before", s.Compare.Before.String(), "2026-03-02..2026-03-08"},
		{"compare.after", s.Compare.After.String(), "2026-03-09..2026-03-15"},
		{"compare.focus", [2]any{s.Compare.Focus.String(), s.Compare.CompareOptions.Focus.Regions}, [2]any{"12,15", []int{12, 15}}},
		{"compare.alpha", s.Compare.Alpha, 0.1},
		{"compare.min_publish", s.Compare.MinPublish, 5},
	}
	for _, tc := range tests {
		if !reflect.DeepEqual(tc.got, tc.want) {
			t.Errorf("%s:\n got %+v\nwant %+v", tc.key, tc.got, tc.want)
		}
	}
}

// TestStudyDefaultsAreTheLibraries: a study that names no option runs with
// the libraries' defaults.
func TestStudyDefaultsAreTheLibraries(t *testing.T) {
	path := filepath.Join(t.TempDir(), "study.toml")
	if err := os.WriteFile(path, []byte("[regions]\nosm = \"a.osm\"\n[trips]\nfiles = [\"t.csv\"]\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	s, err := loadStudy(path)
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name      string
		got, want any
	}{
		{"regions", s.Regions.Options, partition.DefaultOptions()},
		{"trips", s.Trips.Options, regiongraph.DefaultOptions()},
		{"scan", s.Scan.ScanOptions, patterns.DefaultScanOptions()},
		{"compare", s.Compare.CompareOptions, patterns.DefaultCompareOptions()},
	} {
		if !reflect.DeepEqual(tc.got, tc.want) {
			t.Errorf("%s:\n got %+v\nwant %+v", tc.name, tc.got, tc.want)
		}
	}
}
