package main

import (
	"strings"
	"unicode"
)

// isControl reports whether r is a control character: C0, DEL, C1 (which
// holds the terminal's CSI), or a bidirectional override that reorders
// what a terminal shows.
func isControl(r rune) bool {
	return unicode.IsControl(r) || (r >= 0x202a && r <= 0x202e) || (r >= 0x2066 && r <= 0x2069)
}

// terminalText returns s with every control character replaced by "?", so
// that a road or region name taken from a file cannot move the cursor,
// retitle or clear the terminal it is printed on.
func terminalText(s string) string {
	if !strings.ContainsFunc(s, isControl) {
		return s
	}
	return strings.Map(func(r rune) rune {
		if isControl(r) {
			return '?'
		}
		return r
	}, s)
}
