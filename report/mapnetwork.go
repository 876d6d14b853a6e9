package report

import (
	"fmt"
	"image"
	"math"
	"strings"

	"narrows/partition"
)

// netLayer is one layer of the network drawn under the findings, in
// drawing order. Major roads are drawn widest for the highest class, on
// top of the lesser ones, so junctions read right; the base map stays
// grey and pale blue so the verdict colours stand out on it.
type netLayer struct {
	ID      string   // SVG group id
	Classes []string // network classes drawn in it
	Hex     string
	Width   float64
	Casing  string  // drawn first, wider, "" for none
	Dash    string  // SVG dash pattern of a second, white stroke ("" none)
	DashW   float64 // its width
}

// Map colours of the network.
const (
	waterFill    = "#CFE3F3" // water areas, behind the regions
	riverColour  = "#8FBCE0" // rivers, canals and banks
	coastColour  = "#5F8FB8"
	minorColour  = "#D2CEC8"
	majorColour  = "#8E8478"
	railColour   = "#4D4D4D"
	schemeColour = "#F0E442" // Okabe-Ito yellow, cased in black: no verdict uses it
	schemeCasing = "#000000"
	// The best candidate link: black, dashed white inside, wider than any
	// road, so it reads as "not built" beside the yellow scheme.
	candidateColour = "#000000"
	candidateDash   = "6 4"
)

// netLayers lists the layers bottom to top. Classes not listed (a
// highway class a study added to NetworkRoads, say "service") are drawn
// with the minor roads.
var netLayers = [...]netLayer{
	{ID: "minor-roads", Hex: minorColour, Width: 0.8},
	{ID: "water-banks", Classes: []string{"water"}, Hex: riverColour, Width: 1},
	{ID: "rivers", Classes: []string{"river", "canal"}, Hex: riverColour, Width: 4},
	{ID: "coast", Classes: []string{"coastline"}, Hex: coastColour, Width: 1.4},
	{ID: "major-roads-tertiary", Classes: []string{"tertiary"}, Hex: majorColour, Width: 1.1},
	{ID: "major-roads-secondary", Classes: []string{"secondary"}, Hex: majorColour, Width: 1.6},
	{ID: "major-roads-primary", Classes: []string{"primary"}, Hex: majorColour, Width: 2.2},
	{ID: "major-roads-trunk", Classes: []string{"trunk", "motorway"}, Hex: majorColour, Width: 3},
	{ID: "railways", Classes: []string{"rail"}, Hex: railColour, Width: 2, Dash: "4 4", DashW: 1},
}

// layerOf returns the index in netLayers of a network class.
func layerOf(class string) int {
	for i, l := range netLayers {
		for _, c := range l.Classes {
			if c == class {
				return i
			}
		}
	}
	return 0
}

// maxMinorPoints bounds the minor roads drawn: a city's residential
// streets would make the page many megabytes and the map a grey blot, so
// beyond this many points the minor roads are left off (the caption says
// so).
const maxMinorPoints = 60000

// networkLines sorts the network into its layers, in pixels, dropping
// points closer than half a pixel to the previous one. It reports whether
// the minor roads were left off.
func (v *view) networkLines(p projection) (layers [len(netLayers)][][][2]float64, minorDropped bool) {
	net := v.in.Regions.Network
	minorPts := 0
	for _, l := range net {
		if layerOf(l.Class) == 0 {
			minorPts += len(l.Line)
		}
	}
	minorDropped = minorPts > maxMinorPoints
	for _, l := range net {
		k := layerOf(l.Class)
		if k == 0 && minorDropped {
			continue
		}
		if line := pixelLine(p, l); len(line) >= 2 {
			layers[k] = append(layers[k], line)
		}
	}
	return layers, minorDropped
}

// pixelLine projects a network line, dropping non-finite points and
// points within half a pixel of the last one kept.
func pixelLine(p projection, l partition.NetworkLine) [][2]float64 {
	var out [][2]float64
	for _, pt := range l.Line {
		x, y := p.xy(pt)
		if !finite(x) || !finite(y) {
			continue
		}
		if n := len(out); n > 0 && math.Hypot(x-out[n-1][0], y-out[n-1][1]) < 0.5 {
			continue
		}
		out = append(out, [2]float64{x, y})
	}
	return out
}

