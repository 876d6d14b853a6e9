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

// maxErrorText is the most characters of an error message printed: the
// libraries quote only short excerpts of files, and this bounds what any
// message, a library's or another's, can bring to a terminal or a log.
const maxErrorText = 2000

// errorText is err's message as printed: control characters replaced (see
// terminalText; line breaks kept, some messages list items a line each)
// and cut at maxErrorText characters.
func errorText(err error) string {
	lines := strings.Split(err.Error(), "\n")
	for i, l := range lines {
		lines[i] = terminalText(l)
	}
	s := strings.Join(lines, "\n")
	if n := 0; len(s) > maxErrorText {
		for i := range s {
			if n == maxErrorText {
				return s[:i] + "... (cut)"
			}
			n++
		}
	}
	return s
}
