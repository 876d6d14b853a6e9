package report

import (
	"fmt"
	"image"
	"image/color"
	"math"
	"strconv"
	"strings"
	"unicode/utf8"
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
	'N': {0b10001, 0b11001, 0b10101, 0b10101, 0b10011, 0b10001, 0b10001},
	'k': {0b10000, 0b10000, 0b10010, 0b10100, 0b11000, 0b10100, 0b10010},
	'm': {0, 0, 0b11010, 0b10101, 0b10101, 0b10101, 0b10101},
	'.': {0, 0, 0, 0, 0, 0b01100, 0b01100},
	' ': {},
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
	drawText(img, text, clampInt(cx-float64(w)/2, b.Min.X-w, b.Max.X), clampInt(cy+4, b.Min.Y-glyphH, b.Max.Y), c)
}

// labelBox is a label's box in map pixels, top-left corner and size.
type labelBox struct{ X, Y, W, H float64 }

func (a labelBox) overlaps(b labelBox) bool {
	return a.X < b.X+b.W && b.X < a.X+a.W && a.Y < b.Y+b.H && b.Y < a.Y+a.H
}

// Label kinds, also the SVG groups' ids.
const (
	labelRegion  = "region-labels"
	labelFinding = "finding-labels"
	labelScheme  = "scheme-label"
)

// mapLabel is a placed label. Boxes are measured for the SVG's fonts with
// a generous width per character (0.6 em; sans-serif digits and most
// letters are narrower), so that glyphs never spill out of their box; the
// PNG draws smaller bitmap text inside the same boxes.
type mapLabel struct {
	Kind   string
	Lines  []string // text, one entry per line
	Short  string   // what the PNG writes (digits only)
	Box    labelBox
	AX, AY float64 // the point labelled
	Hex    string  // frame colour of a finding's callout
	Title  string  // hover text
	Region int     // region id of a region label
}

// Label fonts in pixels.
const (
	regionFontPx  = 9
	findingFontPx = 10
	charEm        = 0.6 // box width per character, in em
	maxCallouts   = 6   // findings labelled on the map; the tables list all
	calloutWrap   = 38  // characters per line of a callout
)

// textBox is the size of lines of text at font px with pad on each side.
func textBox(lines []string, px, pad float64) (w, h float64) {
	for _, l := range lines {
		w = math.Max(w, float64(utf8.RuneCountInString(l))*px*charEm)
	}
	return w + 2*pad, float64(len(lines))*(px+2) + 2*pad
}

// candidates are the boxes tried for a w x h label of the point (ax, ay),
// nearest first: below, above, right, left, then the diagonals, at each
// distance in turn.
func candidates(ax, ay, w, h float64, dists []float64) []labelBox {
	var out []labelBox
	for _, d := range dists {
		out = append(out,
			labelBox{ax - w/2, ay + d, w, h},
			labelBox{ax - w/2, ay - d - h, w, h},
			labelBox{ax + d, ay - h/2, w, h},
			labelBox{ax - d - w, ay - h/2, w, h},
			labelBox{ax + d*0.7, ay + d*0.7, w, h},
			labelBox{ax - d*0.7 - w, ay + d*0.7, w, h},
			labelBox{ax + d*0.7, ay - d*0.7 - h, w, h},
			labelBox{ax - d*0.7 - w, ay - d*0.7 - h, w, h},
		)
	}
	return out
}

// labeller places labels greedily, most important first, each in the
// first candidate box inside the picture that overlaps no box placed
// before it (nor the scale bar and north arrow). A label with no free
// candidate is left off rather than drawn over another.
type labeller struct {
	W, H   float64
	placed []labelBox
	grid   labelGrid // the boxes placed, by where they are
}

func (l *labeller) place(cands []labelBox) (labelBox, bool) {
	indexed := l.grid.index(l.W, l.H, l.placed)
	for _, c := range cands {
		if c.X < 1 || c.Y < 1 || c.X+c.W > l.W-1 || c.Y+c.H > l.H-1 {
			continue
		}
		free := true
		if indexed {
			free = !l.grid.overlaps(c, l.placed)
		} else {
			for _, q := range l.placed {
				if c.overlaps(q) {
					free = false
					break
				}
			}
		}
		if free {
			l.placed = append(l.placed, c)
			return c, true
		}
	}
	return labelBox{}, false
}

