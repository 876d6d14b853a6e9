package partition

import (
	"cmp"
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"

	"github.com/paulmach/orb"
	"github.com/paulmach/osm"
	"github.com/paulmach/osm/osmpbf"
)

// wayRole says what a kept way is for.
type wayRole uint8

const (
	roleBound   wayRole = iota // a chosen road or barrier: bounds regions
	roleSplit                  // a SplitRoads way: splits oversized regions only
	roleUnused                 // a barrier of a kind not chosen: only warned about
	rolePlace                  // a closed way tagged place: names regions
	roleMember                 // untagged or a boundary: kept in case a water or place relation uses it
	roleNetwork                // a NetworkRoads way: drawn on maps only
	roleRoute                  // a RouteRoads way: routing only
)

// wayRec is a kept way until its nodes are resolved.
type wayRec struct {
	info  wayInfo
	role  wayRole
	area  bool // a water area drawn as one closed way
	nodes []int64
}

// waterRel is a multipolygon relation of water: its member ways' lines
// together bound the water.
type waterRel struct {
	id      osm.RelationID
	label   string
	members []osm.WayID
}

// placeRel is a place drawn as a relation: its outer member ways
// together enclose it.
type placeRel struct {
	placeRec
	members []osm.WayID
}

// placeRec is a named place (a node, or a closed way's outline).
type placeRec struct {
	id   int64
	name string
	rank int // placeRanks order: lower names a region first
	pt   orb.Point
}

// placeRanks are the place values that name regions, broadest first: a
// region holding a suburb's node is called after the suburb rather than
// after one of its neighbourhoods. A city comes last: its node marks the
// centre of much more than the region that holds it.
var placeRanks = [...]string{"suburb", "village", "town", "quarter", "neighbourhood", "hamlet", "locality", "city"}

// placeOf returns the place that tags name, if they name one.
func placeOf(tags osm.Tags) (placeRec, bool) {
	kind := tags.Find("place")
	name := firstValue(tags.Find("name"))
	if kind == "" || name == "" {
		return placeRec{}, false
	}
	for i, k := range placeRanks {
		if k == kind {
			return placeRec{name: name, rank: i}, true
		}
	}
	return placeRec{}, false
}

// selector decides which ways and relations are kept.
type selector struct {
	roads    map[string]int
	split    map[string]bool
	network  map[string]bool // NetworkRoads
	route    map[string]bool // RouteRoads
	barriers []string        // chosen barrier kinds, in Options order
	water    bool            // water areas chosen
	places   bool            // place relations read (to name regions)
}

func newSelector(o *Options) *selector {
	s := &selector{roads: make(map[string]int, len(o.Roads)), split: map[string]bool{}, network: map[string]bool{}, route: map[string]bool{}}
	for _, r := range o.RouteRoads {
		s.route[r] = true
	}
	for _, r := range o.NetworkRoads {
		s.network[r] = true
	}
	for i, r := range o.Roads {
		if _, dup := s.roads[r]; !dup {
			s.roads[r] = i
		}
	}
	if !o.Exact && o.MaxRegionKM2 > 0 {
		for _, r := range o.SplitRoads {
			s.split[r] = true
		}
	}
	s.barriers = o.Barriers
	s.water = slices.Contains(o.Barriers, "water")
	s.places = !o.Exact
	return s
}

// classify returns the class, rank and role of a way, and whether it is
// kept at all.
func (s *selector) classify(tags osm.Tags) (class string, rank int, role wayRole, ok bool) {
	hw := tags.Find("highway")
	if r, found := s.roads[hw]; found && hw != "" {
		return hw, r, roleBound, true
	}
	for i, b := range s.barriers {
		if barrierMatch(b, tags) {
			return b, len(s.roads) + i, roleBound, true
		}
	}
	if s.split[hw] {
		return hw, len(s.roads) + len(s.barriers), roleSplit, true
	}
	for _, b := range barrierKinds[:4] {
		if barrierMatch(b, tags) {
			return b, math.MaxInt32, roleUnused, true
		}
	}
	if _, ok := placeOf(tags); ok {
		return "place", 0, rolePlace, true
	}
	if s.network[hw] && hw != "" {
		return hw, 0, roleNetwork, true
	}
	if s.route[hw] && hw != "" {
		return hw, 0, roleRoute, true
	}
	if (s.water || s.places) && len(tags) == 0 || s.places && tags.Find("boundary") != "" {
		return "", 0, roleMember, true
	}
	return "", 0, 0, false
}

// keepRelation reports whether a relation is a water multipolygon or a
// named place drawn as a multipolygon or boundary relation.
func (s *selector) keepRelation(r *osm.Relation) bool {
	return s.water && r.Tags.Find("type") == "multipolygon" && isWaterArea(r.Tags) || s.isPlaceRelation(r)
}

func (s *selector) isPlaceRelation(r *osm.Relation) bool {
	if !s.places {
		return false
	}
	typ := r.Tags.Find("type")
	_, ok := placeOf(r.Tags)
	return ok && (typ == "multipolygon" || typ == "boundary")
}

// elementReader collects what readOSM keeps of each element.
type elementReader struct {
	sel    *selector
	store  *nodeStore
	ways   []wayRec
	waters []waterRel
	places []placeRel
	routes []routeRec // RouteRoads ways and barriers, for routing
}

