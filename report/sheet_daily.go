package report

import (
	"fmt"
	"slices"
	"sort"
	"strconv"

	"github.com/xuri/excelize/v2"

	"narrows/patterns"
)

// The sheets of days: daily values per finding edge, the timeline of
// candidates and recurring weak links, and every edge-day for the
// speed-against-detour chart. Their charts are in charts.go.

// dailyColumns are the columns of the Daily sheet and of the daily CSV.
var dailyColumns = []string{"Rank", "Weak link", "Period", "Day", "From", "To", "Trips", "Speed km/h", "Detour ratio", "Extra km", "Candidate", "Weak link recurred"}

func (b *book) daily() {
	rows := b.dailyRows()
	if limit := b.v.dailyRowCap(); len(rows) > limit {
		b.dailyMoved(len(rows), limit)
		return
	}
	b.streamTable(SheetDaily, dailyColumns, rows, nil)
}

// dailyRows returns the rows of the Daily sheet: every day of every
// finding edge, by period.
func (b *book) dailyRows() [][]cell {
	v := b.v
	var rows [][]cell
	// An edge can belong to a finding of each period; its days are shown
	// once per period, with the first finding (in the report's order)
	// that holds it.
	for _, p := range v.periods {
		shown := map[patterns.EdgeKey]bool{}
		for _, it := range v.items {
			rec := recurredDays(p.Scan, it.Finding.ID)
			for _, e := range it.Finding.Edges {
				k := patterns.EdgeKey{From: e.From, To: e.To}
				if shown[k] {
					continue
				}
				shown[k] = true
				for _, d := range dailyOf(p, it, k) {
					tr := float64(d.Trips)
					rows = append(rows, []cell{
						intCell(it.Finding.Rank, b.st.intCentre), b.str(it.Finding.ID), b.str(p.Label), b.str(d.Day), b.count(e.From), b.count(e.To),
						b.trips(tr), b.gated(tr, kmh(d.Speed), b.st.dec1), b.gated(tr, d.Detour, b.st.dec2),
						b.gated(tr, (d.DistanceSum-d.StraightSum)/1000, b.st.dec1), yesNo(d.Candidate, b.st.centre), yesNo(rec[d.Day], b.st.centre),
					})
				}
			}
		}
	}
	return rows
}

// recurredDays returns the days on which the finding with id recurred in
// scan sc, or nil when it did not recur there.
func recurredDays(sc *patterns.Scan, id string) map[string]bool {
	for _, f := range sc.Findings {
		if f.ID == id {
			m := make(map[string]bool, len(f.Days))
			for _, d := range f.Days {
				m[d] = true
			}
			return m
		}
	}
	return nil
}

// timelineDay is one analysed day of the Timeline sheet.
type timelineDay struct {
	day, period      string
	cands, recurring int
}

func (b *book) timeline() {
	s := b.newSheet(SheetTimeline)
	cols := []string{"Day", "Period", "Candidates", "Weak links"}
	opening, mark := b.v.openingMark()
	if opening != "" {
		cols = append(cols, schemeOpens)
	}
	head := s.header(cols...)
	days := b.v.timelineDays()
	marked := false
	for _, d := range days {
		row := []cell{b.str(d.day), b.str(d.period), b.count(d.cands), b.count(d.recurring)}
		if opening != "" {
			// The mark stands on the first analysed day from the opening.
			if !marked && d.day >= opening {
				row, marked = append(row, b.count(mark)), true
			} else {
				row = append(row, cell{})
			}
		}
		s.add(row...)
	}
	s.filter(head, len(cols))
	s.finish()
	if b.err != nil || len(days) == 0 {
		return
	}
	b.timelineChart(head, len(days), opening != "")
}

// schemeOpens is the Timeline column and chart series that marks the day
// the scheme opened.
const schemeOpens = "Scheme opens"

// openingMark returns the scheme's opening day of a comparison ("" when
// not given) and the height of its mark on the timeline: the largest daily
// count, so that the mark stands above the lines.
func (v *view) openingMark() (day string, height int) {
	c := v.in.Comparison
	if c == nil || c.Options.Opening == "" {
		return "", 0
	}
	for _, d := range v.timelineDays() {
		height = max(height, d.cands, d.recurring)
	}
	return c.Options.Opening, max(height, 1)
}

// timelineDays lists the analysed days of every period in day order, with
// their candidate counts and the number of weak links recurring on them.
func (v *view) timelineDays() []timelineDay {
	var days []timelineDay
	for _, p := range v.periods {
		on := map[string]int{}
		for _, f := range p.Scan.Findings {
			for _, d := range f.Days {
				on[d]++
			}
		}
		for i, d := range p.Scan.Days {
			c := 0
			if i < len(p.Scan.CandidatesPerDay) {
				c = p.Scan.CandidatesPerDay[i]
			} else if i < len(p.Scan.DayCandidates) {
				c = len(p.Scan.DayCandidates[i])
			}
			days = append(days, timelineDay{d, p.Label, c, on[d]})
		}
	}
	sort.SliceStable(days, func(i, j int) bool { return days[i].day < days[j].day })
	return days
}

// edgeDay is one edge on one day of one period (an index into v.periods).
type edgeDay struct {
	period int
	key    patterns.EdgeKey
	d      patterns.DailyValue
}

