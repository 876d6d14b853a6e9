package patterns

import (
	"strings"
	"testing"

	"github.com/paulmach/orb"
)

func TestScanOptionsValidate(t *testing.T) {
	tests := []struct {
		name string
		edit func(*ScanOptions)
		want string // "" for valid
	}{
		{"defaults", func(*ScanOptions) {}, ""},
		{"period", func(o *ScanOptions) { o.From, o.To = "2026-03-02", "2026-03-29" }, ""},
		{"days", func(o *ScanOptions) { o.Days = "mondays" }, "days"},
		{"support", func(o *ScanOptions) { o.Support = 1.5 }, "support"},
		{"group size", func(o *ScanOptions) { o.MaxGroupEdges = -1 }, "max group edges"},
		{"unbounded groups", func(o *ScanOptions) { o.MaxGroupEdges = 0 }, "max group edges"},
		{"min trips", func(o *ScanOptions) { o.Skyline.MinTrips = 0 }, "min trips"},
		{"k", func(o *ScanOptions) { o.Skyline.K = 0 }, "k 0"},
		{"one trip, plain skyline, one edge", func(o *ScanOptions) { o.Skyline.MinTrips, o.Skyline.K, o.MaxGroupEdges = 1, 1, 1 }, ""},
		{"reference speed", func(o *ScanOptions) { o.ReferenceSpeed = 0 }, "reference speed"},
		{"from", func(o *ScanOptions) { o.From = "2026-13-01" }, "from"},
		{"to", func(o *ScanOptions) { o.To = "soon" }, "to"},
		{"reversed", func(o *ScanOptions) { o.From, o.To = "2026-03-29", "2026-03-02" }, "is after"},
		{"exclude", func(o *ScanOptions) { o.Exclude = []string{"2026-03-03", "3/4"} }, "excluded day 2"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			o := DefaultScanOptions()
			tc.edit(&o)
			err := o.Validate()
			switch {
			case tc.want == "" && err != nil:
				t.Errorf("Validate: %v", err)
			case tc.want != "" && (err == nil || !strings.Contains(err.Error(), tc.want)):
				t.Errorf("Validate: %v, want an error about %q", err, tc.want)
			}
		})
	}
}

func TestCompareOptionsValidate(t *testing.T) {
	pt := orb.Point{8.5, 0.7}
	far := orb.Point{200, 0}
	tests := []struct {
		name string
		edit func(*CompareOptions)
		want string // "" for valid
	}{
		{"defaults", func(*CompareOptions) {}, ""},
		{"focus point", func(o *CompareOptions) { o.Focus = &Focus{Point: &pt, RadiusMetres: 600} }, ""},
		{"focus regions", func(o *CompareOptions) { o.Focus = &Focus{Regions: []int{12, 15}} }, ""},
		{"alpha", func(o *CompareOptions) { o.Alpha = 1 }, "alpha"},
		{"material cost", func(o *CompareOptions) { o.MaterialCost = -1 }, "material cost"},
		{"focus off the globe", func(o *CompareOptions) { o.Focus = &Focus{Point: &far, RadiusMetres: 600} }, "not a WGS84"},
		{"negative radius", func(o *CompareOptions) { o.Focus = &Focus{Point: &pt, RadiusMetres: -1} }, "radius"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			o := DefaultCompareOptions()
			tc.edit(&o)
			err := o.Validate()
			switch {
			case tc.want == "" && err != nil:
				t.Errorf("Validate: %v", err)
			case tc.want != "" && (err == nil || !strings.Contains(err.Error(), tc.want)):
				t.Errorf("Validate: %v, want an error about %q", err, tc.want)
			}
		})
	}
}
