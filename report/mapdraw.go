package report

import (
	"bytes"
	"encoding/xml"
	"fmt"
	"image"
	"image/color"
	"image/png"
	"math"
	"sort"
	"strconv"
	"strings"

	"github.com/paulmach/orb"

	"narrows/patterns"
)

// Map size in pixels (SVG user units and PNG pixels alike).
const (
	mapWidth     = 800
	mapMaxHeight = 800
	mapPad       = 16
	lineOffset   = 3.0 // px to the right of travel, so A>B and B>A both show
	legendWidth  = 560 // the SVG is at least this wide so legend text fits
)

// projection maps WGS84 to map pixels with an equirectangular projection
// about the study area's mean latitude, which is accurate enough for a
// picture of a town.
type projection struct {
	minLon, maxLat float64
	kx, scale      float64 // kx = cos(mean latitude)
	W, H           int
}

func (v *view) projection() projection {
	b := v.in.Regions.Bound
	if b.IsEmpty() || b.Min == b.Max || !finite(b.Min[0]+b.Min[1]+b.Max[0]+b.Max[1]) {
		first := true
		for _, r := range v.in.Regions.Regions {
			rb := r.Polygon.Bound()
			if len(r.Polygon) == 0 {
				rb = orb.Bound{Min: r.Point, Max: r.Point}
			}
			if first {
				b, first = rb, false
			} else {
				b = b.Union(rb)
			}
		}
	}
	kx := math.Cos((b.Min[1] + b.Max[1]) / 2 * math.Pi / 180)
	if !finite(kx) || kx < 0.01 {
		kx = 0.01
	}
	w := (b.Max[0] - b.Min[0]) * kx
	h := b.Max[1] - b.Min[1]
	inner := float64(mapWidth - 2*mapPad)
	scale := 1.0
	if w > 0 || h > 0 {
		scale = inner / math.Max(w, h*inner/float64(mapMaxHeight-2*mapPad))
	}
	if !finite(scale) || scale <= 0 {
		scale = 1
	}
	// Clamp in floating point: converting an out-of-range float to int is
	// implementation-defined in Go.
	size := func(extent float64, limit int) int {
		px := math.Ceil(extent*scale) + 2*mapPad
		if !(px >= 2*mapPad+1) { // also NaN
			px = 2*mapPad + 1
		}
		return int(math.Min(px, float64(limit)))
	}
	return projection{minLon: b.Min[0], maxLat: b.Max[1], kx: kx, scale: scale, W: size(w, mapWidth), H: size(h, mapMaxHeight)}
}

func (p projection) xy(pt orb.Point) (x, y float64) {
	return mapPad + (pt[0]-p.minLon)*p.kx*p.scale, mapPad + (p.maxLat-pt[1])*p.scale
}

// segment is a drawn finding edge in pixels.
type segment struct {
	X1, Y1, X2, Y2 float64
	Verdict        patterns.Verdict
	Title          string
}

// segments returns the finding edges to draw, least severe first so the
// most severe end up on top. Edges whose two regions share a point are
// skipped (nothing to draw).
func (v *view) segments(p projection) []segment {
	var out []segment
	for i := len(v.items) - 1; i >= 0; i-- {
		it := v.items[i]
		for _, e := range it.Finding.Edges {
			x1, y1 := p.xy(v.regions[e.From].Point)
			x2, y2 := p.xy(v.regions[e.To].Point)
			dx, dy := x2-x1, y2-y1
			l := math.Hypot(dx, dy)
			if l < 1 || !finite(l) {
				continue
			}
			// Offset to the right of travel (screen y points down) and
			// shorten both ends a little so arrowheads stay clear of the
			// region points.
			ox, oy := -dy/l*lineOffset, dx/l*lineOffset
			cut := math.Min(6, l/4)
			ux, uy := dx/l*cut, dy/l*cut
			title := fmt.Sprintf("Weak link %s, regions %s", it.Finding.ID, edgeLabel(e.From, e.To))
			if vd := it.Verdict(); vd != "" {
				title += ": " + string(vd)
			}
			out = append(out, segment{x1 + ox + ux, y1 + oy + uy, x2 + ox - ux, y2 + oy - uy, it.Verdict(), title})
		}
	}
	return out
}