// scatter writes the Speed v detour sheet and its chart from the rows
// scatterRows made.
func (b *book) scatter(t scatterTable) {
	cols := []string{"Candidate", "Period", "Day", "From", "To", "Trips", "Speed km/h", "Detour ratio"}
	b.streamTable(SheetScatter, cols, t.rows, func(head int) {
		if len(t.rows) == 0 || head+len(t.rows) > excelize.TotalRows {
			return
		}
		b.scatterChart(head, t.blocks, t.notes)
	})
}

// scatterTable is what the Speed v detour sheet lists: its rows, the
// chart's series as blocks of rows and the notes on thinning.
type scatterTable struct {
	rows   [][]cell
	blocks []scatterBlock
	notes  []string
}

// scatterRows makes the rows of the Speed v detour sheet. It reads only
// the view and the styles, so it may run while other sheets are written.
func (b *book) scatterRows() scatterTable {
	v := b.v
	// Shown edge-days by period, non-candidates before candidates, so that
	// each chart series is one block of rows; suppressed edge-days come
	// last and stay out of the chart (their cells hold markers, not
	// numbers).
	block := func(pt edgeDay) int {
		if v.suppressed(float64(pt.d.Trips)) {
			return 2 * len(v.periods)
		}
		k := 2 * pt.period
		if pt.d.Candidate {
			k++
		}
		return k
	}
	// The edge-days in their order (period, pair, day) are put in their
	// blocks, each block keeping that order.
	buckets := make([][]edgeDay, 2*len(v.periods)+1)
	for pi, p := range v.periods {
		for _, k := range sortedEdgeKeys(p.Scan.EdgeDaily) {
			for _, d := range p.Scan.EdgeDaily[k] {
				pt := edgeDay{pi, k, d}
				buckets[block(pt)] = append(buckets[block(pt)], pt)
			}
		}
	}
	pts := slices.Concat(buckets...)
	pts, thinned := thinContext(pts, len(v.periods))
	var blocks []scatterBlock
	const width = 8
	rows, cells := make([][]cell, len(pts)), make([]cell, width*len(pts))
	for i, pt := range pts {
		if k := block(pt); k < 2*len(v.periods) {
			if n := len(blocks); n == 0 || block(pts[blocks[n-1].from]) != k {
				blocks = append(blocks, scatterBlock{period: v.periods[pt.period].Label, candidate: pt.d.Candidate, from: i})
			}
			blocks[len(blocks)-1].to = i + 1
		}
		tr := float64(pt.d.Trips)
		rows[i] = cells[width*i : width*(i+1) : width*(i+1)]
		copy(rows[i], []cell{yesNo(pt.d.Candidate, b.st.centre), b.str(v.periods[pt.period].Label), b.str(pt.d.Day), b.count(pt.key.From), b.count(pt.key.To),
			b.trips(tr), b.gated(tr, kmh(pt.d.Speed), b.st.dec1), b.gated(tr, pt.d.Detour, b.st.dec2)})
	}
	var notes []string
	for _, t := range thinned {
		notes = append(notes, v.periods[t.period].Label+" "+t.String())
	}
	return scatterTable{rows: rows, blocks: blocks, notes: notes}
}

// maxContextEdgeDays bounds the edge-days of one period that were not
// candidates on the Speed v detour sheet. A city's year has about 10⁵ of
// them: listed whole they took most of the workbook's writing time, and
// a chart of that many points opens slowly and shows no more than a
// regular sample of them does.
const maxContextEdgeDays = 10000

// thinning says how one period's non-candidate edge-days were thinned.
type thinning struct {
	period          int
	every, of, kept int
}

// String says what was thinned, for the chart's title.
func (t thinning) String() string {
	return fmt.Sprintf("every %s of %d non-candidate edge-days", ordinal(t.every), t.of)
}

// ordinal writes 2 as "2nd", 3 as "3rd", 11 as "11th".
func ordinal(n int) string {
	suffix := "th"
	switch {
	case n%100 >= 11 && n%100 <= 13:
	case n%10 == 1:
		suffix = "st"
	case n%10 == 2:
		suffix = "nd"
	case n%10 == 3:
		suffix = "rd"
	}
	return strconv.Itoa(n) + suffix
}

// thinContext keeps, of each period's edge-days that were not candidates
// (shown or suppressed), every k-th in their order when there are more
// than maxContextEdgeDays, with k the smallest that brings them under it;
// candidate edge-days are all kept. pts are in block order, which thinning
// keeps.
func thinContext(pts []edgeDay, periods int) ([]edgeDay, []thinning) {
	context := make([]int, periods)
	for _, pt := range pts {
		if !pt.d.Candidate {
			context[pt.period]++
		}
	}
	every := make([]int, periods)
	var out []thinning
	for p, n := range context {
		every[p] = 1
		if n > maxContextEdgeDays {
			every[p] = (n + maxContextEdgeDays - 1) / maxContextEdgeDays
			out = append(out, thinning{period: p, every: every[p], of: n, kept: (n + every[p] - 1) / every[p]})
		}
	}
	if len(out) == 0 {
		return pts, nil
	}
	seen := make([]int, periods)
	kept := pts[:0:0]
	for _, pt := range pts {
		if !pt.d.Candidate {
			i := seen[pt.period]
			seen[pt.period]++
			if i%every[pt.period] != 0 {
				continue
			}
		}
		kept = append(kept, pt)
	}
	return kept, out
}
