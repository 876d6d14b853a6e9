package partition

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"narrows/partition/geodesy"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/planar"
)

// nameRegions gives every region a Name, unique within the partition: the
// broadest place node inside it, else the smallest place outline around
// its point, else its two longest named border roads or barriers above
// ground, else where it lies from the nearest place. tunnels[i] holds the
// border roads of region i that run only underground.
func nameRegions(regs []Region, ex *extract, tunnels []map[string]bool) {
	for i := range regs {
		r := &regs[i]
		if name, ok := placeInside(r, ex.places); ok {
			r.Name = name
		} else if name, ok := placeAround(r, ex.placeAreas); ok {
			r.Name = name
		} else {
			r.Name = borderName(r, tunnels[i], ex.places)
		}
	}
	disambiguate(regs, ex.places, tunnels)
}

// placeInside returns the place node inside r of the broadest kind, the
// nearest to r's point among equals.
func placeInside(r *Region, places []placeRec) (string, bool) {
	b := r.Polygon.Bound()
	var best *placeRec
	var bestD float64
	for i := range places {
		pl := &places[i]
		if !b.Contains(pl.pt) || !planar.PolygonContains(r.Polygon, pl.pt) {
			continue
		}
		d := planar.DistanceSquared(pl.pt, r.Point)
		if best == nil || pl.rank < best.rank || (pl.rank == best.rank && d < bestD) {
			best, bestD = pl, d
		}
	}
	if best == nil {
		return "", false
	}
	return best.name, true
}

// placeAround returns the smallest place outline that holds r's point.
func placeAround(r *Region, areas []placeArea) (string, bool) {
	name, bestArea := "", math.Inf(1)
	for _, pa := range areas {
		ring := orb.Ring(pa.ring)
		if !ring.Bound().Contains(r.Point) || !planar.RingContains(ring, r.Point) {
			continue
		}
		if a := math.Abs(planar.Area(ring)); a < bestArea {
			name, bestArea = pa.name, a
		}
	}
	return name, name != ""
}

// nearPlaceMetres is how far a place may lie from a region's point to
// name it by position ("north of Ashgrove"): about a walk of twenty
// minutes, still the same part of town.
const nearPlaceMetres = 2000

// borderName joins the two longest named roads or barriers on r's border
// that run above ground. Without one, the region is named from the
// nearest place (within nearPlaceMetres); failing that, from its tunnels,
// and last from the kinds of its unnamed borders.
func borderName(r *Region, tunnels map[string]bool, places []placeRec) string {
	var named, below, unnamed []string
	for _, b := range r.BorderRoads {
		switch {
		case strings.HasPrefix(b.Name, "(unnamed "):
			unnamed = append(unnamed, unnamedNoun(b.Name))
		case tunnels[b.Name]:
			below = append(below, b.Name)
		default:
			named = append(named, b.Name)
		}
	}
	if len(named) == 0 {
		if pl, d, ok := nearestPlace(r.Point, places); ok && d <= nearPlaceMetres {
			return placeSide(pl, r.Point, d)
		}
		named = below
	}
	if len(named) == 0 {
		named = slices.Compact(unnamed)
	}
	switch len(named) {
	case 0:
		return "no named border"
	case 1:
		return named[0]
	}
	return named[0] + " / " + named[1]
}

// unnamedNoun turns the label of an unnamed way, "(unnamed rail)", into
// words: "unnamed railway".
func unnamedNoun(label string) string {
	kind := strings.TrimSuffix(strings.TrimPrefix(label, "(unnamed "), ")")
	switch kind {
	case "rail":
		return "unnamed railway"
	case "coastline":
		return "unnamed shore"
	case "water":
		return "unnamed water"
	case "river", "canal":
		return "unnamed " + kind
	}
	return "unnamed " + kind + " road"
}

// nearestPlace returns the place node nearest to pt and its distance in
// metres.
func nearestPlace(pt orb.Point, places []placeRec) (placeRec, float64, bool) {
	best, bestD := -1, math.Inf(1)
	for i := range places {
		if d := geodesy.GreatCircleMetres(pt, places[i].pt); d < bestD || (d == bestD && places[i].id < places[best].id) {
			best, bestD = i, d
		}
	}
	if best < 0 {
		return placeRec{}, 0, false
	}
	return places[best], bestD, true
}

// placeSide says where pt lies from the place pl, d metres away: "near
// P" within a few hundred metres, else "1.2 km north-east of P" (the
// distance tells apart regions on the same side of one place).
func placeSide(pl placeRec, pt orb.Point, d float64) string {
	if d < 300 {
		return "near " + pl.name
	}
	return fmt.Sprintf("%.1f km %s of %s", d/1000, compass8(pl.pt, pt), pl.name)
}

