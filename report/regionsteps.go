package report

import (
	"fmt"
	"slices"
	"strconv"
	"strings"

	"narrows/partition"
)

// RegionSteps says, one line each, what bounds the regions of p (built
// with o), what each cleaning step did, how the regions over the area
// limit fared, and how much of the study area is water.
func RegionSteps(p *partition.Partition, o partition.Options) []string {
	barriers := "no barriers"
	if len(p.Stats.Barriers) > 0 {
		barriers = "barriers " + strings.Join(p.Stats.Barriers, ", ")
	}
	out := []string{fmt.Sprintf("bounded by roads %s and %s", strings.Join(o.Roads, ", "), barriers)}
	if o.Exact {
		out = append(out, "exact: no cleaning")
	} else {
		s := p.Stats
		out = append(out, fmt.Sprintf("cleaning: %s closed, %s extended, %s merged",
			nounCount(s.GapsClosed, "gap", "gaps"), nounCount(s.DanglesExtended, "road end", "road ends"), nounCount(s.SliversMerged, "sliver", "slivers")))
		if line := oversizeLine(s, o, largest(p.Regions)); line != "" {
			out = append(out, line)
		}
	}
	if p.WaterKM2 > 0 {
		what := "water areas"
		if slices.Contains(p.Stats.Barriers, "coastline") {
			what = "water areas and the sea beyond the coastline"
		}
		out = append(out, fmt.Sprintf("water: %.2f km² (%s) lies in no region", p.WaterKM2, what))
	}
	return out
}

// oversizeLine reports the regions over the area limit: how many there
// were, how many the split roads cut and into how many, and how many are
// still over it and why.
func oversizeLine(s partition.Stats, o partition.Options, largestKM2 float64) string {
	if o.MaxRegionKM2 <= 0 {
		return ""
	}
	limit := strconv.FormatFloat(o.MaxRegionKM2, 'g', -1, 64) + " km²"
	if s.Oversized == 0 {
		return "no region over " + limit
	}
	line := fmt.Sprintf("%s over %s", nounCount(s.Oversized, "region", "regions"), limit)
	if s.RegionsSplit > 0 {
		line += fmt.Sprintf(": %s split into %d by %s roads", nounCount(s.RegionsSplit, "region", "regions"), s.SplitInto, andList(s.SplitClasses))
	} else {
		line += ": none split"
	}
	if s.StillOversized == 0 {
		return line
	}
	line += fmt.Sprintf("; %s still over %s (the largest %.3g km²", nounCount(s.StillOversized, "region", "regions"), limit, largestKM2)
	var why []string
	if n := s.StillOversizedNoRoads; n > 0 {
		why = append(why, fmt.Sprintf("%d with no %s road inside", n, orList(o.SplitRoads)))
	}
	if n := s.StillOversized - s.StillOversizedNoRoads; n > 0 {
		piece := strconv.FormatFloat(o.MaxRegionKM2/4, 'g', 3, 64) + " km²"
		why = append(why, fmt.Sprintf("%d whose split roads end inside or cut off only pieces under %s", n, piece))
	}
	return line + ", " + strings.Join(why, ", ") + ")"
}

func nounCount(n int, one, many string) string {
	return strconv.Itoa(n) + " " + plural(n, one, many)
}

// orList joins names as "a, b or c".
func orList(names []string) string {
	switch len(names) {
	case 0:
		return ""
	case 1:
		return names[0]
	}
	return strings.Join(names[:len(names)-1], ", ") + " or " + names[len(names)-1]
}

// andList joins names as "a, b and c".
func andList(names []string) string {
	if len(names) < 2 {
		return strings.Join(names, "")
	}
	return strings.Join(names[:len(names)-1], ", ") + " and " + names[len(names)-1]
}

func largest(regs []partition.Region) float64 {
	m := 0.0
	for _, r := range regs {
		m = max(m, r.AreaKM2)
	}
	return m
}
