package main

import (
	"bytes"
	"encoding/json"
	"strings"
	"testing"

	"narrows/partition/geodesy"
	"narrows/patterns"
)

// TestFindingsJSONRounded: findings.json carries each number rounded for
// its meaning, with no float noise, from values that have plenty of it.
func TestFindingsJSONRounded(t *testing.T) {
	days := []string{"2026-03-02", "2026-03-03", "2026-03-04"}
	e := patterns.FindingEdge{From: 18, To: 24, Days: days[:1], Share: 1.0 / 3,
		TripsMedian: 205.5, SpeedMedian: geodesy.MPS(30.000000000000004) / 1.5, DetourMedian: 1.23456,
		ExtraKMPerWeakDay: 0.1 + 0.2, ExtraHoursPerWeakDay: 43.215, ExtraKMPerDay: 100.0 / 3, ExtraHoursPerDay: 2.0 / 3}
	sc := &patterns.Scan{Window: "am-peak", Days: days, Findings: []patterns.Finding{{
		Rank: 1, ID: "18>24", Regions: []int{18, 24}, Days: days[:1], Share: 1.0 / 3,
		ExtraKMPerDay: 100.0 / 3, ExtraHoursPerDay: 2.0 / 3, Edges: []patterns.FindingEdge{e},
		Groups: []patterns.RecurringGroup{{Edges: []patterns.EdgeKey{{From: 18, To: 24}}, Days: days[:1], Share: 1.0 / 3}},
	}}}
	var buf bytes.Buffer
	if err := writeFindingsJSON(&buf, sc, nil); err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Total    float64 `json:"total_extra_vehicle_hours_per_day"`
		TotalKM  float64 `json:"total_extra_vehicle_km_per_day"`
		Findings []struct {
			Share float64                      `json:"share"`
			Hours float64                      `json:"extra_vehicle_hours_per_day"`
			Edges []map[string]json.RawMessage `json:"edges"`
		} `json:"findings"`
	}
	if err := json.Unmarshal(buf.Bytes(), &doc); err != nil {
		t.Fatal(err)
	}
	// The expected values are the inputs rounded by hand.
	edge := doc.Findings[0].Edges[0]
	for key, want := range map[string]string{
		"share": "0.33", "trips_median": "206", "speed_kmh_median": "20", "detour_median": "1.23",
		"extra_vehicle_km_per_weak_day": "0.3", "extra_vehicle_hours_per_weak_day": "43.22",
		"extra_vehicle_km_per_day": "33.3", "extra_vehicle_hours_per_day": "0.67",
	} {
		if got := string(edge[key]); got != want {
			t.Errorf("edge %s = %s, want %s", key, got, want)
		}
	}
	if f := doc.Findings[0]; f.Share != 0.33 || f.Hours != 0.67 || doc.Total != 0.67 || doc.TotalKM != 33.3 {
		t.Errorf("finding share %v, hours %v, totals %v veh-h %v veh-km; want 0.33, 0.67, 0.67, 33.3", f.Share, f.Hours, doc.Total, doc.TotalKM)
	}
	// No number anywhere with more than four decimals.
	for _, field := range strings.FieldsFunc(buf.String(), func(r rune) bool { return strings.ContainsRune(" ,:\n[]{}", r) }) {
		if i := strings.IndexByte(field, '.'); i >= 0 && !strings.Contains(field, `"`) && len(field)-i-1 > 4 {
			t.Errorf("float noise in findings.json: %s", field)
		}
	}
}

func TestRoundFor(t *testing.T) {
	for _, tc := range []struct {
		x    float64
		d    int
		want float64
	}{
		{205.5, 0, 206}, {-205.5, 0, -206}, {30.000000000000004, 1, 30}, {1.005, 2, 1}, {-0.001, 2, 0}, {0.1 + 0.2, 1, 0.3},
	} {
		if got := roundFor(tc.x, tc.d); got != tc.want {
			t.Errorf("roundFor(%v, %d) = %v, want %v", tc.x, tc.d, got, tc.want)
		}
	}
}
