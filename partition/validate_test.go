package partition

import (
	"math"
	"strings"
	"testing"

	"github.com/paulmach/orb"
)

func TestOptionsValidate(t *testing.T) {
	bad := orb.Bound{Min: orb.Point{2, 0}, Max: orb.Point{1, 1}}
	tests := []struct {
		name string
		edit func(*Options)
		want string // "" for valid
	}{
		{"defaults", func(*Options) {}, ""},
		{"barriers only", func(o *Options) { o.Roads, o.Barriers = nil, []string{"river"} }, ""},
		{"nothing bounds", func(o *Options) { o.Roads, o.Barriers = nil, nil }, "no road classes or barriers"},
		{"bad road", func(o *Options) { o.Roads = []string{"a b"} }, "road class"},
		{"unknown barrier", func(o *Options) { o.Barriers = []string{"wall"} }, "unknown barrier"},
		{"negative snap", func(o *Options) { o.SnapMetres = -1 }, "snap distance"},
		{"NaN area", func(o *Options) { o.MinAreaKM2 = math.NaN() }, "minimum area"},
		{"compactness over 1", func(o *Options) { o.MinCompactness = 1.5 }, "above 1"},
		{"reversed bbox", func(o *Options) { o.BBox = &bad }, "bbox"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			o := DefaultOptions()
			tc.edit(&o)
			err := o.Validate()
			switch {
			case tc.want == "" && err != nil:
				t.Errorf("Validate: %v", err)
			case tc.want != "" && (err == nil || !strings.Contains(err.Error(), tc.want) || !strings.HasPrefix(err.Error(), "partition: ")):
				t.Errorf("Validate: %v, want an error about %q", err, tc.want)
			}
		})
	}
}
