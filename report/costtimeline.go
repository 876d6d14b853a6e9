package report

import (
	"fmt"
	"math"
	"strconv"
	"strings"
	"time"

	"narrows/patterns"
)

// The HTML page's timeline: the daily cost (extra vehicle-hours) of the
// costliest weak link before, both periods shaded, the scheme's opening
// day marked. Inline SVG, so the page stays a single file that works
// offline.

// dayLayout is the layout of the scans' days.
const dayLayout = "2006-01-02"

// Colours of the timeline (the periods' shades are pale so the line and
// the mark stand out on paper too).
const (
	beforeShade = "#E3ECF5"
	afterShade  = "#F5EBDC"
	costLine    = "#0072B2"
	openingLine = "#D55E00"
)

// costliestBefore returns the comparison's costliest weak link of the
// before period (the lowest rank there), or nil when none recurred.
func costliestBefore(c *patterns.Comparison) *patterns.Assessment {
	var lead *patterns.Assessment
	for i := range c.Assessments {
		a := &c.Assessments[i]
		if a.InBefore && (lead == nil || a.Finding.Rank < lead.Finding.Rank) {
			lead = a
		}
	}
	return lead
}

// costTimeline returns the timeline SVG and its caption, or "" when there
// is no comparison, no weak link before, no daily series, or the weak
// link's trips are under the publication minimum.
func (v *view) costTimeline() (svg, caption string) {
	c := v.in.Comparison
	if c == nil {
		return "", ""
	}
	lead := costliestBefore(c)
	if lead == nil || v.suppressed(totals(lead.Finding).Trips) {
		return "", ""
	}
	series := lead.DailyCost
	if len(series[0])+len(series[1]) == 0 {
		return "", ""
	}
	days := append(append([]string(nil), c.Before.Days...), c.After.Days...)
	if len(days) == 0 {
		return "", ""
	}
	first, last := dayOf(days[0]), dayOf(days[len(days)-1])
	span := max(last.Sub(first).Hours()/24, 1)
	top := 0.0
	for _, s := range series {
		for _, d := range s {
			if finite(d.Value) {
				top = max(top, d.Value)
			}
		}
	}
	top = niceCeil(top)

	const w, h, left, right, above, below = 720.0, 240.0, 56.0, 16.0, 16.0, 40.0
	xOf := func(day string) float64 {
		return left + (w-left-right)*dayOf(day).Sub(first).Hours()/24/span
	}
	yOf := func(x float64) float64 { return above + (h-above-below)*(1-x/top) }

	var b strings.Builder
	fmt.Fprintf(&b, `<svg xmlns="http://www.w3.org/2000/svg" id="cost-timeline" width="%d" height="%d" viewBox="0 0 %d %d" role="img" aria-labelledby="cost-timeline-title">`, int(w), int(h), int(w), int(h))
	fmt.Fprintf(&b, `<title id="cost-timeline-title">%s</title>`, xmlText("Daily extra vehicle-hours, "+PlaceName(lead.Finding, v.in.Regions)))
	for p, sc := range []*patterns.Scan{c.Before, c.After} {
		if len(sc.Days) == 0 {
			continue
		}
		id, fill := "before", beforeShade
		if p == 1 {
			id, fill = "after", afterShade
		}
		// Each period's band runs over its days, half a day either side.
		x0 := max(left, xOf(sc.Days[0])-0.5*(w-left-right)/span)
		x1 := min(w-right, xOf(sc.Days[len(sc.Days)-1])+0.5*(w-left-right)/span)
		fmt.Fprintf(&b, `<rect id="period-%s" x="%s" y="%s" width="%s" height="%s" fill="%s"><title>%s period</title></rect>`,
			id, fmtPx(x0), fmtPx(above), fmtPx(x1-x0), fmtPx(h-above-below), fill, upperFirst(id))
		fmt.Fprintf(&b, `<text x="%s" y="%s" font-size="11" font-family="sans-serif" fill="#333333">%s</text>`, fmtPx(x0+4), fmtPx(above+12), upperFirst(id))
	}
	// Axes: zero and the top of the scale, the first and last day.
	fmt.Fprintf(&b, `<g font-size="11" font-family="sans-serif" fill="#333333"><line x1="%s" y1="%s" x2="%s" y2="%s" stroke="#777777"/>`, fmtPx(left), fmtPx(h-below), fmtPx(w-right), fmtPx(h-below))
	fmt.Fprintf(&b, `<text x="%s" y="%s" text-anchor="end">0</text><text x="%s" y="%s" text-anchor="end">%s</text>`, fmtPx(left-4), fmtPx(h-below+4), fmtPx(left-4), fmtPx(above+4), strconv.FormatFloat(top, 'g', -1, 64))
	fmt.Fprintf(&b, `<text x="%s" y="%s">%s</text><text x="%s" y="%s" text-anchor="end">%s</text>`, fmtPx(left), fmtPx(h-below+16), first.Format(dayLayout), fmtPx(w-right), fmtPx(h-below+16), last.Format(dayLayout))
	fmt.Fprintf(&b, `<text x="%s" y="%s" text-anchor="middle">extra vehicle-hours per day</text></g>`, fmtPx((w+left)/2), fmtPx(h-6))
	for p, s := range series {
		var pts []string
		for _, d := range s {
			if finite(d.Value) {
				pts = append(pts, fmtPx(xOf(d.Day))+","+fmtPx(yOf(d.Value)))
			}
		}
		if len(pts) > 0 {
			fmt.Fprintf(&b, `<polyline class="cost" data-period="%d" points="%s" fill="none" stroke="%s" stroke-width="1.2"/>`, p, strings.Join(pts, " "), costLine)
		}
	}
	opening := c.Options.Opening
	if opening != "" {
		x := xOf(opening)
		if x >= left && x <= w-right {
			fmt.Fprintf(&b, `<g id="opening" data-day="%s"><line x1="%s" y1="%s" x2="%s" y2="%s" stroke="%s" stroke-width="2" stroke-dasharray="5,3"/>`,
				xmlText(opening), fmtPx(x), fmtPx(above), fmtPx(x), fmtPx(h-below), openingLine)
			anchor, dx := "start", 4.0
			if x > w/2 {
				anchor, dx = "end", -4
			}
			fmt.Fprintf(&b, `<text x="%s" y="%s" text-anchor="%s" font-size="11" font-family="sans-serif" fill="%s">%s</text></g>`,
				fmtPx(x+dx), fmtPx(above+26), anchor, openingLine, xmlText(schemeOpens+" "+opening))
		}
	}
	b.WriteString(`</svg>`)
	caption = "Daily extra vehicle-hours of the costliest weak link before, " + PlaceName(lead.Finding, v.in.Regions) + ", on the days it carried trips: the before and after periods are shaded"
	if opening != "" {
		caption += " and the dashed line marks the scheme's opening (" + opening + ")"
	}
	return b.String(), caption + ". The values are the link's own, before the comparison group's adjustment."
}

// dayOf parses a YYYY-MM-DD day (the zero time when it does not parse; the
// scans' days always do).
func dayOf(day string) time.Time {
	t, _ := time.Parse(dayLayout, day)
	return t
}

// niceCeil rounds x up to a round number (1, 1.5, 2, 3, 4, 5, 6 or 8 times
// a power of ten; 1 for x <= 0).
func niceCeil(x float64) float64 {
	if !(x > 0) || !finite(x) {
		return 1
	}
	p := math.Pow(10, math.Floor(math.Log10(x)))
	for _, m := range []float64{1, 1.5, 2, 3, 4, 5, 6, 8, 10} {
		if m*p >= x {
			return m * p
		}
	}
	return 10 * p
}