// legendEntries returns what the legend lists: every verdict drawn (or the
// plain weak-link entry without comparison), then the focus area.
func (v *view) legendEntries(segs []segment) []patterns.Verdict {
	drawn := map[patterns.Verdict]bool{}
	for _, s := range segs {
		drawn[s.Verdict] = true
	}
	var out []patterns.Verdict
	if !v.comparing() {
		if drawn[""] {
			out = append(out, "")
		}
		return out
	}
	for _, vd := range v.verdicts {
		if drawn[vd] {
			out = append(out, vd)
		}
	}
	return out
}

func fmtPx(x float64) string { return strconv.FormatFloat(roundTo(x, 1), 'f', -1, 64) }

// xmlText escapes s for XML character data and attribute values.
func xmlText(s string) string {
	var b strings.Builder
	// EscapeText writes to a strings.Builder, which never fails.
	_ = xml.EscapeText(&b, []byte(s))
	return b.String()
}

// svg renders the map as a standalone SVG element: the water, the
// regions, the network and the scheme under the finding arrows, then the
// labels, the scale bar, the north arrow and the legend.
func (v *view) svg() string {
	p := v.projection()
	segs := v.segments(p)
	legend := v.legendEntries(segs)
	base := v.baseLegend(p)
	const rowH = 20
	legendRows := len(legend) + len(base) + 1 // + regions
	if len(v.focus) > 0 {
		legendRows++
	}
	totalH := p.H + 12 + legendRows*rowH
	totalW := max(p.W, legendWidth)
	x0, y0, x1, y1 := p.mapRect()

	var b strings.Builder
	fmt.Fprintf(&b, `<svg xmlns="http://www.w3.org/2000/svg" id="map" width="%d" height="%d" viewBox="0 0 %d %d" role="img" aria-labelledby="map-title">`, totalW, totalH, totalW, totalH)
	fmt.Fprintf(&b, `<title id="map-title">%s</title>`, xmlText("Map of regions and weak links: "+v.in.Title))
	b.WriteString(`<defs>`)
	for i, vd := range legend {
		fmt.Fprintf(&b, `<marker id="arrow-%d" viewBox="0 0 10 10" refX="8" refY="5" markerWidth="4" markerHeight="4" orient="auto"><path d="M0,0L10,5L0,10z" fill="%s"/></marker>`, i, lookOf(vd).Hex)
	}
	fmt.Fprintf(&b, `<clipPath id="map-clip"><rect x="%s" y="%s" width="%s" height="%s"/></clipPath>`, fmtPx(x0), fmtPx(y0), fmtPx(x1-x0), fmtPx(y1-y0))
	b.WriteString(`</defs>`)
	fmt.Fprintf(&b, `<rect x="0" y="0" width="%d" height="%d" fill="#FFFFFF"/>`, totalW, totalH)
	if v.in.Regions.WaterKM2 > 0 {
		// Regions and water tile the study area: what the regions leave
		// uncovered is water.
		fmt.Fprintf(&b, `<rect id="water" x="%s" y="%s" width="%s" height="%s" fill="%s"/>`, fmtPx(x0), fmtPx(y0), fmtPx(x1-x0), fmtPx(y1-y0), waterFill)
	}

	b.WriteString(`<g id="regions" stroke="` + regionStroke + `" stroke-width="0.8" stroke-linejoin="round">`)
	for _, r := range v.in.Regions.Regions {
		fill, extra := regionFill, ""
		if v.focus[r.ID] {
			fill, extra = focusFill, ` fill-opacity="0.45"`
		}
		fmt.Fprintf(&b, `<path d="%s" fill="%s"%s fill-rule="evenodd"><title>%s</title></path>`, pathData(p, r.Polygon), fill, extra, xmlText(regionTitle(v, r.ID)))
	}
	b.WriteString(`</g>`)
	v.networkSVG(&b, p)
	b.WriteString(`<g id="findings" fill="none" stroke-width="3" stroke-linecap="round">`)
	markerOf := map[patterns.Verdict]int{}
	for i, vd := range legend {
		markerOf[vd] = i
	}
	for _, s := range segs {
		lk := lookOf(s.Verdict)
		dash := ""
		if lk.Dash != "" {
			dash = ` stroke-dasharray="` + lk.Dash + `"`
		}
		fmt.Fprintf(&b, `<line x1="%s" y1="%s" x2="%s" y2="%s" stroke="%s"%s marker-end="url(#arrow-%d)" data-verdict="%s"><title>%s</title></line>`,
			fmtPx(s.X1), fmtPx(s.Y1), fmtPx(s.X2), fmtPx(s.Y2), lk.Hex, dash, markerOf[s.Verdict], xmlText(string(s.Verdict)), xmlText(s.Title))
	}
	b.WriteString(`</g>`)
	v.labelsSVG(&b, v.mapLabels(p))
	scaleAndNorthSVG(&b, p)

	y := p.H + 12
	b.WriteString(`<g id="legend" font-family="sans-serif" font-size="12" fill="#000000">`)
	for _, vd := range legend {
		lk := lookOf(vd)
		dash := ""
		if lk.Dash != "" {
			dash = ` stroke-dasharray="` + lk.Dash + `"`
		}
		label := verdictLabel(vd)
		if v.comparing() {
			label += " (" + strconv.Itoa(v.counts[vd]) + ")"
			if short := verdictShort(vd); short != "" {
				label += ": " + short
			}
		}
		fmt.Fprintf(&b, `<g class="legend-entry" data-verdict="%s"><line x1="%d" y1="%d" x2="%d" y2="%d" stroke="%s" stroke-width="3"%s/><text x="%d" y="%d">%s</text></g>`,
			xmlText(string(vd)), mapPad, y+8, mapPad+36, y+8, lk.Hex, dash, mapPad+44, y+12, xmlText(label))
		y += rowH
	}
	for _, e := range base {
		fmt.Fprintf(&b, `<g class="legend-entry" data-layer="%s">%s<text x="%d" y="%d">%s</text></g>`, e.Layer, e.sample(mapPad, y+8), mapPad+44, y+12, xmlText(e.Text))
		y += rowH
	}
	fmt.Fprintf(&b, `<g class="legend-entry" data-layer="regions"><rect x="%d" y="%d" width="36" height="14" fill="%s" stroke="%s"/><text x="%d" y="%d">region (number = id)</text></g>`,
		mapPad, y+1, regionFill, regionStroke, mapPad+44, y+12)
	y += rowH
	if len(v.focus) > 0 {
		fmt.Fprintf(&b, `<g class="legend-entry" data-layer="focus"><rect x="%d" y="%d" width="36" height="14" fill="%s" fill-opacity="0.45" stroke="%s"/><text x="%d" y="%d">focus area</text></g>`,
			mapPad, y+1, focusFill, regionStroke, mapPad+44, y+12)
	}
	b.WriteString(`</g></svg>`)
	return b.String()
}

