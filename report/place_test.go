package report

import (
	"testing"

	"narrows/partition"
	"narrows/patterns"
)

func TestPlaceName(t *testing.T) {
	road := func(names ...string) []partition.BorderRoad {
		var rs []partition.BorderRoad
		for _, n := range names {
			rs = append(rs, partition.BorderRoad{Name: n, LengthKM: 1})
		}
		return rs
	}
	unnamed := &partition.Partition{Regions: []partition.Region{
		{ID: 1, BorderRoads: road("Orvel", "Bittern Road")},
		{ID: 2, BorderRoads: road("Amble Road", "Orvel")},
		{ID: 3, BorderRoads: road("Juniper Avenue")},
		{ID: 4},
	}}
	named := &partition.Partition{Regions: []partition.Region{
		{ID: 1, Name: "Northbank housing", BorderRoads: road("Orvel", "Bittern Road")},
		{ID: 2, Name: "Southbank works", BorderRoads: road("Amble Road", "Orvel")},
		{ID: 3, Name: "Hazel Heath", BorderRoads: road("Juniper Avenue")},
		{ID: 4},
	}}
	finding := func(pairs ...[2]int) patterns.Finding {
		f := patterns.Finding{ID: "f"}
		for i, p := range pairs {
			f.Edges = append(f.Edges, patterns.FindingEdge{From: p[0], To: p[1], ExtraHoursPerDay: float64(10 - i)})
		}
		return f
	}
	tests := []struct {
		name    string
		regions *partition.Partition
		f       patterns.Finding
		want    string
	}{
		{"shared barrier, border roads", unnamed, finding([2]int{1, 2}, [2]int{2, 1}), "across the Orvel between Bittern Road and Amble Road"},
		{"shared barrier, region names", named, finding([2]int{1, 2}, [2]int{2, 1}), "across the Orvel between Northbank housing and Southbank works"},
		{"nothing shared", unnamed, finding([2]int{1, 3}), "between Orvel and Juniper Avenue"},
		{"nothing shared, names", named, finding([2]int{3, 1}), "between Northbank housing and Hazel Heath"},
		{"more pairs", named, finding([2]int{1, 2}, [2]int{1, 3}), "across the Orvel between Northbank housing and Southbank works and 1 more pair"},
		{"no name, no border", unnamed, finding([2]int{3, 4}), "between Juniper Avenue and region 4"},
		{"no edges", named, patterns.Finding{ID: "18>24"}, "18>24"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := PlaceName(tc.f, tc.regions); got != tc.want {
				t.Errorf("PlaceName = %q, want %q", got, tc.want)
			}
		})
	}
}
