package report

import (
	"fmt"
	"html/template"
	"io"
	"strconv"
	"strings"
	"unicode/utf8"

	"narrows/patterns"
)

// WriteHTML writes to w a single page that opens offline (no scripts, fonts
// or links to fetch): the headline and the cautions, the verdict table, an
// inline SVG map of regions and weak links coloured by verdict with a
// legend, the ranked weak links, and the input files. The page is also
// well-formed XML. Nothing is written to w when in is not valid.
func WriteHTML(w io.Writer, in Input) error {
	return render(w, in, (*view).html)
}

type htmlVerdict struct {
	Name, Meaning, Colour, Text string
	Count, Focus                int
}

// htmlSummaryRow is one weak link of the summary at the top of the page.
type htmlSummaryRow struct {
	Cells        []string
	Colour, Text string // the verdict's colours ("" without comparison)
}

type htmlRow struct {
	Rank                               int
	ID, Name, Edges, Verdict           string
	Colour, Text                       string
	Share, Trips, Speed, Detour        string
	ExtraKM, ExtraHours                string
	ShareBefore, ShareAfter            string
	Period                             string // the period that ranks the row
	CostBefore, CostAfter, GroupChange string
	CostShift, TimeShift, Note         string
	DetourChange                       string
	CostCI, TimeCI                     string // 95 % intervals of the adjusted changes
	Focus                              bool
}

type htmlPage struct {
	Title, Area, Headline, Version string
	Network, Scheme                string
	SummaryHead                    []string
	Summary                        []htmlSummaryRow
	SummaryMore                    int
	Periods                        [][2]string
	Comparing, Focus               bool
	Verdicts                       []htmlVerdict
	Rows                           []htmlRow
	Map                            template.HTML
	MapCaption                     string
	Cautions                       []string
	Inputs                         [][2]string
	Analysed                       [][2]string
	MinTrips                       int
	Timeline                       template.HTML // inline SVG, built from escaped parts
	TimelineCaption                string
	Appraisal                      *htmlAppraisal
}

// htmlAppraisal is the page's section on candidate links.
type htmlAppraisal struct {
	Title, Routed, Observed string
	Rows                    []htmlCandidate
	Notes                   []string
}

