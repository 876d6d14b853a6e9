package report

import (
	"narrows/patterns"
)

// SheetComparisonGroups lists each finding's comparison group, pair by
// pair, so that a reader can check what the finding was judged against.
const SheetComparisonGroups = "Comparison groups"

// comparisonGroups writes one row per finding and matched pair, nearest
// match first; a finding without a group gets one row saying so.
func (b *book) comparisonGroups() {
	v := b.v
	s := b.newSheet(SheetComparisonGroups)
	cols := append(v.rankColumns(), "Place", "Weak link", "Verdict", "Match", "Pair", "From region", "From region name", "To region", "To region name", "Distance band")
	head := s.header(cols...)
	name := func(id int) cell {
		if r := v.regions[id]; r != nil {
			return b.str(r.Name)
		}
		return cell{}
	}
	for _, it := range v.items {
		a := it.Assessment
		lead := append(b.rankCells(it), b.str(it.Name), b.str(a.Finding.ID), textCell(string(a.Verdict), b.st.verdict[a.Verdict]))
		if len(a.Group.Edges) == 0 {
			s.add(append(lead, cell{}, b.str("no comparison group: too few similar pairs; the change is the finding's own"))...)
			continue
		}
		labels := groupLabels(a.Group)
		for i, e := range a.Group.Edges {
			s.add(append(lead[:len(lead):len(lead)], b.count(i+1), b.str(labels[i]),
				b.count(e.From), name(e.From), b.count(e.To), name(e.To), numCell(a.Group.Band, b.st.dec1))...)
		}
	}
	s.filter(head, len(cols))
	s.finish()
}

// groupLabels returns a comparison group's pairs as "from>to" labels,
// nearest match first.
func groupLabels(g patterns.ComparisonGroup) []string {
	out := make([]string, len(g.Edges))
	for i, e := range g.Edges {
		out[i] = edgeLabel(e.From, e.To)
	}
	return out
}
