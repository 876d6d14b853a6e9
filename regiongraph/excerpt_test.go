package regiongraph

import (
	"strings"
	"testing"
	"unicode"
)

// hostileText is what a file given as input may hold to harm a terminal
// or a log: escape sequences that retitle and clear the terminal, a
// bidirectional override, a bell, and length.
const hostileText = "\x1b]0;owned\x07\x1b[2J\u202eevil\u0085" + "root:x:0:0:root:/root:/bin/bash"

// checkExcerpt asserts an error message quotes no control character and
// stays short.
func checkExcerpt(t *testing.T, what string, err error, longest int) {
	t.Helper()
	if err == nil {
		t.Fatalf("%s: no error", what)
	}
	msg := err.Error()
	if i := strings.IndexFunc(msg, func(r rune) bool { return unicode.IsControl(r) || r == '\u202e' }); i >= 0 {
		t.Errorf("%s: message has control character %q at %d: %q", what, msg[i:i+1], i, msg)
	}
	if len(msg) > longest {
		t.Errorf("%s: message is %d bytes, want at most %d: %.200q...", what, len(msg), longest, msg)
	}
}

func TestErrorsQuoteShortCleanExcerpts(t *testing.T) {
	p := gridPartition(2, 2, 13.0, 52.0, 0.02)
	long := strings.Repeat("x", 20000)
	// A header line of 20 kB: the missing-column error lists the header.
	t.Run("header", func(t *testing.T) {
		header := hostileText + "," + long + strings.Repeat(",col", 2000) + "\n1,2\n"
		_, err := ingestString(t, p, FormatTrips, header, DefaultOptions())
		checkExcerpt(t, "header", err, 1000)
		if err != nil && !strings.Contains(err.Error(), "missing column") {
			t.Errorf("error %v, want the missing column named", err)
		}
	})
	// A value that does not parse, under strict: the row error quotes it.
	t.Run("value", func(t *testing.T) {
		opts := DefaultOptions()
		opts.Strict = true
		csv := tripHeader + "r1,2024-01-01T08:00:00Z,2024-01-01T08:10:00Z," + hostileText + long + ",52.001,13.03,52.001,2000\n"
		_, err := ingestString(t, p, FormatTrips, csv, opts)
		checkExcerpt(t, "value", err, 400)
		if err != nil && !strings.Contains(err.Error(), "trips.csv:2") {
			t.Errorf("error %v, want the file and line", err)
		}
	})
}

func TestExcerpt(t *testing.T) {
	for _, tc := range []struct {
		in   string
		n    int
		want string
	}{
		{"plain", 10, "plain"},
		{"exactly10!", 10, "exactly10!"},
		{"eleven char", 10, "eleven cha..."},
		{"a\x1b[2Jb", 10, "a?[2Jb"},
		{"\u202eabc\u0085", 10, "?abc?"},
		{"bad\xffutf8", 10, "bad?utf8"},
		{"Straße", 5, "Straß..."},
	} {
		if got := excerpt(tc.in, tc.n); got != tc.want {
			t.Errorf("excerpt(%q, %d) = %q, want %q", tc.in, tc.n, got, tc.want)
		}
	}
	if got := listExcerpt(strings.Split(strings.Repeat("column,", 500), ",")); !strings.HasSuffix(got, "more)") || len(got) > maxListExcerpt+100 {
		t.Errorf("listExcerpt of 501 names: %d bytes, %q", len(got), got[len(got)-30:])
	}
}