var pageTemplate = template.Must(template.New("page").Parse(`<!DOCTYPE html>
<html lang="en" xmlns="http://www.w3.org/1999/xhtml">
<head>
<meta charset="utf-8"/>
<meta name="viewport" content="width=device-width, initial-scale=1"/>
<title>{{.Title}}</title>
<style>
body { font-family: sans-serif; margin: 1.5em auto; max-width: 68em; padding: 0 1em; color: #000000; }
table { border-collapse: collapse; margin: 0.5em 0 1.5em 0; }
th, td { border: 1px solid #BBBBBB; padding: 0.2em 0.5em; text-align: left; vertical-align: top; }
td.num { text-align: right; white-space: nowrap; }
td.why { font-size: 0.85em; min-width: 22em; }
.ci { font-size: 0.85em; color: #444444; }
table#findings { font-size: 0.95em; }
.nowrap { white-space: nowrap; }
.cautions { border: 1px solid #E69F00; background: #FFF8E6; padding: 0.3em 1em; margin: 0.5em 0 1.5em 0; }
.cautions h2 { font-size: 1.1em; margin: 0.4em 0; }
.caption { max-width: 50em; }
.swatch { display: inline-block; min-width: 6em; padding: 0.1em 0.4em; }
.headline { font-size: 1.2em; }
.supp { color: #777777; }
table#summary td:nth-child(2) { min-width: 18em; }
details.reason { font-size: 0.85em; }
details.reason summary { cursor: pointer; color: #333333; }
</style>
</head>
<body>
<h1>{{.Title}}</h1>
{{if .Area}}<p>{{.Area}}</p>{{end}}
<p class="headline">{{.Headline}}</p>
{{if .Network}}<p>{{.Network}}</p>{{end}}
<table>
{{if .Scheme}}<tr><th>Scheme</th><td>{{.Scheme}}</td></tr>
{{end}}{{range .Periods}}<tr><th>{{index . 0}}</th><td>{{index . 1}}</td></tr>
{{end}}</table>
{{if .Summary}}<table id="summary">
<tr>{{range .SummaryHead}}<th>{{.}}</th>{{end}}</tr>
{{range $r := .Summary}}<tr>{{range $i, $c := $r.Cells}}{{if eq $i 2}}{{if $.Comparing}}<td><span class="swatch" style="background: {{$r.Colour}}; color: {{$r.Text}}">{{$c}}</span></td>{{else}}<td class="num">{{$c}}</td>{{end}}{{else if eq $i 1}}<td>{{$c}}</td>{{else}}<td class="num">{{$c}}</td>{{end}}{{end}}</tr>
{{end}}</table>{{if .SummaryMore}}<p>and {{.SummaryMore}} more under Weak links below.</p>{{end}}{{end}}
<div class="cautions">
<h2>Cautions</h2>
<ul id="cautions">
{{range .Cautions}}<li>{{.}}</li>
{{end}}</ul>
</div>
<h2>Map</h2>
<p class="caption">{{.MapCaption}}</p>
{{.Map}}
{{if .Comparing}}<h2>Verdicts</h2>
<table id="verdicts">
<tr><th>Verdict</th><th>Weak links</th><th>Meaning</th>{{if .Focus}}<th>In focus area</th>{{end}}</tr>
{{range .Verdicts}}<tr><td><span class="swatch" style="background: {{.Colour}}; color: {{.Text}}">{{.Name}}</span></td><td class="num">{{.Count}}</td><td>{{.Meaning}}</td>{{if $.Focus}}<td class="num">{{.Focus}}</td>{{end}}</tr>
{{end}}</table>{{end}}
{{if .Timeline}}<h2>Timeline</h2>
<p class="caption">{{.TimelineCaption}}</p>
{{.Timeline}}
{{end}}<h2>Weak links</h2>
{{if .Rows}}<table id="findings">
<tr>{{if .Comparing}}<th>Rank (period)</th>{{else}}<th>Rank</th>{{end}}<th>Place (edges)</th>{{if .Comparing}}<th>Verdict</th><th>Cost before veh-h/day (95 % CI)</th><th>Cost after veh-h/day (95 % CI)</th><th>Adjusted change veh-h/day (95 % CI)</th><th>Adjusted travel time change min (95 % CI)</th>{{else}}<th>Share of days</th><th>Trips per day</th><th>Speed km/h</th><th>Detour ratio</th><th>Extra km per day</th><th>Extra vehicle-hours per day</th>{{end}}</tr>
{{range .Rows}}<tr><td class="num">{{.Rank}}{{if $.Comparing}} ({{.Period}}){{end}}</td><td title="Edges {{.Edges}}">{{.Name}} <span class="ci">({{.ID}})</span>{{if .Focus}} (focus){{end}}</td>{{if $.Comparing}}<td><span class="swatch" style="background: {{.Colour}}; color: {{.Text}}">{{.Verdict}}</span></td><td class="num">{{.CostBefore}}</td><td class="num">{{.CostAfter}}</td><td class="num">{{.CostShift}}{{if .CostCI}}<br/><span class="ci">{{.CostCI}}</span>{{end}}</td><td class="num">{{.TimeShift}}{{if .TimeCI}}<br/><span class="ci">{{.TimeCI}}</span>{{end}}</td>{{else}}<td class="num">{{.Share}}</td><td class="num">{{.Trips}}</td><td class="num">{{.Speed}}</td><td class="num">{{.Detour}}</td><td class="num">{{.ExtraKM}}</td><td class="num">{{.ExtraHours}}</td>{{end}}</tr>
{{if $.Comparing}}<tr class="reason"><td></td><td colspan="6"><details class="reason"><summary>Reason and details</summary><p>{{.Note}}</p><p>Comparison group change {{.GroupChange}}; detour ratio before, after {{.DetourChange}}; days on the skyline before {{.ShareBefore}}, after {{.ShareAfter}}.</p></details></td></tr>
{{end}}{{end}}</table>{{else}}<p>No weak link recurred.</p>{{end}}
{{with .Appraisal}}<h2>Candidate links</h2>
<p>{{.Title}}. {{.Routed}}</p>
<table id="candidates">
<tr><th>Rank</th><th>Candidate</th><th>Kind</th><th>Length km</th><th>Vehicle-km saved per day</th><th>Vehicle-hours saved per day</th><th>Share of trips using it</th><th>Detour with it</th><th>Vehicle-hours saved per day per km</th></tr>
{{range .Rows}}<tr><td class="num">{{.Rank}}</td><td>{{.Name}}{{if .Best}} (on the map){{end}}</td><td>{{.Kind}}</td><td class="num">{{.KM}}</td><td class="num">{{.VehKM}}</td><td class="num">{{.VehH}}</td><td class="num">{{.Using}}</td><td class="num">{{.Detour}}</td><td class="num">{{.PerKM}}</td></tr>
{{end}}</table>
{{if .Observed}}<p>{{.Observed}}</p>{{end}}
<ul id="candidate-notes">
{{range .Notes}}<li>{{.}}</li>
{{end}}</ul>
{{end}}<h2>What was analysed</h2>
<table id="analysed">
{{range .Analysed}}<tr><th>{{index . 0}}</th><td>{{index . 1}}</td></tr>
{{end}}</table>
<h2>Inputs</h2>
<table>
<tr><th>File</th><th>SHA-256</th></tr>
{{range .Inputs}}<tr><td>{{index . 0}}</td><td><code>{{index . 1}}</code></td></tr>
{{end}}</table>
<p>Made by narrows {{.Version}}. Regions from OpenStreetMap data, © OpenStreetMap contributors, ODbL.</p>
</body>
</html>
`))

