package report

import (
	"image"
	"image/color"
	"strconv"
)

// The map picture carries the region ids, like the SVG map, so that a
// reader of the workbook can find a region named in a table. The PNG is
// drawn without a font library, so the ids use a 5x7 pixel bitmap of the
// digits and the minus sign, drawn with a one-pixel white halo so that they
// stay legible over borders and arrows.
const (
	glyphW, glyphH = 5, 7
	glyphGap       = 1
)

// glyphs holds the rows of each character, most significant of five bits
// leftmost.
var glyphs = map[rune][glyphH]uint8{
	'0': {0b01110, 0b10001, 0b10011, 0b10101, 0b11001, 0b10001, 0b01110},
	'1': {0b00100, 0b01100, 0b00100, 0b00100, 0b00100, 0b00100, 0b01110},
	'2': {0b01110, 0b10001, 0b00001, 0b00010, 0b00100, 0b01000, 0b11111},
	'3': {0b11111, 0b00010, 0b00100, 0b00010, 0b00001, 0b10001, 0b01110},
	'4': {0b00010, 0b00110, 0b01010, 0b10010, 0b11111, 0b00010, 0b00010},
	'5': {0b11111, 0b10000, 0b11110, 0b00001, 0b00001, 0b10001, 0b01110},
	'6': {0b00110, 0b01000, 0b10000, 0b11110, 0b10001, 0b10001, 0b01110},
	'7': {0b11111, 0b00001, 0b00010, 0b00100, 0b01000, 0b01000, 0b01000},
	'8': {0b01110, 0b10001, 0b10001, 0b01110, 0b10001, 0b10001, 0b01110},
	'9': {0b01110, 0b10001, 0b10001, 0b01111, 0b00001, 0b00010, 0b01100},
	'-': {0, 0, 0, 0b11111, 0, 0, 0},
}

// labelPixels returns the pixels of text drawn with its top-left corner at
// (x0, y0); characters without a glyph are left out.
func labelPixels(text string, x0, y0 int) []image.Point {
	var pts []image.Point
	x := x0
	for _, r := range text {
		g, ok := glyphs[r]
		if !ok {
			continue
		}
		for row, bits := range g {
			for col := 0; col < glyphW; col++ {
				if bits&(1<<(glyphW-1-col)) != 0 {
					pts = append(pts, image.Pt(x+col, y0+row))
				}
			}
		}
		x += glyphW + glyphGap
	}
	return pts
}

// drawRegionLabel draws id centred horizontally on (cx, cy), just below
// it, in c with a white halo.
func drawRegionLabel(img *image.RGBA, id int, cx, cy float64, c color.RGBA) {
	if !finite(cx) || !finite(cy) {
		return
	}
	text := strconv.Itoa(id)
	w := len(text)*(glyphW+glyphGap) - glyphGap
	b := img.Bounds()
	x0 := clampInt(cx-float64(w)/2, b.Min.X-w, b.Max.X)
	y0 := clampInt(cy+4, b.Min.Y-glyphH, b.Max.Y)
	pts := labelPixels(text, x0, y0)
	white := color.RGBA{255, 255, 255, 255}
	for _, p := range pts {
		for dy := -1; dy <= 1; dy++ {
			for dx := -1; dx <= 1; dx++ {
				if q := p.Add(image.Pt(dx, dy)); q.In(b) {
					img.SetRGBA(q.X, q.Y, white)
				}
			}
		}
	}
	for _, p := range pts {
		if p.In(b) {
			img.SetRGBA(p.X, p.Y, c)
		}
	}
}
