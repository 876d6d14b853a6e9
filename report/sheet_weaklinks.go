package report

import (
	"strconv"
	"strings"

	"narrows/patterns"
)

// The sheets of the weak links: one row per finding, one per finding edge,
// and, in a comparison, one per assessment with its statistics.

func (b *book) findings() {
	v := b.v
	s := b.newSheet(SheetFindings)
	cols := append(v.rankColumns(), "Place", "Weak link", "Regions", "Edges", "Days weak", "Share of days", "Trips per day", "Speed km/h", "Detour ratio", "Extra km per day", "Extra vehicle-hours per day")
	if v.comparing() {
		cols = append(cols, "Verdict", "Focus")
	}
	head := s.header(cols...)
	for _, it := range v.items {
		f := it.Finding
		t := totals(f)
		edges := make([]string, len(f.Edges))
		for i, e := range f.Edges {
			edges[i] = edgeLabel(e.From, e.To)
		}
		row := append(b.rankCells(it), b.str(it.Name), b.str(f.ID), b.str(joinInts(f.Regions)), b.str(strings.Join(edges, ", ")),
			b.count(len(f.Days)), numCell(f.Share, b.st.pct))
		row = append(row, b.measures(t.Trips, t.Speed, t.Detour, f.ExtraKMPerDay, f.ExtraHoursPerDay)...)
		if a := it.Assessment; a != nil {
			row = append(row, textCell(string(a.Verdict), b.st.verdict[a.Verdict]), yesNo(a.Focus, b.st.centre))
		}
		s.add(row...)
	}
	b.totalRows(s, len(v.rankColumns())+9)
	s.filter(head, len(cols))
	s.finish()
}

// totalRows adds, per period, a row with the sum of the findings' extra
// km and vehicle-hours per day in the last two of width columns. Each
// directed pair is in one finding of a period, so the sums count every
// edge once; the two periods are never added together.
func (b *book) totalRows(s *sheet, width int) {
	for _, p := range b.v.periods {
		var km, hours float64
		n := 0
		for _, it := range b.v.items {
			if b.v.periodOf(it) != p.Label {
				continue
			}
			km += it.Finding.ExtraKMPerDay
			hours += it.Finding.ExtraHoursPerDay
			n++
		}
		row := make([]cell, width)
		label := "Total, " + strconv.Itoa(n) + " " + plural(n, "place", "places")
		if b.v.comparing() {
			label += " " + p.Label
		}
		row[0] = b.str(label)
		row[width-2] = numCell(km, b.st.dec1)
		row[width-1] = numCell(hours, b.st.dec2)
		s.add(row...)
	}
}

func (b *book) edges() {
	v := b.v
	s := b.newSheet(SheetEdges)
	cols := append(v.rankColumns(), "Place", "Weak link", "From", "To", "Days weak", "Share of days", "Trips per day", "Speed km/h", "Detour ratio", "Extra km per day", "Extra vehicle-hours per day", "Days with trips")
	if v.comparing() {
		cols = append(cols, "Verdict")
	}
	head := s.header(cols...)
	for _, it := range v.items {
		for _, e := range it.Finding.Edges {
			row := append(b.rankCells(it), b.str(it.Name), b.str(it.Finding.ID), b.count(e.From), b.count(e.To), b.count(len(e.Days)), numCell(e.Share, b.st.pct))
			row = append(row, b.measures(e.TripsMedian, e.SpeedMedian, e.DetourMedian, e.ExtraKMPerDay, e.ExtraHoursPerDay)...)
			row = append(row, b.count(len(e.Daily)))
			if vd := it.Verdict(); v.comparing() {
				row = append(row, textCell(string(vd), b.st.verdict[vd]))
			}
			s.add(row...)
		}
	}
	s.filter(head, len(cols))
	s.finish()
}

// comparisonKey are the Comparison sheet's columns after the rank
// columns, in order: what a reader needs to see on a printed page. Every
// other column goes to the Comparison detail sheet, which repeats the rank
// columns, the place and the weak link as keys.
var comparisonKey = []string{"Place", "Weak link", "Verdict",
	"Cost before veh-h/day", "Cost before CI low", "Cost before CI high", "Cost after veh-h/day", "Cost after CI low", "Cost after CI high",
	"Cost adjusted change", "Cost adjusted CI low", "Cost adjusted CI high", "Reason"}

// comparisonKeys are the columns both comparison sheets carry.
var comparisonKeys = map[string]bool{"Place": true, "Weak link": true}

