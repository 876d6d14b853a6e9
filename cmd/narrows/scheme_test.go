package main

import (
	"strings"
	"testing"
)

func TestParseScheme(t *testing.T) {
	tests := []struct {
		in      string
		ways    int
		points  int
		extract string
		err     string
	}{
		{"", 0, 0, "", ""},
		{"way/79", 1, 0, "", ""},
		{"way/79 way/80", 2, 0, "", ""},
		{"0.86,0.64 0.87,0.65", 0, 2, "", ""},
		{"town/after.osm", 0, 0, "town/after.osm", ""},
		{"way/0", 0, 0, "", "not an OSM way id"},
		{"way/79 80", 0, 0, "", "not an OSM way id"},
		{"0.86,0.64", 0, 0, "", "two or more"},
		{"0.86,0.64 181,0", 0, 0, "", "not a longitude,latitude pair"},
		{"a.osm b.osm", 0, 0, "", "want way/N ids"},
	}
	for _, tc := range tests {
		spec, err := parseScheme(tc.in)
		if tc.err != "" {
			if err == nil || !strings.Contains(err.Error(), tc.err) {
				t.Errorf("parseScheme(%q) error %v, want %q", tc.in, err, tc.err)
			}
			continue
		}
		if err != nil || len(spec.ways) != tc.ways || len(spec.line) != tc.points || spec.extract != tc.extract {
			t.Errorf("parseScheme(%q) = %+v, %v", tc.in, spec, err)
		}
	}
}

// FuzzParseScheme: any text gives a spec of exactly one form or an error,
// never a panic.
func FuzzParseScheme(f *testing.F) {
	for _, s := range []string{"way/79", "0.86,0.64 0.87,0.65", "town/after.osm", "way/-1", "1,2,3 4,5", "NaN,1 2,3"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		spec, err := parseScheme(s)
		if err != nil {
			return
		}
		forms := 0
		if len(spec.ways) > 0 {
			forms++
		}
		if len(spec.line) > 0 {
			forms++
			if len(spec.line) < 2 {
				t.Errorf("%q: a line of %d points", s, len(spec.line))
			}
		}
		if spec.extract != "" {
			forms++
		}
		if forms > 1 || (forms == 0 && strings.TrimSpace(s) != "") {
			t.Errorf("%q: %d forms in %+v", s, forms, spec)
		}
	})
}
