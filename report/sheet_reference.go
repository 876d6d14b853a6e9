package report

import (
	"fmt"
	"sort"
	"strconv"
	"strings"
)

// The reference sheets: the regions, the data quality of the day-graph
// store and the method with the cautions.

func (b *book) regionsSheet() {
	v := b.v
	s := b.newSheet(SheetRegions)
	cols := []string{"Region", "Area km²", "Perimeter km", "Border roads", "Border road lengths km", "Neighbours", "Weak links", "In focus"}
	head := s.header(cols...)
	touching := map[int]int{}
	for _, it := range v.items {
		for _, id := range it.Finding.Regions {
			touching[id]++
		}
	}
	for _, r := range v.in.Regions.Regions {
		names := make([]string, len(r.BorderRoads))
		lengths := make([]string, len(r.BorderRoads))
		for i, br := range r.BorderRoads {
			names[i] = br.Name
			lengths[i] = strconv.FormatFloat(roundTo(br.LengthKM, 2), 'f', 2, 64)
		}
		nb := make([]int, len(r.Neighbours))
		for i, n := range r.Neighbours {
			nb[i] = n.ID
		}
		s.add(b.count(r.ID), numCell(r.AreaKM2, b.st.dec3), numCell(r.PerimeterKM, b.st.dec2), b.str(strings.Join(names, "; ")),
			b.str(strings.Join(lengths, "; ")), b.str(joinInts(nb)), b.count(touching[r.ID]), yesNo(v.focus[r.ID], b.st.centre))
	}
	s.filter(head, len(cols))
	s.widths[4] = min(s.widths[4], 50)
	s.finish()
}

func (b *book) quality() {
	v := b.v
	s := b.newSheet(SheetDataQuality)
	head := s.header("Item", "Value", "Note")
	m := v.in.Store
	if m == nil {
		s.add(b.str("Day-graph store"), b.str("not given"), b.str("no data quality figures available"))
	} else {
		q := m.Quality
		var rejected int64
		reasons := make([]string, 0, len(q.Rejected))
		for r, n := range q.Rejected {
			reasons = append(reasons, r)
			rejected += n
		}
		sort.Strings(reasons)
		s.add(b.str("Rows read"), intCell(q.Read, b.st.integer), b.str("every row of the trip files"))
		s.add(b.str("Rows used"), intCell(q.Used, b.st.integer), cell{})
		for _, r := range reasons {
			s.add(b.str("Rows rejected: "+r), intCell(q.Rejected[r], b.st.integer), cell{})
		}
		s.add(b.str("Rows rejected, total"), intCell(rejected, b.st.integer), cell{})
		s.add(b.str("Read = used + rejected"), yesNo(q.Read == q.Used+rejected, 0), b.str("every row is accounted for"))
		s.add(b.str("Time zone"), b.str(m.TimeZone), cell{})
		for _, w := range m.Windows {
			s.add(b.str("Time window "+w.Name), b.str(clock(w.StartMinute)+" to "+clock(w.EndMinute)), cell{})
		}
		s.add(b.str("Regions SHA-256"), b.str(m.RegionsSHA256), b.str("of the regions the day graphs were built on"))
		for _, src := range m.Sources {
			s.add(b.str("Trip file "+src.Path), intCell(src.Rows, b.st.integer), b.str("SHA-256 "+src.SHA256))
		}
	}
	if p := v.in.Regions; p != nil {
		if p.Source != "" {
			s.add(b.str("Regions built from"), b.str(p.Source), cell{})
		}
		for _, w := range p.Warnings {
			s.add(b.str("Regions warning"), b.str(w), cell{})
		}
	}
	for _, r := range exclusionRows(v.in.Exclusions) {
		s.add(b.str(r[0]), b.str(r[1]), b.str(r[2]))
	}
	s.filter(head, 3)
	s.widths[1] = min(s.widths[1], 40)
	s.widths[2] = min(s.widths[2], 40)
	s.finish()
}

func clock(minute int) string {
	return fmt.Sprintf("%02d:%02d", minute/60, minute%60)
}

func (b *book) methodSheet() {
	v := b.v
	s := b.newSheet(SheetMethod)
	head := s.header("Term", "Definition")
	add := func(term, text string) {
		// Programs do not all grow a row for wrapped text on opening, so
		// the row gets the height of its lines.
		s.tall(wrappedLines(text, methodWidth*9/10))
		s.add(b.bold(term), textCell(text, b.st.wrap))
	}
	for _, d := range v.method() {
		add(d.Term, d.Text)
	}
	for _, c := range v.cautions() {
		add("Caution", c)
	}
	s.filter(head, 2)
	s.widths[1] = min(s.widths[1], 28)
	s.widths[2], s.maxWidth = methodWidth-3, methodWidth
	s.finish()
}

// methodWidth is the width of the Method sheet's definition column.
const methodWidth = 100
