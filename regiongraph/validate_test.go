package regiongraph

import (
	"strings"
	"testing"
)

func TestOptionsValidate(t *testing.T) {
	tests := []struct {
		name string
		edit func(*Options)
		want string // "" for valid
	}{
		{"defaults", func(*Options) {}, ""},
		{"empty zone is UTC", func(o *Options) { o.TimeZone = "" }, ""},
		{"unknown zone", func(o *Options) { o.TimeZone = "Mars/Olympus" }, "unknown time zone"},
		{"repeated window", func(o *Options) { o.Windows = append(o.Windows, o.Windows[0]) }, "given twice"},
		{"unit", func(o *Options) { o.DistanceUnit = "ft" }, "distance unit"},
		{"column", func(o *Options) { o.Columns = map[string]string{"pickup": "x"} }, "unknown column"},
		{"negative detour", func(o *Options) { o.MinDetour = -1 }, "MinDetour"},
		{"zero jump", func(o *Options) { o.MaxJumpKMH = 0 }, "MaxJumpKMH"},
		{"zero duration", func(o *Options) { o.MaxDuration = 0 }, "MaxDuration"},
		{"speeds reversed", func(o *Options) { o.MinSpeedKMH, o.MaxSpeedKMH = 50, 40 }, "above MaxSpeedKMH"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			o := DefaultOptions()
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
