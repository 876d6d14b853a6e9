package patterns

import (
	"fmt"
	"strings"
	"time"
)

// ParsePeriod parses a period written "FROM..TO" (inclusive local days
// YYYY-MM-DD, as ScanOptions.From and To), the form study files and the
// command line use.
func ParsePeriod(s string) (from, to string, err error) {
	a, b, ok := strings.Cut(s, "..")
	if !ok {
		return "", "", fmt.Errorf("want FROM..TO such as 2026-03-02..2026-03-29, got %q", s)
	}
	for _, d := range []string{a, b} {
		if _, err := time.Parse(time.DateOnly, d); err != nil {
			return "", "", fmt.Errorf("%q is not a date YYYY-MM-DD", d)
		}
	}
	if a > b {
		return "", "", fmt.Errorf("period %q ends before it starts", s)
	}
	return a, b, nil
}