// compass8 names the direction from p to q on an eight-point compass.
func compass8(p, q orb.Point) string {
	dx := (q[0] - p[0]) * math.Cos(p[1]*math.Pi/180)
	dy := q[1] - p[1]
	deg := math.Atan2(dx, dy) * 180 / math.Pi // clockwise from north
	points := [...]string{"north", "north-east", "east", "south-east", "south", "south-west", "west", "north-west"}
	return points[int(math.Round((deg+360)/45))%8]
}

// disambiguate makes names unique. Two regions that share a name get the
// compass word of their relative position. Three or more are told apart,
// in turn, by the nearest place when it differs between them ("near P",
// "0.6 km north of P"), by a further border road ("by C"), by compass
// word for the last two (or eight-point compass from their centre for
// more, or from the others for the last one), and only then by a number
// in id order; any clash that remains gets the region's id.
func disambiguate(regs []Region, places []placeRec, tunnels []map[string]bool) {
	byName := map[string][]int{}
	var names []string
	for i := range regs {
		if byName[regs[i].Name] == nil {
			names = append(names, regs[i].Name)
		}
		byName[regs[i].Name] = append(byName[regs[i].Name], i)
	}
	for _, name := range names {
		left := byName[name]
		if len(left) < 2 {
			continue
		}
		suffix := map[int]string{}
		if len(left) == 2 {
			a, b := left[0], left[1]
			suffix[a], suffix[b] = compass(regs[a].Point, regs[b].Point)
			left = nil
		}
		left = tellApart(left, suffix, func(i int) string {
			if pl, d, ok := nearestPlace(regs[i].Point, places); ok && d <= nearPlaceMetres && pl.name != name {
				return placeSide(pl, regs[i].Point, d)
			}
			return ""
		})
		left = tellApart(left, suffix, func(i int) string {
			if c := furtherBorder(&regs[i], name, tunnels[i]); c != "" {
				return "by " + c
			}
			return ""
		})
		switch {
		case len(left) == 1:
			// The others took a suffix; this one says where it lies from them.
			var c orb.Point
			others := byName[name]
			for _, i := range others {
				if i != left[0] {
					c[0], c[1] = c[0]+regs[i].Point[0]/float64(len(others)-1), c[1]+regs[i].Point[1]/float64(len(others)-1)
				}
			}
			suffix[left[0]] = compass8(c, regs[left[0]].Point)
		case len(left) == 2:
			a, b := left[0], left[1]
			suffix[a], suffix[b] = compass(regs[a].Point, regs[b].Point)
		case len(left) > 2:
			var c orb.Point
			for _, i := range left {
				c[0], c[1] = c[0]+regs[i].Point[0]/float64(len(left)), c[1]+regs[i].Point[1]/float64(len(left))
			}
			left = tellApart(left, suffix, func(i int) string { return compass8(c, regs[i].Point) })
			for k, i := range left {
				suffix[i] = fmt.Sprint(k + 1)
			}
		}
		for i, s := range suffix {
			regs[i].Name = name + " (" + s + ")"
		}
	}
	seen := map[string]bool{}
	for i := range regs {
		if seen[regs[i].Name] {
			regs[i].Name = fmt.Sprintf("%s #%d", regs[i].Name, regs[i].ID)
		}
		seen[regs[i].Name] = true
	}
}

// tellApart gives each region in idx whose key (non-empty) no other region
// in idx shares that key as its suffix, and returns the rest.
func tellApart(idx []int, suffix map[int]string, key func(int) string) []int {
	keys := make([]string, len(idx))
	count := map[string]int{}
	for k, i := range idx {
		keys[k] = key(i)
		count[keys[k]]++
	}
	var rest []int
	for k, i := range idx {
		if keys[k] != "" && count[keys[k]] == 1 {
			suffix[i] = keys[k]
		} else {
			rest = append(rest, i)
		}
	}
	return rest
}

// furtherBorder returns r's longest named surface border road that is not
// part of its name.
func furtherBorder(r *Region, name string, tunnels map[string]bool) string {
	parts := strings.Split(name, " / ")
	for _, b := range r.BorderRoads {
		if !strings.HasPrefix(b.Name, "(unnamed ") && !tunnels[b.Name] && !slices.Contains(parts, b.Name) {
			return b.Name
		}
	}
	return ""
}

// compass says where p and q lie relative to each other, along the axis
// on which they are further apart.
func compass(p, q orb.Point) (string, string) {
	dx := (q[0] - p[0]) * math.Cos(p[1]*math.Pi/180)
	dy := q[1] - p[1]
	switch {
	case math.Abs(dy) >= math.Abs(dx) && dy > 0:
		return "south", "north"
	case math.Abs(dy) >= math.Abs(dx):
		return "north", "south"
	case dx > 0:
		return "west", "east"
	}
	return "east", "west"
}