func regionTitle(v *view, id int) string {
	r := v.regions[id]
	s := fmt.Sprintf("Region %d, %s km²", id, strconv.FormatFloat(roundTo(r.AreaKM2, 2), 'f', -1, 64))
	if len(r.BorderRoads) > 0 {
		s += ", along " + r.BorderRoads[0].Name
	}
	return s
}

// pathData is the SVG path of a polygon, one subpath per ring.
func pathData(p projection, poly orb.Polygon) string {
	var b strings.Builder
	for _, ring := range poly {
		for i, pt := range ring {
			x, y := p.xy(pt)
			if i == 0 {
				b.WriteString("M")
			} else {
				b.WriteString("L")
			}
			b.WriteString(fmtPx(x) + "," + fmtPx(y))
		}
		if len(ring) > 0 {
			b.WriteString("Z")
		}
	}
	return b.String()
}

// png renders the map without a legend (the workbook's verdict cells and
// caption serve as one): the water, region polygons by scanline fill,
// region borders, the network and the scheme, the finding lines with
// arrowheads, the region points, the placed labels (region ids, findings'
// ranks), the scale bar and the north arrow.
func (v *view) png() ([]byte, error) {
	p := v.projection()
	img := image.NewRGBA(image.Rect(0, 0, p.W, p.H))
	for i := range img.Pix {
		img.Pix[i] = 255 // opaque white
	}
	if v.in.Regions.WaterKM2 > 0 {
		x0, y0, x1, y1 := p.mapRect()
		fillPolygon(img, [][][2]float64{{{x0, y0}, {x1, y0}, {x1, y1}, {x0, y1}}}, rgba(waterFill))
	}
	for _, r := range v.in.Regions.Regions {
		fill := rgba(regionFill)
		if v.focus[r.ID] {
			fill = rgba(focusFillPNG)
		}
		var rings [][][2]float64
		for _, ring := range r.Polygon {
			pts := make([][2]float64, len(ring))
			for i, pt := range ring {
				x, y := p.xy(pt)
				pts[i] = [2]float64{x, y}
			}
			rings = append(rings, pts)
		}
		fillPolygon(img, rings, fill)
	}
	stroke := rgba(regionStroke)
	for _, r := range v.in.Regions.Regions {
		for _, ring := range r.Polygon {
			for i := 1; i < len(ring); i++ {
				x1, y1 := p.xy(ring[i-1])
				x2, y2 := p.xy(ring[i])
				drawLine(img, x1, y1, x2, y2, 0.5, stroke)
			}
		}
	}
	v.networkPNG(img, p)
	for _, s := range v.segments(p) {
		lk := lookOf(s.Verdict)
		c := rgba(lk.Hex)
		drawDashed(img, s.X1, s.Y1, s.X2, s.Y2, 1.5, dashPattern(lk.Dash), c)
		// Arrowhead: a triangle at the end pointing along the segment.
		dx, dy := s.X2-s.X1, s.Y2-s.Y1
		l := math.Hypot(dx, dy)
		ux, uy := dx/l, dy/l
		const length, half = 9.0, 4.5
		bx, by := s.X2-ux*length, s.Y2-uy*length
		fillPolygon(img, [][][2]float64{{{s.X2 + ux*2, s.Y2 + uy*2}, {bx - uy*half, by + ux*half}, {bx + uy*half, by - ux*half}}}, c)
	}
	label := color.RGBA{85, 85, 85, 255}
	for _, r := range v.in.Regions.Regions {
		x, y := p.xy(r.Point)
		fillDisc(img, x, y, 2, label)
	}
	labelsPNG(img, v.mapLabels(p))
	scaleAndNorthPNG(img, p)
	var buf bytes.Buffer
	if err := png.Encode(&buf, img); err != nil {
		return nil, fmt.Errorf("report: encoding map picture: %w", err)
	}
	return buf.Bytes(), nil
}

