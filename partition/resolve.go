package partition

import (
	"cmp"
	"slices"

	"github.com/paulmach/orb"
	"github.com/paulmach/osm"
)

// waterArea is a water body: the lines (indices into extract.lines) that
// bound it, as a closed way or a multipolygon's member ways.
type waterArea struct {
	lines []int32
}

// unusedLine is a line of a barrier kind not chosen, kept to warn that it
// crosses the study area.
type unusedLine struct {
	kind string
	pts  []orb.Point
	way  osm.WayID // for the maps' network
	name string
}

// placeArea is a named place drawn as a closed way.
type placeArea struct {
	placeRec
	ring []orb.Point
}

// resolve turns the kept ways into lines once all nodes are known: the
// bounding ways in priority order (class rank, id), then the member ways
// of water relations, the split roads, the unused barriers and the place
// outlines.
func (rd *elementReader) resolve(nodes []nodeRec, ex *extract) {
	ex.places = rd.store.places
	ex.splitDrawn = map[string]bool{}
	for c := range rd.sel.split {
		ex.splitDrawn[c] = rd.sel.network[c]
	}
	slices.SortStableFunc(rd.ways, func(a, b wayRec) int {
		return cmp.Or(cmp.Compare(a.role, b.role), cmp.Compare(a.info.rank, b.info.rank), cmp.Compare(a.info.id, b.info.id))
	})
	byID := map[osm.WayID]int{}
	lineRange := map[osm.WayID][2]int32{}
	for i, w := range rd.ways {
		switch w.role {
		case roleBound:
			from := int32(len(ex.lines))
			if rd.addLines(ex, w, nodes) {
				ex.incomplete++
			}
			lineRange[w.info.id] = [2]int32{from, int32(len(ex.lines))}
			if w.area {
				ex.waters = append(ex.waters, waterArea{lines: span(from, int32(len(ex.lines)))})
			}
		case roleMember:
			byID[w.info.id] = i
		case roleSplit, roleUnused, rolePlace, roleNetwork:
			rd.resolveOther(ex, w, nodes)
		}
	}
	rd.resolveWaterRelations(ex, nodes, byID, lineRange)
	rd.resolvePlaceRelations(ex, nodes, byID)
}

// resolvePlaceRelations turns each place relation's outer member ways
// into closed outlines, joined end to end, and adds them to the place
// outlines. A member missing from the file leaves its ring open, and an
// open ring is no outline.
func (rd *elementReader) resolvePlaceRelations(ex *extract, nodes []nodeRec, byID map[osm.WayID]int) {
	slices.SortFunc(rd.places, func(a, b placeRel) int { return cmp.Compare(a.id, b.id) })
	for _, rel := range rd.places {
		var parts [][]int64
		for _, m := range rel.members {
			if i, ok := byID[m]; ok && len(rd.ways[i].nodes) >= 2 {
				parts = append(parts, rd.ways[i].nodes)
			}
		}
		for _, ring := range joinRings(parts) {
			runs, missing := resolveRuns(ring, nodes)
			if !missing && len(runs) == 1 && len(runs[0]) >= 4 && runs[0][0] == runs[0][len(runs[0])-1] {
				ex.placeAreas = append(ex.placeAreas, placeArea{rel.placeRec, runs[0]})
			}
		}
	}
}

// joinRings joins ways (node id lists) end to end into closed rings, in
// the order found; ways that close no ring are dropped.
func joinRings(parts [][]int64) [][]int64 {
	used := make([]bool, len(parts))
	var rings [][]int64
	for i := range parts {
		if used[i] {
			continue
		}
		used[i] = true
		ring := slices.Clone(parts[i])
		for ring[0] != ring[len(ring)-1] {
			end, grown := ring[len(ring)-1], false
			for j := range parts {
				if used[j] {
					continue
				}
				p := parts[j]
				switch end {
				case p[0]:
					ring = append(ring, p[1:]...)
				case p[len(p)-1]:
					for k := len(p) - 2; k >= 0; k-- {
						ring = append(ring, p[k])
					}
				default:
					continue
				}
				used[j], grown = true, true
				break
			}
			if !grown {
				break
			}
		}
		if len(ring) >= 4 && ring[0] == ring[len(ring)-1] {
			rings = append(rings, ring)
		}
	}
	return rings
}

// addLines appends a way's runs to ex.lines under a new way index and
// reports whether the way lacks nodes.
func (rd *elementReader) addLines(ex *extract, w wayRec, nodes []nodeRec) bool {
	idx := int32(len(ex.ways))
	runs, missing := resolveRuns(w.nodes, nodes)
	for _, r := range runs {
		ex.lines = append(ex.lines, rawLine{way: idx, pts: r})
	}
	ex.ways = append(ex.ways, w.info)
	return missing
}

// resolveOther resolves a split road, an unused barrier or a place outline.
func (rd *elementReader) resolveOther(ex *extract, w wayRec, nodes []nodeRec) {
	runs, missing := resolveRuns(w.nodes, nodes)
	switch w.role {
	case roleSplit:
		idx := int32(len(ex.ways))
		ex.ways = append(ex.ways, w.info)
		for _, r := range runs {
			ex.splitLines = append(ex.splitLines, rawLine{way: idx, pts: r})
		}
	case roleUnused:
		for _, r := range runs {
			ex.unused = append(ex.unused, unusedLine{kind: w.info.class, pts: r, way: w.info.id, name: w.info.label})
		}
	case roleNetwork:
		for _, r := range runs {
			ex.network = append(ex.network, unusedLine{kind: w.info.class, pts: r, way: w.info.id, name: w.info.label})
		}
	case rolePlace:
		if !missing && len(runs) == 1 && len(runs[0]) >= 4 && runs[0][0] == runs[0][len(runs[0])-1] {
			ex.placeAreas = append(ex.placeAreas, placeArea{placeRec{id: int64(w.info.id), name: w.info.label, rank: w.info.rank}, runs[0]})
		}
	}
}

// resolveWaterRelations adds each water relation's member ways (once,
// named after the relation when they have no tags of their own) and
// records the relation as a water area.
func (rd *elementReader) resolveWaterRelations(ex *extract, nodes []nodeRec, byID map[osm.WayID]int, lineRange map[osm.WayID][2]int32) {
	slices.SortFunc(rd.waters, func(a, b waterRel) int { return cmp.Compare(a.id, b.id) })
	waterRank := len(rd.sel.roads) + slices.Index(rd.sel.barriers, "water")
	for _, rel := range rd.waters {
		var area waterArea
		for _, m := range rel.members {
			rg, done := lineRange[m]
			if !done {
				i, ok := byID[m]
				if !ok {
					continue
				}
				w := rd.ways[i]
				w.info.rank, w.info.label, w.info.class = waterRank, rel.label, "water"
				from := int32(len(ex.lines))
				rd.addLines(ex, w, nodes)
				rg = [2]int32{from, int32(len(ex.lines))}
				lineRange[m] = rg
			}
			area.lines = append(area.lines, span(rg[0], rg[1])...)
		}
		if len(area.lines) > 0 {
			ex.waters = append(ex.waters, area)
		}
	}
}

func span(from, to int32) []int32 {
	s := make([]int32, 0, to-from)
	for i := from; i < to; i++ {
		s = append(s, i)
	}
	return s
}