func (b *book) comparison() {
	v := b.v
	cols := append(v.rankColumns(), "Place", "Weak link", "Verdict", "Decided by", "Focus",
		"Cost before veh-h/day", "Cost before CI low", "Cost before CI high", "Cost after veh-h/day", "Cost after CI low", "Cost after CI high", "Cost raw change", "Comparison group change", "Cost adjusted change", "Cost adjusted CI low", "Cost adjusted CI high", "Cost adjusted change share", "Cost p adjusted",
		"Travel time before min", "Travel time after min", "Travel time raw change", "Comparison group travel time change", "Travel time adjusted change", "Travel time adjusted CI low", "Travel time adjusted CI high", "Travel time adjusted change share", "Travel time p adjusted",
		"Trips per day before", "Trips per day after", "Speed before km/h", "Speed after km/h", "Detour ratio before", "Detour ratio after",
		"Days at the fixed bar before", "Days with trips before", "Days at the fixed bar after", "Days with trips after", "Comparison pairs",
		"Skyline days before", "Skyline days after", "Days analysed before", "Days analysed after", "Fisher p adjusted", "Reason")
	var rows [][]cell
	for _, it := range v.items {
		a := it.Assessment
		t := totals(a.Finding)
		c, tt := a.Effects[patterns.Cost], a.Effects[patterns.TravelTime]
		g := func(x float64, style int) cell { return b.gated(t.Trips, x, style) }
		minutes := func(x float64) float64 { return x / 60 }
		pct := func(x float64) cell {
			if !finite(x) {
				return cell{}
			}
			return numCell(x, b.st.pct)
		}
		rows = append(rows, append(b.rankCells(it), b.str(it.Name), b.str(a.Finding.ID), textCell(string(a.Verdict), b.st.verdict[a.Verdict]), b.str(string(a.Basis)), yesNo(a.Focus, b.st.centre),
			g(c.Before, b.st.dec1), g(c.BeforeLow, b.st.dec1), g(c.BeforeHigh, b.st.dec1), g(c.After, b.st.dec1), g(c.AfterLow, b.st.dec1), g(c.AfterHigh, b.st.dec1), g(c.Raw, b.st.signed1), pct(c.Group), g(c.Adjusted.Shift, b.st.signed1), g(c.Adjusted.Low, b.st.signed1), g(c.Adjusted.High, b.st.signed1), pct(c.Relative), b.pval(c.Adjusted.PAdjusted),
			g(minutes(tt.Before), b.st.dec1), g(minutes(tt.After), b.st.dec1), g(minutes(tt.Raw), b.st.signed1), pct(tt.Group), g(minutes(tt.Adjusted.Shift), b.st.signed1), g(minutes(tt.Adjusted.Low), b.st.signed1), g(minutes(tt.Adjusted.High), b.st.signed1), pct(tt.Relative), b.pval(tt.Adjusted.PAdjusted),
			g(a.Effects[patterns.Trips].Before, b.st.dec1), g(a.Effects[patterns.Trips].After, b.st.dec1),
			g(kmh(a.Effects[patterns.Speed].Before), b.st.dec1), g(kmh(a.Effects[patterns.Speed].After), b.st.dec1),
			g(a.Effects[patterns.Detour].Before, b.st.dec2), g(a.Effects[patterns.Detour].After, b.st.dec2),
			b.count(a.BarDays[0]), b.count(a.DaysWithTrips[0]), b.count(a.BarDays[1]), b.count(a.DaysWithTrips[1]), b.count(len(a.Group.Edges)),
			b.count(a.DaysBefore), b.count(a.DaysAfter), b.count(a.TotalBefore), b.count(a.TotalAfter), b.pval(a.FisherPAdjusted),
			textCell(Reason(a), b.st.wrap),
		))
	}
	// Split the columns: the rank columns lead both sheets; the key
	// columns in comparisonKey's order, the rest in their own order.
	nr := len(v.rankColumns())
	at := map[string]int{}
	for i, c := range cols {
		at[c] = i
	}
	key, detail := make([]int, 0, nr+len(comparisonKey)), make([]int, 0, len(cols))
	for i := range nr {
		key, detail = append(key, i), append(detail, i)
	}
	inKey := map[string]bool{}
	for _, c := range comparisonKey {
		key = append(key, at[c])
		inKey[c] = true
	}
	for i, c := range cols[nr:] {
		if !inKey[c] || comparisonKeys[c] {
			detail = append(detail, nr+i)
		}
	}
	b.comparisonSheet(SheetComparison, cols, rows, key, true)
	b.comparisonSheet(SheetComparisonDetail, cols, rows, detail, false)
}

// comparisonSheet writes the columns idx of cols and rows as sheet name;
// with reason, its last column is the wrapping reason.
func (b *book) comparisonSheet(name string, cols []string, rows [][]cell, idx []int, reason bool) {
	s := b.newSheet(name)
	pick := func(all []string) []string {
		out := make([]string, len(idx))
		for i, j := range idx {
			out[i] = all[j]
		}
		return out
	}
	head := s.header(pick(cols)...)
	for _, row := range rows {
		cells := make([]cell, len(idx))
		for i, j := range idx {
			cells[i] = row[j]
		}
		if reason {
			// The reason wraps in its column; the row is made tall enough.
			s.tall(wrappedLines(cells[len(cells)-1].s, reasonWidth*9/10))
		}
		s.add(cells...)
	}
	s.filter(head, len(idx))
	if reason {
		s.widths[len(idx)], s.maxWidth = reasonWidth, reasonWidth
	}
	s.finish()
}

// reasonWidth is the width in characters of the Comparison sheet's Reason
// column, whose text wraps.
const reasonWidth = 60

// rankColumns are the leading columns that identify a finding's rank. In
// a comparison each period ranks its own findings, so rank 1 occurs twice
// and the period it belongs to is shown beside it.
func (v *view) rankColumns() []string {
	if v.comparing() {
		return []string{"Rank in period", "Ranked in"}
	}
	return []string{"Rank"}
}

// rankCells are the cells of rankColumns for it.
func (b *book) rankCells(it item) []cell {
	r := []cell{intCell(it.Finding.Rank, b.st.intCentre)}
	if a := it.Assessment; a != nil {
		p := "before"
		if !a.InBefore {
			p = "after"
		}
		r = append(r, textCell(p, b.st.centre))
	}
	return r
}
