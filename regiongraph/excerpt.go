package regiongraph

import (
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"
)

// Errors quote what a file holds (a header, a value that did not parse) so
// that the user can find it, but only a short excerpt with its control
// characters replaced: the message ends up on terminals and in logs, and
// the file may be anything the user was given, even a file that is not
// data at all.

// maxExcerpt is the most characters of one piece of a file an error
// quotes; maxListExcerpt the most of a list of pieces (a header's names).
const (
	maxExcerpt     = 60
	maxListExcerpt = 300
)

// excerpt returns at most n characters of s, "..." marking a cut, with
// control characters (C0, DEL, C1, the bidirectional overrides and
// isolates) and invalid UTF-8 each replaced by "?".
func excerpt(s string, n int) string {
	var b strings.Builder
	count := 0
	for i, r := range s {
		if count == n {
			if i < len(s) {
				b.WriteString("...")
			}
			break
		}
		if r == utf8.RuneError || unicode.IsControl(r) || (r >= 0x202a && r <= 0x202e) || (r >= 0x2066 && r <= 0x2069) {
			r = '?'
		}
		b.WriteRune(r)
		count++
	}
	return b.String()
}

// listExcerpt joins the excerpts of items with ", " up to about
// maxListExcerpt characters, then says how many more there are.
func listExcerpt(items []string) string {
	var b strings.Builder
	for i, it := range items {
		if b.Len() > maxListExcerpt {
			b.WriteString(", ... (" + strconv.Itoa(len(items)-i) + " more)")
			break
		}
		if i > 0 {
			b.WriteString(", ")
		}
		b.WriteString(excerpt(it, maxExcerpt))
	}
	return b.String()
}