// labelGrid lists the placed boxes by the cells of a square grid over the
// picture that they cover, so that a candidate is tested against the boxes
// in its cells only rather than all placed before it: a city's map has
// two thousand region labels, each with a dozen candidates. Two boxes that
// overlap share a cell; a box reaching past the picture is listed in the
// cells at its edge.
type labelGrid struct {
	n          int // boxes listed: placed[:n]
	cols, rows int
	cells      [][]int32 // per cell, indices into placed
}

// labelCellPx is the side of a labelGrid cell, about a region label's
// width.
const labelCellPx = 32

// index lists the boxes placed since the last call, making the grid for a
// picture of w by h pixels at the first. It returns false when the
// picture's size allows no grid (not a finite size of at most 10⁵ pixels
// a side), for which the boxes are to be tested one by one.
func (g *labelGrid) index(w, h float64, placed []labelBox) bool {
	if !(w > 0 && h > 0 && w <= 1e5 && h <= 1e5) {
		return false
	}
	if g.cells == nil {
		g.cols, g.rows = int(math.Ceil(w/labelCellPx)), int(math.Ceil(h/labelCellPx))
		g.cells = make([][]int32, g.cols*g.rows)
	}
	for ; g.n < len(placed); g.n++ {
		c0, r0, c1, r1, ok := g.span(placed[g.n])
		for r := r0; ok && r <= r1; r++ {
			for c := c0; c <= c1; c++ {
				g.cells[r*g.cols+c] = append(g.cells[r*g.cols+c], int32(g.n))
			}
		}
	}
	return true
}

// span returns the cells a box covers, clamped to the grid; ok is false
// for a box that overlaps nothing (a NaN coordinate).
func (g *labelGrid) span(b labelBox) (c0, r0, c1, r1 int, ok bool) {
	if math.IsNaN(b.X + b.Y + b.W + b.H) {
		return 0, 0, 0, 0, false
	}
	cell := func(v float64, n int) int {
		return int(max(0, min(math.Floor(v/labelCellPx), float64(n-1))))
	}
	return cell(b.X, g.cols), cell(b.Y, g.rows), cell(b.X+b.W, g.cols), cell(b.Y+b.H, g.rows), true
}

// overlaps reports whether b overlaps a listed box.
func (g *labelGrid) overlaps(b labelBox, placed []labelBox) bool {
	c0, r0, c1, r1, ok := g.span(b)
	for r := r0; ok && r <= r1; r++ {
		for c := c0; c <= c1; c++ {
			for _, i := range g.cells[r*g.cols+c] {
				if b.overlaps(placed[i]) {
					return true
				}
			}
		}
	}
	return false
}

// mapLabels places the map's labels: the region ids (the tables' key,
// so they come first, each next to its region's point), the scheme's name,
// then the callouts of the first findings (rank, place name and cost,
// near their costliest region pair, with a leader line when set apart).
func (v *view) mapLabels(p projection) []mapLabel {
	lb := &labeller{W: float64(p.W), H: float64(p.H)}
	if sb, ok := p.scaleBar(); ok {
		lb.placed = append(lb.placed, sb.Box())
	}
	lb.placed = append(lb.placed, p.northArrow().Box())
	var out []mapLabel
	for _, r := range v.in.Regions.Regions {
		x, y := p.xy(r.Point)
		if !finite(x) || !finite(y) {
			continue
		}
		text := strconv.Itoa(r.ID)
		w, h := textBox([]string{text}, regionFontPx, 0.5)
		if box, ok := lb.place(candidates(x, y, w, h, []float64{3, 7, 12, 18})); ok {
			out = append(out, mapLabel{Kind: labelRegion, Lines: []string{text}, Short: text, Box: box, AX: x, AY: y, Region: r.ID, Title: regionTitle(v, r.ID)})
		}
	}
	// Callouts stay off the scheme itself: it is what the reader looks for.
	for _, l := range v.schemeLines(p) {
		for i := 1; i < len(l); i++ {
			x0, x1 := math.Min(l[i-1][0], l[i][0]), math.Max(l[i-1][0], l[i][0])
			y0, y1 := math.Min(l[i-1][1], l[i][1]), math.Max(l[i-1][1], l[i][1])
			lb.placed = append(lb.placed, labelBox{x0 - 4, y0 - 4, x1 - x0 + 8, y1 - y0 + 8})
		}
	}
	if ax, ay, ok := v.schemeAnchor(p); ok {
		lines := []string{v.schemeName()}
		w, h := textBox(lines, findingFontPx, 2)
		if box, ok := lb.place(candidates(ax, ay, w, h, []float64{8, 16, 30, 50})); ok {
			out = append(out, mapLabel{Kind: labelScheme, Lines: lines, Box: box, AX: ax, AY: ay, Title: lines[0]})
		}
	}
	for i, it := range v.items {
		if i >= maxCallouts {
			break
		}
		ax, ay, ok := v.findingAnchor(p, it)
		if !ok {
			continue
		}
		rank := strconv.Itoa(it.Finding.Rank)
		lines := wrapText(rank+". "+it.Name, calloutWrap)
		lines = append(lines, v.costText(it))
		w, h := textBox(lines, findingFontPx, 3)
		if box, ok := lb.place(candidates(ax, ay, w, h, []float64{10, 24, 40, 64, 96, 140})); ok {
			out = append(out, mapLabel{Kind: labelFinding, Lines: lines, Short: rank, Box: box, AX: ax, AY: ay, Hex: lookOf(it.Verdict()).Hex, Title: rank + ". " + it.Name + ": " + v.costText(it)})
		}
	}
	return out
}

