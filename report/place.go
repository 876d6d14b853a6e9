package report

import (
	"strconv"
	"strings"

	"narrows/partition"
	"narrows/patterns"
)

// PlaceName names a finding for its place, from the two regions of its
// costliest region pair: "across the Orvel between Northbank housing and
// Southbank works" when the two regions share a bounding road or barrier
// (the Orvel) and both have names; without region names, another border
// road of each stands for it ("across the Orvel between Bittern Road and
// Amble Road"); "between ... and ..." when they share no named border;
// region numbers when a region has no name and no named border.
// A finding of several pairs adds how many more pairs it holds. It is the
// one place where findings get names: terminal, workbook, map layers, HTML
// page and findings.json all use it, with the finding's ID as the
// secondary key.
func PlaceName(f patterns.Finding, regions *partition.Partition) string {
	if len(f.Edges) == 0 {
		return f.ID
	}
	top := f.Edges[0]
	for _, e := range f.Edges[1:] {
		if e.ExtraHoursPerDay > top.ExtraHoursPerDay {
			top = e
		}
	}
	a, b := min(top.From, top.To), max(top.From, top.To)
	name := pairName(regionOf(regions, a), regionOf(regions, b), a, b)
	pairs := map[[2]int]bool{}
	for _, e := range f.Edges {
		pairs[[2]int{min(e.From, e.To), max(e.From, e.To)}] = true
	}
	if n := len(pairs) - 1; n > 0 {
		name += " and " + strconv.Itoa(n) + " more " + plural(n, "pair", "pairs")
	}
	return name
}

// regionOf returns the region with id, or nil.
func regionOf(p *partition.Partition, id int) *partition.Region {
	if p == nil {
		return nil
	}
	if id >= 1 && id <= len(p.Regions) && p.Regions[id-1].ID == id {
		return &p.Regions[id-1]
	}
	for i := range p.Regions {
		if p.Regions[i].ID == id {
			return &p.Regions[i]
		}
	}
	return nil
}

// pairName names the place between regions ra and rb (ids a, b).
func pairName(ra, rb *partition.Region, a, b int) string {
	na, nb := borderNames(ra), borderNames(rb)
	shared := ""
	for _, n := range na {
		if containsString(nb, n) {
			shared = n
			break
		}
	}
	other := func(names []string, id int) string {
		for _, n := range names {
			if n != shared {
				return n
			}
		}
		return "region " + strconv.Itoa(id)
	}
	oa, ob := other(na, a), other(nb, b)
	// A region's own name (a district's, or its bounding roads' from the
	// partition) says more to a local than one of its border roads.
	if ra != nil && rb != nil && ra.Name != "" && rb.Name != "" {
		oa, ob = ra.Name, rb.Name
	}
	if shared == "" {
		return "between " + oa + " and " + ob
	}
	if oa == ob {
		return "across " + withArticle(shared) + " at " + oa
	}
	return "across " + withArticle(shared) + " between " + oa + " and " + ob
}

// borderNames lists a region's border names, longest border first.
func borderNames(r *partition.Region) []string {
	if r == nil {
		return nil
	}
	var names []string
	for _, br := range r.BorderRoads {
		if br.Name != "" && !containsString(names, br.Name) {
			names = append(names, br.Name)
		}
	}
	return names
}

// withArticle puts "the" before a name that is not a street's (a river,
// a railway line): "the Orvel", but "Juniper Avenue".
func withArticle(name string) string {
	words := strings.Fields(name)
	if len(words) == 0 {
		return name
	}
	switch strings.ToLower(words[len(words)-1]) {
	case "road", "street", "avenue", "lane", "way", "drive", "boulevard", "highway", "parkway", "place", "row", "hill", "square", "terrace":
		return name
	}
	if strings.HasPrefix(strings.ToLower(name), "the ") {
		return name
	}
	return "the " + name
}

func containsString(xs []string, s string) bool {
	for _, x := range xs {
		if x == s {
			return true
		}
	}
	return false
}

// GroupBoundNote says, for a scan whose listing of recurring groups
// stopped at its bound, what is missing and what is not; "" otherwise.
func GroupBoundNote(s *patterns.Scan) string {
	if s == nil || !s.GroupsTruncated {
		return ""
	}
	return "Note: the listing of recurring groups stopped after " + strconv.Itoa(s.GroupVisits) +
		" steps of the group search (the bound max_group_visits); some places list only part of their groups. The places, their edges and costs are complete."
}