func newElementReader(o *Options) *elementReader {
	return &elementReader{sel: newSelector(o), store: newNodeStore()}
}

// preparePBF sets the decoder's filters and reads the header's bounds.
func (rd *elementReader) preparePBF(pbf *osmpbf.Scanner, ex *extract) error {
	// Take nodes and drop unchosen ways inside the decoder, which then
	// reuses their memory instead of allocating an object for each.
	pbf.FilterNode = func(n *osm.Node) bool {
		rd.store.add(n)
		return false
	}
	pbf.FilterWay = func(w *osm.Way) bool {
		_, _, _, ok := rd.sel.classify(w.Tags)
		return ok
	}
	pbf.SkipRelations = !rd.sel.water && !rd.sel.places
	pbf.FilterRelation = rd.sel.keepRelation
	h, err := pbf.Header()
	if errors.Is(err, io.ErrUnexpectedEOF) {
		return errors.New("PBF is truncated: it ends inside its header block")
	}
	if err != nil {
		return fmt.Errorf("PBF header: %v", err)
	}
	if h != nil && h.Bounds != nil {
		// The header stores nanodegrees; undo the float noise of their
		// conversion so that -76.6081 reads as -76.6081.
		b := osmBound(h.Bounds)
		for _, v := range []*float64{&b.Min[0], &b.Min[1], &b.Max[0], &b.Max[1]} {
			*v = math.Round(*v*1e9) / 1e9
		}
		ex.header = &b
	}
	return nil
}

// scan takes every element from sc and returns how many there were.
func (rd *elementReader) scan(ctx context.Context, sc osm.Scanner, ex *extract) (int, error) {
	count := 0
	for sc.Scan() {
		count++
		if count%(1<<16) == 0 {
			if err := ctx.Err(); err != nil {
				return count, err
			}
		}
		switch obj := sc.Object().(type) {
		case *osm.Bounds:
			if ex.header == nil {
				b := osmBound(obj)
				ex.header = &b
			}
		case *osm.Node:
			rd.store.add(obj)
			if rd.store.err != nil {
				return count, rd.store.err
			}
		case *osm.Way:
			rd.addWay(obj)
		case *osm.Relation:
			rd.addRelation(obj)
		}
	}
	return count, rd.store.err
}

func (rd *elementReader) addWay(w *osm.Way) {
	class, rank, role, ok := rd.sel.classify(w.Tags)
	if !ok {
		return
	}
	rd.addRouting(w)
	ids := make([]int64, len(w.Nodes))
	for i, wn := range w.Nodes {
		ids[i] = int64(wn.ID)
	}
	lbl := label(w.Tags, class)
	if role == rolePlace {
		lbl = firstValue(w.Tags.Find("name"))
		pl, _ := placeOf(w.Tags)
		rank = pl.rank
	}
	closed := len(ids) > 3 && ids[0] == ids[len(ids)-1]
	rd.ways = append(rd.ways, wayRec{
		info:  wayInfo{id: w.ID, rank: rank, label: lbl, class: class, major: role == roleBound && rank < len(rd.sel.roads), tunnel: isTunnel(w.Tags)},
		role:  role,
		area:  class == "water" && closed,
		nodes: ids,
	})
}

func (rd *elementReader) addRelation(r *osm.Relation) {
	if !rd.sel.keepRelation(r) {
		return
	}
	if rd.sel.isPlaceRelation(r) {
		pl, _ := placeOf(r.Tags)
		pl.id = int64(r.ID)
		pr := placeRel{placeRec: pl}
		for _, m := range r.Members {
			if m.Type == osm.TypeWay && (m.Role == "outer" || m.Role == "") {
				pr.members = append(pr.members, osm.WayID(m.Ref))
			}
		}
		rd.places = append(rd.places, pr)
		return
	}
	wr := waterRel{id: r.ID, label: label(r.Tags, "water")}
	for _, m := range r.Members {
		if m.Type == osm.TypeWay && (m.Role == "outer" || m.Role == "inner" || m.Role == "") {
			wr.members = append(wr.members, osm.WayID(m.Ref))
		}
	}
	rd.waters = append(rd.waters, wr)
}

// resolveRuns returns the runs of two or more consecutive present nodes of
// a way (repeats dropped), and whether any node was missing.
func resolveRuns(ids []int64, nodes []nodeRec) (runs [][]orb.Point, missing bool) {
	var run []orb.Point
	var prev int64
	flush := func() {
		if len(run) >= 2 {
			runs = append(runs, run)
		}
		run = nil
	}
	for i, id := range ids {
		if i > 0 && id == prev {
			continue
		}
		prev = id
		j, found := slices.BinarySearchFunc(nodes, id, func(n nodeRec, id int64) int { return cmp.Compare(n.id, id) })
		if !found {
			missing = true
			flush()
			continue
		}
		p := orb.Point{fromOSMUnits(nodes[j].lon), fromOSMUnits(nodes[j].lat)}
		if len(run) > 0 && run[len(run)-1] == p {
			continue
		}
		run = append(run, p)
	}
	flush()
	return runs, missing
}
