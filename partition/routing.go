package partition

import (
	"context"
	"math"
	"strconv"
	"strings"

	"github.com/paulmach/orb"
	"github.com/paulmach/osm"
)

// Routing is what the routable network is built from, read in the same
// pass over the extract as the regions: every way of Options.RouteRoads
// with the tags that routing needs, and the barrier lines (railways,
// rivers, canals) that a road may cross only on a bridge, in a tunnel or
// at a ford.
type Routing struct {
	Roads    []RoadWay
	Barriers []BarrierWay
}

// RoadWay is one run of consecutive present nodes of an OSM highway way.
type RoadWay struct {
	WayID int64
	// Class is the highway value ("primary", "residential", ...).
	Class string
	Name  string
	// Oneway is 0 for two-way, 1 for one-way along the node order and -1
	// against it (oneway=-1). Motorways, roundabouts and motorway links
	// are one-way unless tagged oneway=no (common practice).
	Oneway int8
	// MaxSpeedKMH is the tagged maxspeed in km/h (mph converted); 0 when
	// untagged or not a number ("walk", "signals").
	MaxSpeedKMH float64
	// Crossing reports a bridge, tunnel or ford tag: the way may cross a
	// barrier.
	Crossing bool
	// Nodes are the OSM node ids of Line's points.
	Nodes []int64
	Line  orb.LineString
}

// BarrierWay is a run of a railway, river or canal way.
type BarrierWay struct {
	WayID int64
	Kind  string // "rail", "river", "canal"
	// Crossing reports a bridge, tunnel or culvert on the barrier itself
	// (a railway bridge over a road): roads may pass it there.
	Crossing bool
	Nodes    []int64
	Line     orb.LineString
}

// routeRec is a road or barrier way until its nodes are resolved.
type routeRec struct {
	road    RoadWay // Line and Nodes filled at resolution
	barrier bool
	nodes   []int64
}

// routeBarriers are the barrier kinds a road must not cross at grade
// without a shared node.
var routeBarriers = [...]string{"rail", "river", "canal"}

// isCrossing reports a tag that lets a way pass over, under or through
// another.
func isCrossing(tags osm.Tags) bool {
	for _, k := range [...]string{"bridge", "tunnel"} {
		if v := tags.Find(k); v != "" && v != "no" {
			return true
		}
	}
	return tags.Find("ford") == "yes" || tags.Find("highway") == "ford"
}

// addRouting keeps w for the routable network when it is a road of
// Options.RouteRoads or a barrier a road may not cross at grade.
func (rd *elementReader) addRouting(w *osm.Way) {
	hw := w.Tags.Find("highway")
	rec := routeRec{}
	switch {
	case hw != "" && rd.sel.route[hw]:
		rec.road = RoadWay{WayID: int64(w.ID), Class: hw, Name: strings.TrimSpace(w.Tags.Find("name")),
			Oneway: onewayOf(w.Tags, hw), MaxSpeedKMH: MaxSpeedKMH(w.Tags.Find("maxspeed")), Crossing: isCrossing(w.Tags)}
	default:
		kind := ""
		for _, b := range routeBarriers {
			if barrierMatch(b, w.Tags) {
				kind = b
			}
		}
		if kind == "" {
			return
		}
		rec.barrier = true
		rec.road = RoadWay{WayID: int64(w.ID), Class: kind, Crossing: isCrossing(w.Tags)}
	}
	rec.nodes = make([]int64, len(w.Nodes))
	for i, n := range w.Nodes {
		rec.nodes[i] = int64(n.ID)
	}
	rd.routes = append(rd.routes, rec)
}

// onewayOf reads the direction of travel.
func onewayOf(tags osm.Tags, hw string) int8 {
	switch tags.Find("oneway") {
	case "yes", "true", "1":
		return 1
	case "-1", "reverse":
		return -1
	case "no", "false", "0":
		return 0
	}
	if hw == "motorway" || hw == "motorway_link" || tags.Find("junction") == "roundabout" {
		return 1
	}
	return 0
}

// MaxSpeedKMH parses an OSM maxspeed value: "50", "50 km/h", "30 mph";
// 0 for anything else.
func MaxSpeedKMH(v string) float64 {
	v = strings.TrimSpace(v)
	factor := 1.0
	switch {
	case strings.HasSuffix(v, "mph"):
		factor, v = 1.609344, strings.TrimSpace(strings.TrimSuffix(v, "mph"))
	case strings.HasSuffix(v, "km/h"):
		v = strings.TrimSpace(strings.TrimSuffix(v, "km/h"))
	case strings.HasSuffix(v, "kmh"):
		v = strings.TrimSpace(strings.TrimSuffix(v, "kmh"))
	}
	f, err := strconv.ParseFloat(v, 64)
	if err != nil || math.IsNaN(f) || f <= 0 || f > 300 {
		return 0
	}
	return f * factor
}

// resolveRouting turns the kept routing ways into runs of present nodes.
func (rd *elementReader) resolveRouting(nodes []nodeRec) *Routing {
	if len(rd.routes) == 0 {
		return nil
	}
	r := &Routing{}
	for _, rec := range rd.routes {
		for _, run := range resolveIDRuns(rec.nodes, nodes) {
			w := rec.road
			w.Nodes, w.Line = run.ids, run.pts
			if rec.barrier {
				r.Barriers = append(r.Barriers, BarrierWay{WayID: w.WayID, Kind: w.Class, Crossing: w.Crossing, Nodes: w.Nodes, Line: w.Line})
			} else {
				r.Roads = append(r.Roads, w)
			}
		}
	}
	return r
}

type idRun struct {
	ids []int64
	pts orb.LineString
}

// resolveIDRuns is resolveRuns keeping the node ids.
func resolveIDRuns(ids []int64, nodes []nodeRec) []idRun {
	var out []idRun
	var cur idRun
	flush := func() {
		if len(cur.ids) >= 2 {
			out = append(out, cur)
		}
		cur = idRun{}
	}
	for _, id := range ids {
		if n := len(cur.ids); n > 0 && cur.ids[n-1] == id {
			continue
		}
		j, ok := findNode(nodes, id)
		if !ok {
			flush()
			continue
		}
		cur.ids = append(cur.ids, id)
		cur.pts = append(cur.pts, orb.Point{fromOSMUnits(nodes[j].lon), fromOSMUnits(nodes[j].lat)})
	}
	flush()
	return out
}

func findNode(nodes []nodeRec, id int64) (int, bool) {
	lo, hi := 0, len(nodes)
	for lo < hi {
		m := int(uint(lo+hi) >> 1)
		if nodes[m].id < id {
			lo = m + 1
		} else {
			hi = m
		}
	}
	return lo, lo < len(nodes) && nodes[lo].id == id
}

// ReadRouting reads only the routing ways of the OSM extract at path (an
// extract with a scheme built, whose new roads are candidates).
func ReadRouting(ctx context.Context, path string, opts Options) (*Routing, error) {
	ex, err := readExtractFile(ctx, path, &opts)
	if err != nil {
		return nil, err
	}
	if ex.routing == nil {
		return &Routing{}, nil
	}
	return ex.routing, nil
}

// NewRoads returns the roads of after whose way is not in before.
func NewRoads(before, after *Routing) []RoadWay {
	old := map[int64]bool{}
	if before != nil {
		for _, w := range before.Roads {
			old[w.WayID] = true
		}
	}
	var out []RoadWay
	if after != nil {
		for _, w := range after.Roads {
			if !old[w.WayID] {
				out = append(out, w)
			}
		}
	}
	return out
}
