package patterns

import (
	"errors"
	"strconv"
	"strings"
	"testing"

	"github.com/paulmach/orb"

	"narrows/partition"
	"narrows/regiongraph"
)

// periodStore holds 2025-03-01..2025-03-28 in window "am", one pair a day
// whose trips are the day of the month (so the most trips on one day of a
// period is its last day's number), and one pair in "pm" with 500 trips.
func periodStore() *regiongraph.Store {
	s := &regiongraph.Store{Meta: regiongraph.Meta{Windows: []regiongraph.Window{{Name: "am"}, {Name: "pm"}}}}
	for d := 1; d <= 28; d++ {
		day := "2025-03-" + string(rune('0'+d/10)) + string(rune('0'+d%10))
		s.Edges = append(s.Edges, regiongraph.Edge{Day: testDay(day), Window: testWindowIndex("am"), From: 1, To: 2, Trips: d})
		s.Edges = append(s.Edges, regiongraph.Edge{Day: testDay(day), Window: testWindowIndex("pm"), From: 1, To: 2, Trips: 500})
	}
	return s
}

func TestCheckPeriods(t *testing.T) {
	store := periodStore()
	p := func(from, to string) ScanOptions { return ScanOptions{From: from, To: to} }
	for _, tc := range []struct {
		name          string
		before, after ScanOptions
		want          string // "" = no error
	}{
		{"apart", p("2025-03-01", "2025-03-10"), p("2025-03-15", "2025-03-28"), ""},
		{"touching is not overlapping", p("2025-03-01", "2025-03-14"), p("2025-03-15", "2025-03-28"), ""},
		{"open ends are the data's ends", p("", "2025-03-10"), p("2025-03-11", ""), ""},
		{"overlap", p("2025-03-01", "2025-03-16"), p("2025-03-15", "2025-03-28"), "overlap (2025-03-15 to 2025-03-16)"},
		{"after inside before", p("2025-03-01", "2025-03-28"), p("2025-03-10", "2025-03-12"), "overlap (2025-03-10 to 2025-03-12)"},
		{"open ends overlap", p("", ""), p("2025-03-20", ""), "overlap"},
		{"after runs past the data", p("2025-03-01", "2025-03-14"), p("2025-03-15", "2025-04-11"), "after period 2025-03-15..2025-04-11 reaches outside the data, which run from 2025-03-01 to 2025-03-28"},
		{"before starts before the data", p("2025-02-20", "2025-03-10"), p("2025-03-15", "2025-03-28"), "before period 2025-02-20..2025-03-10 reaches outside the data, which run from 2025-03-01 to 2025-03-28"},
		{"not a date", p("2025-3-1", "2025-03-10"), p("2025-03-15", "2025-03-28"), "before period: patterns: scan: from"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			err := CheckPeriods(store, tc.before, tc.after)
			if tc.want == "" {
				if err != nil {
					t.Fatalf("error %v, want none", err)
				}
				return
			}
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Fatalf("error %v, want one containing %q", err, tc.want)
			}
		})
	}
	if err := CheckPeriods(&regiongraph.Store{}, ScanOptions{}, ScanOptions{}); err == nil || !strings.Contains(err.Error(), "no edges") {
		t.Errorf("empty store: %v, want the store has no edges", err)
	}
}

func TestCheckFocus(t *testing.T) {
	// One region, a 0.01-degree square at 10 E, 50 N: about 716 m wide and
	// 1,112 m high (111.2 km per degree of latitude, x cos 50 deg for
	// longitude; from memory, checked by TestFocusGeometry's haversine).
	regions := &partition.Partition{Regions: []partition.Region{{ID: 1,
		Polygon: orb.Polygon{orb.Ring{{10, 50}, {10.01, 50}, {10.01, 50.01}, {10, 50.01}, {10, 50}}},
		Point:   orb.Point{10.005, 50.005}}}}
	for _, tc := range []struct {
		name   string
		point  orb.Point
		radius float64
		want   string
	}{
		{"inside", orb.Point{10.005, 50.005}, 0, ""},
		{"near, radius reaches", orb.Point{10.005, 50.02}, 1500, ""},
		{"near, radius short", orb.Point{10.005, 50.02}, 500, "nearest region is 1112 m away, beyond the focus radius of 500 m"},
		{"latitude first", orb.Point{50.005, 10.005}, 2000, "outside the study area"},
		{"850 km away", orb.Point{10.005, 57.65}, 5000, "lies outside the study area"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			pt := tc.point
			err := CheckFocus(&Focus{Point: &pt, RadiusMetres: tc.radius}, regions)
			if tc.want == "" {
				if err != nil {
					t.Fatalf("error %v, want none", err)
				}
				return
			}
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Fatalf("error %v, want one containing %q", err, tc.want)
			}
		})
	}
	if err := CheckFocus(&Focus{Regions: []int{7}}, regions); err != nil {
		t.Errorf("a focus by ids is Compare's to check: %v", err)
	}
}

func TestCheckPairs(t *testing.T) {
	store := periodStore()
	for _, tc := range []struct {
		name     string
		opts     ScanOptions
		minTrips int
		largest  int // 0 = no error
	}{
		{"some pairs kept", ScanOptions{From: "2025-03-01", To: "2025-03-10"}, 10, 0},
		{"too high for the period", ScanOptions{From: "2025-03-01", To: "2025-03-10"}, 11, 10},
		{"the other window has more", ScanOptions{Window: "pm"}, 400, 0},
		{"too high for the whole store", ScanOptions{}, 29, 28},
		{"weekdays only: Fri 2025-03-07 is the last", ScanOptions{From: "2025-03-01", To: "2025-03-09", Days: Weekdays}, 8, 7},
	} {
		t.Run(tc.name, func(t *testing.T) {
			tc.opts.Skyline.MinTrips = tc.minTrips
			err := CheckPairs(store, tc.opts)
			if tc.largest == 0 {
				if err != nil {
					t.Fatalf("error %v, want none", err)
				}
				return
			}
			var np *NoPairsError
			if !errors.As(err, &np) || np.Largest != tc.largest || np.MinTrips != tc.minTrips {
				t.Fatalf("error %#v, want a NoPairsError with largest %d", err, tc.largest)
			}
			if !strings.Contains(err.Error(), "a minimum of "+strconv.Itoa(tc.largest)+" or less keeps some") {
				t.Errorf("message %q does not give the largest value", err)
			}
		})
	}
	// CheckComparison names the period.
	before, after := ScanOptions{From: "2025-03-01", To: "2025-03-05"}, ScanOptions{From: "2025-03-06", To: "2025-03-28"}
	before.Skyline.MinTrips, after.Skyline.MinTrips = 6, 6
	err := CheckComparison(store, nil, before, after, CompareOptions{})
	var np *NoPairsError
	if !errors.As(err, &np) || np.Period != "before" || np.Largest != 5 {
		t.Errorf("comparison: %v, want the before period with largest 5", err)
	}
}