func (v *view) html(w io.Writer) error {
	pg := htmlPage{
		Title:      v.in.Title,
		Area:       v.in.Area,
		Headline:   Headline(v.in),
		Version:    v.in.Version,
		Comparing:  v.comparing(),
		Focus:      len(v.focusCounts) > 0,
		Map:        template.HTML(v.svg()), // built from escaped parts in svg()
		MapCaption: v.mapCaption(),
		Cautions:   v.cautions(),
		MinTrips:   v.minTrips,
	}
	if pg.Title == "" {
		pg.Title = "narrows study"
	}
	if pg.Version == "" {
		pg.Version = "(version not given)"
	}
	pg.Network, pg.Scheme = NetworkChange(v.in), v.schemeLine()
	svg, caption := v.costTimeline()
	pg.Timeline, pg.TimelineCaption = template.HTML(svg), caption // built from escaped parts in costTimeline()
	pg.SummaryHead = v.summaryColumns()
	sum, vds, more := v.summaryRows()
	for i, cells := range sum {
		r := htmlSummaryRow{Cells: cells}
		if v.comparing() {
			lk := lookOf(vds[i])
			r.Colour, r.Text = lk.Hex, lk.Text
		}
		pg.Summary = append(pg.Summary, r)
	}
	pg.SummaryMore = more
	for _, p := range v.periods {
		pg.Periods = append(pg.Periods, [2]string{"Period " + p.Label, dayRange(p.Scan) + ", " + strconv.Itoa(len(p.Scan.Days)) + " analysed days"})
	}
	for _, vd := range v.shownVerdicts() {
		lk := lookOf(vd)
		pg.Verdicts = append(pg.Verdicts, htmlVerdict{string(vd), verdictMeaning(vd), lk.Hex, lk.Text, v.counts[vd], v.focusCounts[vd]})
	}
	for _, it := range v.items {
		f := it.Finding
		t := totals(f)
		lk := lookOf(it.Verdict())
		row := htmlRow{Rank: f.Rank, ID: f.ID, Name: it.Name, Verdict: string(it.Verdict()), Colour: lk.Hex, Text: lk.Text, Share: formatPercent(f.Share)}
		for i, e := range f.Edges {
			if i > 0 {
				row.Edges += ", "
			}
			row.Edges += edgeLabel(e.From, e.To)
		}
		if v.suppressed(t.Trips) {
			row.Trips, row.Speed, row.Detour, row.ExtraKM, row.ExtraHours = v.countMark(), v.valueMark(), v.valueMark(), v.valueMark(), v.valueMark()
		} else {
			row.Trips = strconv.FormatFloat(roundTo(t.Trips, 1), 'f', -1, 64)
			row.Speed = fmtFixed(kmh(t.Speed), 1)
			row.Detour = fmtFixed(t.Detour, 2)
			row.ExtraKM = fmtFixed(f.ExtraKMPerDay, 1)
			row.ExtraHours = fmtFixed(f.ExtraHoursPerDay, 2)
		}
		if a := it.Assessment; a != nil {
			row.Focus = a.Focus
			row.Period = "before"
			if !a.InBefore {
				row.Period = "after"
			}
			row.ShareBefore = fmtShare(a.DaysBefore, a.TotalBefore)
			row.ShareAfter = fmtShare(a.DaysAfter, a.TotalAfter)
			if v.suppressed(t.Trips) {
				row.CostBefore, row.CostAfter, row.CostShift, row.TimeShift, row.DetourChange = v.valueMark(), v.valueMark(), v.valueMark(), v.valueMark(), v.valueMark()
			} else {
				c := a.Effects[patterns.Cost]
				row.CostBefore, row.CostAfter = levelWithCI(c.Before, c.BeforeLow, c.BeforeHigh), levelWithCI(c.After, c.AfterLow, c.AfterHigh)
				row.GroupChange = formatPercentChange(c.Group)
				row.CostShift, row.CostCI = fmtInterval(c.Adjusted.Shift, c.Adjusted.Low, c.Adjusted.High, 1)
				dt := a.Effects[patterns.Detour]
				row.DetourChange = fmtFixed(dt.Before, 2) + ", " + fmtFixed(dt.After, 2)
				tt := a.Effects[patterns.TravelTime]
				row.TimeShift, row.TimeCI = fmtInterval(tt.Adjusted.Shift/60, tt.Adjusted.Low/60, tt.Adjusted.High/60, 1)
			}
			row.Note = Reason(a)
		}
		pg.Rows = append(pg.Rows, row)
	}
	for _, s := range v.in.Inputs {
		pg.Inputs = append(pg.Inputs, [2]string{s.Path, s.SHA256})
	}
	pg.Analysed = v.analysed()
	if ap := v.in.Appraisal; ap != nil {
		pg.Appraisal = &htmlAppraisal{Title: ap.title(), Routed: ap.routedLine(), Observed: ap.observedLine(), Rows: ap.htmlCandidates(), Notes: appraisalNotes(ap.Result)}
	}
	pg.clean()
	if err := pageTemplate.Execute(w, pg); err != nil {
		return fmt.Errorf("report: HTML page: %w", err)
	}
	return nil
}