// fillPolygon fills the rings (even-odd rule, so holes stay empty) by
// scanlines through pixel centres. Rings need not be closed.
func fillPolygon(img *image.RGBA, rings [][][2]float64, c color.RGBA) {
	b := img.Bounds()
	minY, maxY := math.Inf(1), math.Inf(-1)
	for _, ring := range rings {
		for _, pt := range ring {
			minY, maxY = math.Min(minY, pt[1]), math.Max(maxY, pt[1])
		}
	}
	if !finite(minY) || !finite(maxY) {
		return
	}
	// Clamp before converting: float-to-int conversion of out-of-range
	// values is implementation-defined.
	y0 := clampInt(math.Floor(minY), b.Min.Y, b.Max.Y)
	y1 := clampInt(math.Ceil(maxY), b.Min.Y-1, b.Max.Y-1)
	var xs []float64
	for y := y0; y <= y1; y++ {
		yc := float64(y) + 0.5
		xs = xs[:0]
		for _, ring := range rings {
			n := len(ring)
			for i := 0; i < n; i++ {
				a, e := ring[i], ring[(i+1)%n]
				if (a[1] <= yc && e[1] > yc) || (e[1] <= yc && a[1] > yc) {
					xs = append(xs, a[0]+(yc-a[1])*(e[0]-a[0])/(e[1]-a[1]))
				}
			}
		}
		sort.Float64s(xs)
		for i := 0; i+1 < len(xs); i += 2 {
			// Pixels whose centre lies in [xs[i], xs[i+1]).
			if !finite(xs[i]) || !finite(xs[i+1]) {
				continue
			}
			xa := clampInt(math.Ceil(xs[i]-0.5), b.Min.X, b.Max.X)
			xb := clampInt(math.Ceil(xs[i+1]-0.5)-1, b.Min.X-1, b.Max.X-1)
			for x := xa; x <= xb; x++ {
				img.SetRGBA(x, y, c)
			}
		}
	}
}