// costText is a finding's cost as its callout gives it.
func (v *view) costText(it item) string {
	s := fmtFixed(it.Finding.ExtraHoursPerDay, 1) + " extra vehicle-hours per day"
	if v.comparing() {
		s += " (" + v.periodOf(it) + ")"
	}
	return s
}

// findingAnchor is the middle of a finding's costliest region pair.
func (v *view) findingAnchor(p projection, it item) (x, y float64, ok bool) {
	if len(it.Finding.Edges) == 0 {
		return 0, 0, false
	}
	top := it.Finding.Edges[0]
	for _, e := range it.Finding.Edges[1:] {
		if e.ExtraHoursPerDay > top.ExtraHoursPerDay {
			top = e
		}
	}
	ra, rb := v.regions[top.From], v.regions[top.To]
	if ra == nil || rb == nil {
		return 0, 0, false
	}
	x1, y1 := p.xy(ra.Point)
	x2, y2 := p.xy(rb.Point)
	x, y = (x1+x2)/2, (y1+y2)/2
	return x, y, finite(x) && finite(y)
}

// schemeAnchor is the middle point of the scheme's longest line.
func (v *view) schemeAnchor(p projection) (x, y float64, ok bool) {
	best := -1.0
	for _, l := range v.schemeLines(p) {
		length := 0.0
		for i := 1; i < len(l); i++ {
			length += math.Hypot(l[i][0]-l[i-1][0], l[i][1]-l[i-1][1])
		}
		if length > best {
			best, x, y = length, l[len(l)/2][0], l[len(l)/2][1]
			if len(l) == 2 {
				x, y = (l[0][0]+l[1][0])/2, (l[0][1]+l[1][1])/2
			}
		}
	}
	return x, y, best >= 0
}

// wrapText breaks s at spaces into lines of at most n characters (a
// longer word stands alone).
func wrapText(s string, n int) []string {
	var lines []string
	cur := ""
	for _, w := range strings.Fields(s) {
		if cur != "" && utf8.RuneCountInString(cur)+1+utf8.RuneCountInString(w) > n {
			lines = append(lines, cur)
			cur = ""
		}
		if cur != "" {
			cur += " "
		}
		cur += w
	}
	if cur != "" || len(lines) == 0 {
		lines = append(lines, cur)
	}
	return lines
}