// fmtFixed formats x with d decimals; non-finite values as "n/a".
func fmtFixed(x float64, d int) string {
	if !finite(x) {
		return "n/a"
	}
	return strconv.FormatFloat(roundTo(x, d), 'f', d, 64)
}

func fmtShare(days, total int) string {
	if total <= 0 {
		return "n/a"
	}
	return fmt.Sprintf("%d/%d (%s)", days, total, formatPercent(float64(days)/float64(total)))
}

func fmtInterval(x, lo, hi float64, d int) (shift, interval string) {
	if !finite(x) {
		return "n/a", ""
	}
	shift = fmtFixed(x, d)
	if roundTo(x, d) > 0 {
		shift = "+" + shift
	}
	if finite(lo) && finite(hi) {
		interval = "(" + fmtFixed(lo, d) + " to " + fmtFixed(hi, d) + ")"
	}
	return shift, interval
}

// clean replaces, in every text of the page, the characters XML cannot
// hold (and invalid UTF-8) by U+FFFD, so that data text such as road names
// cannot break the page. html/template escapes markup but passes control
// characters through.
func (pg *htmlPage) clean() {
	pg.Title, pg.Area, pg.Headline, pg.Version = cleanText(pg.Title), cleanText(pg.Area), cleanText(pg.Headline), cleanText(pg.Version)
	pg.MapCaption, pg.Network, pg.Scheme = cleanText(pg.MapCaption), cleanText(pg.Network), cleanText(pg.Scheme)
	pg.TimelineCaption = cleanText(pg.TimelineCaption)
	for i := range pg.Summary {
		for j := range pg.Summary[i].Cells {
			pg.Summary[i].Cells[j] = cleanText(pg.Summary[i].Cells[j])
		}
	}
	for i := range pg.Periods {
		pg.Periods[i] = [2]string{cleanText(pg.Periods[i][0]), cleanText(pg.Periods[i][1])}
	}
	for i := range pg.Inputs {
		pg.Inputs[i] = [2]string{cleanText(pg.Inputs[i][0]), cleanText(pg.Inputs[i][1])}
	}
	for i := range pg.Analysed {
		pg.Analysed[i] = [2]string{cleanText(pg.Analysed[i][0]), cleanText(pg.Analysed[i][1])}
	}
	for i := range pg.Verdicts {
		pg.Verdicts[i].Name, pg.Verdicts[i].Meaning = cleanText(pg.Verdicts[i].Name), cleanText(pg.Verdicts[i].Meaning)
	}
	for i := range pg.Rows {
		r := &pg.Rows[i]
		r.ID, r.Name, r.Edges, r.Verdict, r.Note = cleanText(r.ID), cleanText(r.Name), cleanText(r.Edges), cleanText(r.Verdict), cleanText(r.Note)
	}
	if a := pg.Appraisal; a != nil {
		a.Title, a.Routed, a.Observed = cleanText(a.Title), cleanText(a.Routed), cleanText(a.Observed)
		for i := range a.Rows {
			a.Rows[i].Name = cleanText(a.Rows[i].Name)
		}
	}
	for i := range pg.Cautions {
		pg.Cautions[i] = cleanText(pg.Cautions[i])
	}
}

