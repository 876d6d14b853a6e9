package report

import (
	"fmt"
	"image"
	"image/color"
	"math"
	"strconv"
	"strings"

	"narrows/partition/geodesy"
)

// scaleBar is the map's scale bar in pixels: a bar of Px pixels standing
// for Metres, labelled Label, with its left end at (X, Y).
type scaleBar struct {
	X, Y, Px, Metres float64
	Label            string
}

// metresPerPixel is the ground distance of one pixel. The projection is
// equirectangular about the mean latitude with x scaled by its cosine, so
// a pixel is the same length both ways: 1/scale degrees of latitude.
func (p projection) metresPerPixel() float64 {
	return geodesy.EarthRadiusMetres * math.Pi / 180 / p.scale
}

// niceLength returns the largest 1, 2 or 5 times a power of ten not
// above x (x > 0), the lengths a reader adds up at a glance.
func niceLength(x float64) float64 {
	if !(x > 0) || !finite(x) {
		return 0
	}
	k := math.Pow(10, math.Floor(math.Log10(x)))
	for _, m := range []float64{5, 2, 1} {
		if m*k <= x*(1+1e-9) {
			return m * k
		}
	}
	return k
}

// lengthLabel writes a ground length as "500 m" or "2 km".
func lengthLabel(m float64) string {
	if m >= 1000 {
		return strconv.FormatFloat(m/1000, 'f', -1, 64) + " km"
	}
	return strconv.FormatFloat(m, 'f', -1, 64) + " m"
}

// scaleBar places a bar of about a fifth of the map's width at its
// bottom-left corner; ok is false when the map has no usable scale.
func (p projection) scaleBar() (scaleBar, bool) {
	mpp := p.metresPerPixel()
	inner := float64(p.W - 2*mapPad)
	metres := niceLength(inner / 5 * mpp)
	if metres <= 0 || !finite(mpp) || inner < 60 {
		return scaleBar{}, false
	}
	return scaleBar{X: mapPad + 8, Y: float64(p.H-mapPad) - 10, Px: metres / mpp, Metres: metres, Label: lengthLabel(metres)}, true
}

// Box is the area the scale bar and its label cover, for label placement.
func (s scaleBar) Box() labelBox {
	return labelBox{X: s.X - 4, Y: s.Y - 14, W: math.Max(s.Px, float64(len(s.Label))*7) + 8, H: 22}
}

// northArrow is the north arrow's place: its tip at (X, Y); north is up
// on these maps.
type northArrow struct{ X, Y float64 }

func (p projection) northArrow() northArrow {
	return northArrow{X: float64(p.W-mapPad) - 14, Y: mapPad + 6}
}

// Box is the area the arrow and its "N" cover.
func (n northArrow) Box() labelBox { return labelBox{X: n.X - 9, Y: n.Y - 2, W: 18, H: 32} }

// scaleAndNorthSVG draws the scale bar (bottom-left) and the north arrow
// (top-right) on white backings.
func scaleAndNorthSVG(b *strings.Builder, p projection) {
	if sb, ok := p.scaleBar(); ok {
		bx := sb.Box()
		fmt.Fprintf(b, `<g id="scale-bar" data-metres="%s" font-family="sans-serif" font-size="10" fill="#000000"><rect x="%s" y="%s" width="%s" height="%s" fill="#FFFFFF" fill-opacity="0.85"/>`,
			strconv.FormatFloat(sb.Metres, 'f', -1, 64), fmtPx(bx.X), fmtPx(bx.Y), fmtPx(bx.W), fmtPx(bx.H))
		fmt.Fprintf(b, `<path d="M%s,%sL%s,%sL%s,%sL%s,%s" fill="none" stroke="#000000" stroke-width="1.5"/>`,
			fmtPx(sb.X), fmtPx(sb.Y-4), fmtPx(sb.X), fmtPx(sb.Y), fmtPx(sb.X+sb.Px), fmtPx(sb.Y), fmtPx(sb.X+sb.Px), fmtPx(sb.Y-4))
		fmt.Fprintf(b, `<text x="%s" y="%s">%s</text></g>`, fmtPx(sb.X), fmtPx(sb.Y-5), xmlText(sb.Label))
	}
	n := p.northArrow()
	fmt.Fprintf(b, `<g id="north-arrow" font-family="sans-serif" font-size="11" font-weight="bold" text-anchor="middle"><path d="M%s,%sL%s,%sL%s,%sL%s,%sz" fill="#000000" stroke="#FFFFFF" stroke-width="1"/><text x="%s" y="%s" fill="#000000" stroke="#FFFFFF" stroke-width="2.5" paint-order="stroke">N</text></g>`,
		fmtPx(n.X), fmtPx(n.Y), fmtPx(n.X+6), fmtPx(n.Y+16), fmtPx(n.X), fmtPx(n.Y+12), fmtPx(n.X-6), fmtPx(n.Y+16), fmtPx(n.X), fmtPx(n.Y+28))
}

// scaleAndNorthPNG draws the same scale bar and north arrow into img.
func scaleAndNorthPNG(img *image.RGBA, p projection) {
	black := color.RGBA{A: 255}
	if sb, ok := p.scaleBar(); ok {
		bx := sb.Box()
		fillPolygon(img, [][][2]float64{{{bx.X, bx.Y}, {bx.X + bx.W, bx.Y}, {bx.X + bx.W, bx.Y + bx.H}, {bx.X, bx.Y + bx.H}}}, color.RGBA{255, 255, 255, 255})
		drawLine(img, sb.X, sb.Y, sb.X+sb.Px, sb.Y, 0.8, black)
		drawLine(img, sb.X, sb.Y-4, sb.X, sb.Y, 0.8, black)
		drawLine(img, sb.X+sb.Px, sb.Y-4, sb.X+sb.Px, sb.Y, 0.8, black)
		drawText(img, sb.Label, int(sb.X), int(sb.Y)-13, black)
	}
	n := p.northArrow()
	fillPolygon(img, [][][2]float64{{{n.X, n.Y}, {n.X + 6, n.Y + 16}, {n.X, n.Y + 12}, {n.X - 6, n.Y + 16}}}, black)
	drawText(img, "N", int(n.X)-2, int(n.Y)+19, black)
}