// linesPath is the SVG path data of pixel lines.
func linesPath(lines [][][2]float64) string {
	var b strings.Builder
	for _, l := range lines {
		for i, q := range l {
			if i == 0 {
				b.WriteString("M")
			} else {
				b.WriteString("L")
			}
			b.WriteString(fmtPx(q[0]) + "," + fmtPx(q[1]))
		}
	}
	return b.String()
}

// schemeLines are the scheme's lines in pixels.
func (v *view) schemeLines(p projection) [][][2]float64 {
	var out [][][2]float64
	for _, l := range v.in.Scheme {
		if line := pixelLine(p, l); len(line) >= 2 {
			out = append(out, line)
		}
	}
	return out
}

// schemeName names the scheme on the map: its ways' names, else "scheme".
func (v *view) schemeName() string {
	var names []string
	for _, l := range v.in.Scheme {
		if l.Name != "" && !containsString(names, l.Name) {
			names = append(names, l.Name)
		}
	}
	if len(names) == 0 {
		return "scheme"
	}
	return strings.Join(names, ", ") + " (scheme)"
}

// mapRect is the study area in pixels: the clip of every network line.
func (p projection) mapRect() (x0, y0, x1, y1 float64) {
	return mapPad, mapPad, float64(p.W - mapPad), float64(p.H - mapPad)
}

// networkSVG draws the water, then (after the regions, by the caller)
// the network layers and the scheme, clipped to the study area.
func (v *view) networkSVG(b *strings.Builder, p projection) {
	layers, _ := v.networkLines(p)
	for i, l := range netLayers {
		if len(layers[i]) == 0 {
			continue
		}
		d := linesPath(layers[i])
		fmt.Fprintf(b, `<g id="%s" fill="none" stroke-linecap="round" stroke-linejoin="round" clip-path="url(#map-clip)"><path d="%s" stroke="%s" stroke-width="%s"/>`, l.ID, d, l.Hex, fmtPx(l.Width))
		if l.Dash != "" {
			fmt.Fprintf(b, `<path d="%s" stroke="#FFFFFF" stroke-width="%s" stroke-dasharray="%s"/>`, d, fmtPx(l.DashW), l.Dash)
		}
		b.WriteString(`</g>`)
	}
	if s := v.schemeLines(p); len(s) > 0 {
		d := linesPath(s)
		fmt.Fprintf(b, `<g id="scheme" fill="none" stroke-linecap="round" stroke-linejoin="round"><title>%s</title><path d="%s" stroke="%s" stroke-width="7"/><path d="%s" stroke="%s" stroke-width="4"/></g>`,
			xmlText(v.schemeName()), d, schemeCasing, d, schemeColour)
	}
	if c := v.candidateLine(p); len(c) > 0 {
		d := linesPath(c)
		fmt.Fprintf(b, `<g id="best-candidate" fill="none" stroke-linecap="round" stroke-linejoin="round"><title>%s</title><path d="%s" stroke="%s" stroke-width="6"/><path d="%s" stroke="#FFFFFF" stroke-width="2" stroke-dasharray="%s"/></g>`,
			xmlText(v.in.Appraisal.bestLabel()), d, candidateColour, d, candidateDash)
	}
}

// candidateLine is the best candidate link in pixels (nil without one).
func (v *view) candidateLine(p projection) [][][2]float64 {
	r, ok := v.in.Appraisal.best()
	if !ok {
		return nil
	}
	if line := pixelLine(p, partition.NetworkLine{Line: r.Candidate.Link.Line}); len(line) >= 2 {
		return [][][2]float64{line}
	}
	return nil
}

// networkPNG draws the network layers and the scheme into img, clipped
// to the study area.
func (v *view) networkPNG(img *image.RGBA, p projection) {
	x0, y0, x1, y1 := p.mapRect()
	draw := func(lines [][][2]float64, width float64, hex string, dash []float64) {
		c := rgba(hex)
		for _, l := range lines {
			for i := 1; i < len(l); i++ {
				ax, ay, bx, by, ok := clipSegment(l[i-1][0], l[i-1][1], l[i][0], l[i][1], x0, y0, x1, y1)
				if ok {
					drawDashed(img, ax, ay, bx, by, width/2, dash, c)
				}
			}
		}
	}
	layers, _ := v.networkLines(p)
	for i, l := range netLayers {
		draw(layers[i], l.Width, l.Hex, nil)
		if l.Dash != "" {
			draw(layers[i], l.DashW, "#FFFFFF", dashPattern(l.Dash))
		}
	}
	if s := v.schemeLines(p); len(s) > 0 {
		draw(s, 7, schemeCasing, nil)
		draw(s, 4, schemeColour, nil)
	}
	if c := v.candidateLine(p); len(c) > 0 {
		draw(c, 6, candidateColour, nil)
		draw(c, 2, "#FFFFFF", dashPattern(candidateDash))
	}
}