// cleanText maps characters outside the XML 1.0 character range, and bytes
// of invalid UTF-8, to U+FFFD.
func cleanText(s string) string {
	ok := utf8.ValidString(s)
	for _, r := range s {
		if !xmlChar(r) {
			ok = false
			break
		}
	}
	if ok {
		return s
	}
	return strings.Map(func(r rune) rune {
		if !xmlChar(r) {
			return utf8.RuneError
		}
		return r
	}, strings.ToValidUTF8(s, string(utf8.RuneError)))
}

// xmlChar reports whether r may appear in an XML 1.0 document.
func xmlChar(r rune) bool {
	return r == 0x09 || r == 0x0A || r == 0x0D ||
		r >= 0x20 && r <= 0xD7FF ||
		r >= 0xE000 && r <= 0xFFFD ||
		r >= 0x10000 && r <= 0x10FFFF
}

// analysed lists what the page's numbers come from: the regions and their
// extract, the day graphs' time zone and windows, the periods and every
// setting of the study (days, minimum trips, support, focus, excluded
// days, ...), in the order given.
func (v *view) analysed() [][2]string {
	r := v.in.Regions
	regions := strconv.Itoa(len(r.Regions)) + " regions"
	if r.Source != "" {
		regions += " from " + r.Source
	}
	out := [][2]string{{"regions", regions}}
	if m := v.in.Store; m != nil {
		if m.TimeZone != "" {
			out = append(out, [2]string{"time zone of the days", m.TimeZone})
		}
		var wins []string
		for _, w := range m.Windows {
			wins = append(wins, w.String())
		}
		if len(wins) > 0 {
			out = append(out, [2]string{"time windows", strings.Join(wins, ", ")})
		}
	}
	for _, p := range v.periods {
		out = append(out, [2]string{"days analysed, " + p.Label, dayRange(p.Scan) + " (" + strconv.Itoa(len(p.Scan.Days)) + " days)"})
	}
	out = append(out, v.in.Settings...)
	if len(v.in.Scheme) > 0 {
		out = append(out, [2]string{"scheme on the map", v.schemeName()})
	}
	return out
}