// clampInt converts x to an int within [lo, hi]; NaN gives lo.
func clampInt(x float64, lo, hi int) int {
	if !(x >= float64(lo)) {
		return lo
	}
	if x > float64(hi) {
		return hi
	}
	return int(x)
}

// drawLine stamps discs of radius r along the segment.
func drawLine(img *image.RGBA, x1, y1, x2, y2, r float64, c color.RGBA) {
	drawDashed(img, x1, y1, x2, y2, r, nil, c)
}

// drawDashed stamps discs of radius r along the segment where the dash
// pattern (alternating on and off lengths in pixels, nil for solid) is on.
func drawDashed(img *image.RGBA, x1, y1, x2, y2, r float64, dash []float64, c color.RGBA) {
	l := math.Hypot(x2-x1, y2-y1)
	if !finite(l) {
		return
	}
	var period float64
	for _, d := range dash {
		period += d
	}
	steps := int(math.Min(math.Ceil(l*2)+1, 1<<16))
	for i := 0; i <= steps; i++ {
		t := float64(i) / float64(steps)
		if period > 0 {
			// Position within the pattern decides on or off.
			at, on := math.Mod(t*l, period), true
			for _, d := range dash {
				if at < d {
					break
				}
				at -= d
				on = !on
			}
			if !on {
				continue
			}
		}
		fillDisc(img, x1+(x2-x1)*t, y1+(y2-y1)*t, r, c)
	}
}

// dashPattern parses an SVG stroke-dasharray of numbers separated by
// spaces; anything else gives a solid line.
func dashPattern(s string) []float64 {
	if s == "" {
		return nil
	}
	var out []float64
	for _, f := range strings.Fields(s) {
		x, err := strconv.ParseFloat(f, 64)
		if err != nil || x <= 0 || !finite(x) {
			return nil
		}
		out = append(out, x)
	}
	if len(out)%2 == 1 { // SVG repeats an odd list to make it even
		out = append(out, out...)
	}
	return out
}

// fillDisc sets the pixels whose centre lies within r of (cx, cy); a
// radius below one pixel sets at least the pixel under the centre.
func fillDisc(img *image.RGBA, cx, cy, r float64, c color.RGBA) {
	b := img.Bounds()
	if !finite(cx) || !finite(cy) || cx < -r || cy < -r || cx > float64(b.Max.X)+r || cy > float64(b.Max.Y)+r {
		return
	}
	if r < 0.71 {
		x, y := int(math.Floor(cx)), int(math.Floor(cy))
		if image.Pt(x, y).In(b) {
			img.SetRGBA(x, y, c)
		}
		return
	}
	for y := int(math.Floor(cy - r)); y <= int(math.Ceil(cy+r)); y++ {
		for x := int(math.Floor(cx - r)); x <= int(math.Ceil(cx+r)); x++ {
			dx, dy := float64(x)+0.5-cx, float64(y)+0.5-cy
			if dx*dx+dy*dy <= r*r && image.Pt(x, y).In(b) {
				img.SetRGBA(x, y, c)
			}
		}
	}
}