// clipSegment clips a segment to a rectangle (Liang-Barsky) and reports
// whether any of it is left.
func clipSegment(ax, ay, bx, by, x0, y0, x1, y1 float64) (float64, float64, float64, float64, bool) {
	t0, t1 := 0.0, 1.0
	dx, dy := bx-ax, by-ay
	for _, e := range [4][2]float64{{-dx, ax - x0}, {dx, x1 - ax}, {-dy, ay - y0}, {dy, y1 - ay}} {
		pe, q := e[0], e[1]
		if pe == 0 {
			if q < 0 {
				return 0, 0, 0, 0, false
			}
			continue
		}
		r := q / pe
		if pe < 0 {
			t0 = math.Max(t0, r)
		} else {
			t1 = math.Min(t1, r)
		}
	}
	if !(t0 <= t1) {
		return 0, 0, 0, 0, false
	}
	return ax + t0*dx, ay + t0*dy, ax + t1*dx, ay + t1*dy, true
}

// baseEntry is a legend row for a layer of the base map.
type baseEntry struct {
	Layer, Text string
	Hex, Casing string
	Width       float64
	Dash        string
}

// sample draws the entry's line sample at (x, y).
func (e baseEntry) sample(x, y int) string {
	var b strings.Builder
	if e.Casing != "" {
		fmt.Fprintf(&b, `<line x1="%d" y1="%d" x2="%d" y2="%d" stroke="%s" stroke-width="%s"/>`, x, y, x+36, y, e.Casing, fmtPx(e.Width+3))
	}
	fmt.Fprintf(&b, `<line x1="%d" y1="%d" x2="%d" y2="%d" stroke="%s" stroke-width="%s"/>`, x, y, x+36, y, e.Hex, fmtPx(e.Width))
	if e.Dash != "" {
		fmt.Fprintf(&b, `<line x1="%d" y1="%d" x2="%d" y2="%d" stroke="#FFFFFF" stroke-width="1" stroke-dasharray="%s"/>`, x, y, x+36, y, e.Dash)
	}
	return b.String()
}

// baseLegend lists the base map's layers that are drawn: the scheme,
// major and minor roads, railways, rivers and the coast.
func (v *view) baseLegend(p projection) []baseEntry {
	layers, minorDropped := v.networkLines(p)
	has := func(ids ...string) bool {
		for i, l := range netLayers {
			for _, id := range ids {
				if l.ID == id && len(layers[i]) > 0 {
					return true
				}
			}
		}
		return false
	}
	var out []baseEntry
	if len(v.schemeLines(p)) > 0 {
		out = append(out, baseEntry{Layer: "scheme", Text: v.schemeName(), Hex: schemeColour, Casing: schemeCasing, Width: 4})
	}
	if len(v.candidateLine(p)) > 0 {
		out = append(out, baseEntry{Layer: "best-candidate", Text: v.in.Appraisal.bestLabel(), Hex: candidateColour, Width: 6, Dash: candidateDash})
	}
	if has("major-roads-tertiary", "major-roads-secondary", "major-roads-primary", "major-roads-trunk") {
		out = append(out, baseEntry{Layer: "major-roads", Text: "major road (wider: higher class)", Hex: majorColour, Width: 2.2})
	}
	if has("minor-roads") {
		out = append(out, baseEntry{Layer: "minor-roads", Text: "minor road", Hex: minorColour, Width: 1.2})
	} else if minorDropped {
		out = append(out, baseEntry{Layer: "minor-roads", Text: "minor roads left off (too many to draw)", Hex: "#FFFFFF", Width: 1})
	}
	if has("railways") {
		out = append(out, baseEntry{Layer: "railways", Text: "railway", Hex: railColour, Width: 2, Dash: "4 4"})
	}
	if has("rivers", "water-banks") || v.in.Regions.WaterKM2 > 0 {
		out = append(out, baseEntry{Layer: "rivers", Text: "river, canal or water", Hex: riverColour, Width: 4})
	}
	if has("coast") {
		out = append(out, baseEntry{Layer: "coast", Text: "coastline", Hex: coastColour, Width: 1.4})
	}
	return out
}