// labelsSVG draws the placed labels: the scheme's name, the findings'
// callouts (framed in their verdict colour, with a leader to the place
// when set apart) and the region ids, each with a white halo. Every label
// carries its box as data-box, which the placement tests read.
func (v *view) labelsSVG(b *strings.Builder, labels []mapLabel) {
	group := func(kind, attrs string) {
		fmt.Fprintf(b, `<g id="%s" font-family="sans-serif" %s>`, kind, attrs)
		for _, l := range labels {
			if l.Kind != kind {
				continue
			}
			bx := l.Box
			box := fmtPx(bx.X) + " " + fmtPx(bx.Y) + " " + fmtPx(bx.W) + " " + fmtPx(bx.H)
			switch kind {
			case labelRegion:
				fmt.Fprintf(b, `<text x="%s" y="%s" data-box="%s" data-region="%d">%s<title>%s</title></text>`,
					fmtPx(bx.X+0.5), fmtPx(bx.Y+regionFontPx-0.5), box, l.Region, xmlText(l.Lines[0]), xmlText(l.Title))
			default:
				fmt.Fprintf(b, `<g class="callout" data-box="%s"><title>%s</title>`, box, xmlText(l.Title))
				if lx, ly := nearestOnBox(bx, l.AX, l.AY); math.Hypot(lx-l.AX, ly-l.AY) > 4 {
					fmt.Fprintf(b, `<line x1="%s" y1="%s" x2="%s" y2="%s" stroke="#000000" stroke-width="0.8"/>`, fmtPx(l.AX), fmtPx(l.AY), fmtPx(lx), fmtPx(ly))
				}
				frame := "#000000"
				if l.Hex != "" {
					frame = l.Hex
				}
				fmt.Fprintf(b, `<rect x="%s" y="%s" width="%s" height="%s" fill="#FFFFFF" fill-opacity="0.92" stroke="%s" stroke-width="1.5" rx="2"/>`,
					fmtPx(bx.X), fmtPx(bx.Y), fmtPx(bx.W), fmtPx(bx.H), frame)
				pad := 3.0
				if kind == labelScheme {
					pad = 2
				}
				for i, line := range l.Lines {
					fmt.Fprintf(b, `<text x="%s" y="%s">%s</text>`, fmtPx(bx.X+pad), fmtPx(bx.Y+pad+float64(i+1)*(findingFontPx+2)-2.5), xmlText(line))
				}
				b.WriteString(`</g>`)
			}
		}
		b.WriteString(`</g>`)
	}
	group(labelScheme, `font-size="10" font-weight="bold" fill="#000000"`)
	group(labelFinding, `font-size="10" fill="#000000"`)
	group(labelRegion, `font-size="9" fill="#444444" stroke="#FFFFFF" stroke-width="2.5" paint-order="stroke"`)
}

// nearestOnBox is the point of the box's border nearest to (x, y).
func nearestOnBox(bx labelBox, x, y float64) (float64, float64) {
	return math.Min(math.Max(x, bx.X), bx.X+bx.W), math.Min(math.Max(y, bx.Y), bx.Y+bx.H)
}

// labelsPNG draws the placed labels with the bitmap digits: region ids,
// and each finding's rank in a white box framed in its verdict colour
// (the workbook's tables beside the picture give the names).
func labelsPNG(img *image.RGBA, labels []mapLabel) {
	ink := color.RGBA{68, 68, 68, 255}
	for _, l := range labels {
		x0, y0 := int(math.Round(l.Box.X)), int(math.Round(l.Box.Y))
		switch l.Kind {
		case labelRegion:
			drawText(img, l.Short, x0+1, y0+1, ink)
		case labelFinding:
			if lx, ly := nearestOnBox(labelBox{float64(x0), float64(y0), float64(len(l.Short)*(glyphW+glyphGap) + 5), glyphH + 6}, l.AX, l.AY); math.Hypot(lx-l.AX, ly-l.AY) > 4 {
				drawLine(img, l.AX, l.AY, lx, ly, 0.5, color.RGBA{A: 255})
			}
			w := len(l.Short)*(glyphW+glyphGap) - glyphGap + 6
			frame := rgba(l.Hex)
			fillPolygon(img, [][][2]float64{{{float64(x0), float64(y0)}, {float64(x0 + w), float64(y0)}, {float64(x0 + w), float64(y0 + glyphH + 6)}, {float64(x0), float64(y0 + glyphH + 6)}}}, frame)
			fillPolygon(img, [][][2]float64{{{float64(x0 + 2), float64(y0 + 2)}, {float64(x0 + w - 2), float64(y0 + 2)}, {float64(x0 + w - 2), float64(y0 + glyphH + 4)}, {float64(x0 + 2), float64(y0 + glyphH + 4)}}}, color.RGBA{255, 255, 255, 255})
			for _, q := range labelPixels(l.Short, x0+3, y0+3) {
				if q.In(img.Bounds()) {
					img.SetRGBA(q.X, q.Y, color.RGBA{A: 255})
				}
			}
		}
	}
}

// drawText draws text with its top-left corner at (x0, y0) in c with a
// one-pixel white halo.
func drawText(img *image.RGBA, text string, x0, y0 int, c color.RGBA) {
	b := img.Bounds()
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
