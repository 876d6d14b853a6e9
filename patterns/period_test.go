package patterns

import "testing"

func TestParsePeriod(t *testing.T) {
	tests := []struct {
		in       string
		from, to string
		ok       bool
	}{
		{"2026-03-02..2026-03-29", "2026-03-02", "2026-03-29", true},
		{"2026-03-02..2026-03-02", "2026-03-02", "2026-03-02", true},
		{"2026-03-29..2026-03-02", "", "", false}, // ends before it starts
		{"2026-03-02", "", "", false},             // no ".."
		{"2026-02-30..2026-03-02", "", "", false}, // no such day
		{"2026-3-2..2026-3-29", "", "", false},    // not YYYY-MM-DD
		{"..", "", "", false},
	}
	for _, tc := range tests {
		from, to, err := ParsePeriod(tc.in)
		if (err == nil) != tc.ok || from != tc.from || to != tc.to {
			t.Errorf("ParsePeriod(%q) = %q, %q, %v; want %q, %q, ok %v", tc.in, from, to, err, tc.from, tc.to, tc.ok)
		}
	}
}
