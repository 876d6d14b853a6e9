package report

import (
	"image/color"

	"narrows/patterns"
)

// look is how a verdict is drawn. Colours are from the Okabe-Ito palette,
// which stays distinguishable under the common forms of colour blindness;
// dash patterns repeat the distinction without colour.
type look struct {
	Hex  string // fill / stroke, "#rrggbb"
	Text string // readable text colour on Hex
	Dash string // SVG stroke-dasharray, "" for solid
}

func lookOf(vd patterns.Verdict) look {
	switch vd {
	case patterns.Cleared:
		return look{"#009E73", "#FFFFFF", "7 4"} // bluish green, dashed: gone
	case patterns.Eased:
		return look{"#56B4E9", "#000000", ""} // sky blue
	case patterns.Unchanged:
		return look{"#E69F00", "#000000", ""} // orange
	case patterns.Worse:
		return look{"#D55E00", "#FFFFFF", ""} // vermillion
	case patterns.New:
		return look{"#CC79A7", "#000000", "4 3"} // reddish purple, dotted
	case "":
		return look{"#0072B2", "#FFFFFF", ""} // blue: a finding without comparison
	}
	return look{"#000000", "#FFFFFF", "1 2"}
}

// Map colours for the base layer.
const (
	regionFill   = "#EEEEEE"
	focusFill    = "#F0E442" // Okabe-Ito yellow, drawn light via opacity in SVG
	focusFillPNG = "#F9F3B5" // the same yellow blended with white
	regionStroke = "#9E9E9E"
)

// rgba parses "#rrggbb"; malformed input gives black.
func rgba(hex string) color.RGBA {
	if len(hex) != 7 || hex[0] != '#' {
		return color.RGBA{A: 255}
	}
	var c [3]uint8
	for i := range c {
		hi, ok1 := hexDigit(hex[1+2*i])
		lo, ok2 := hexDigit(hex[2+2*i])
		if !ok1 || !ok2 {
			return color.RGBA{A: 255}
		}
		c[i] = hi<<4 | lo
	}
	return color.RGBA{c[0], c[1], c[2], 255}
}

func hexDigit(b byte) (uint8, bool) {
	switch {
	case b >= '0' && b <= '9':
		return b - '0', true
	case b >= 'a' && b <= 'f':
		return b - 'a' + 10, true
	case b >= 'A' && b <= 'F':
		return b - 'A' + 10, true
	}
	return 0, false
}
