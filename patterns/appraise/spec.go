package appraise

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"github.com/paulmach/orb"

	"narrows/partition"
	"narrows/partition/route"
)

// Spec is a user's candidate as the study file or the command line gives
// it: either a way of the extract with the scheme built ("way/N", WayID
// set) or a line drawn by hand with a road class (Link set, without a
// name: the caller names it).
//
// The text of a drawn line is the class, optionally "bridge", "tunnel" or
// "ford" (the line may then cross a river or railway), and two or more
// points "lon,lat" in WGS84 degrees, separated by spaces:
//
//	secondary bridge 9.5071,47.1402 9.5153,47.1420
type Spec struct {
	WayID int64
	Link  route.Link
}

// ParseSpec reads one candidate text (see Spec).
func ParseSpec(s string) (Spec, error) {
	s = strings.TrimSpace(s)
	if rest, ok := strings.CutPrefix(s, "way/"); ok {
		id, err := strconv.ParseInt(rest, 10, 64)
		if err != nil || id <= 0 {
			return Spec{}, fmt.Errorf("candidate %q: way/N needs a positive OSM way id", s)
		}
		return Spec{WayID: id}, nil
	}
	f := strings.Fields(s)
	if len(f) == 0 {
		return Spec{}, fmt.Errorf("candidate %q: empty; give way/N or a road class and points lon,lat", s)
	}
	class := f[0]
	if route.ClassRank(class) >= route.ClassRank("no such class") {
		return Spec{}, fmt.Errorf("candidate %q: %q is not a road class (motorway, trunk, primary, secondary, tertiary, unclassified, residential, living_street)", s, class)
	}
	l := route.Link{Class: class}
	f = f[1:]
	if len(f) > 0 && (f[0] == "bridge" || f[0] == "tunnel" || f[0] == "ford") {
		l.Crossing = true
		f = f[1:]
	}
	for i, p := range f {
		lonS, latS, ok := strings.Cut(p, ",")
		lon, err1 := strconv.ParseFloat(lonS, 64)
		lat, err2 := strconv.ParseFloat(latS, 64)
		if !ok || err1 != nil || err2 != nil || math.IsNaN(lon) || math.IsNaN(lat) || math.Abs(lon) > 180 || math.Abs(lat) > 90 {
			return Spec{}, fmt.Errorf("candidate %q: point %d %q is not lon,lat in degrees", s, i+1, p)
		}
		l.Line = append(l.Line, orb.Point{lon, lat})
	}
	if len(l.Line) < 2 {
		return Spec{}, fmt.Errorf("candidate %q: a drawn line needs at least two points lon,lat", s)
	}
	return Spec{Link: l}, nil
}

// FormatLine writes a link as the text ParseSpec reads for a drawn line,
// so that a generated candidate can be listed in the study file.
func FormatLine(l route.Link) string {
	var b strings.Builder
	b.WriteString(l.Class)
	if l.Crossing {
		b.WriteString(" bridge")
	}
	for _, p := range l.Line {
		b.WriteByte(' ')
		b.WriteString(strconv.FormatFloat(p[0], 'f', -1, 64))
		b.WriteByte(',')
		b.WriteString(strconv.FormatFloat(p[1], 'f', -1, 64))
	}
	return b.String()
}

// UserCandidates reads the user's candidate texts: "way/N" is looked up
// in scheme (the roads of the extract with the scheme built; nil when the
// study has none), a drawn line is named "line K" after its place in the
// list.
func UserCandidates(texts []string, scheme *partition.Routing) ([]Candidate, error) {
	var out []Candidate
	for k, s := range texts {
		sp, err := ParseSpec(s)
		if err != nil {
			return nil, err
		}
		if sp.WayID == 0 {
			sp.Link.Name = fmt.Sprintf("line %d", k+1)
			out = append(out, Candidate{Link: sp.Link})
			continue
		}
		if scheme == nil {
			return nil, fmt.Errorf("candidate %q: a way is looked up in the extract with the scheme built, and the study names none (scheme = \"after.osm\")", s)
		}
		i := slices.IndexFunc(scheme.Roads, func(w partition.RoadWay) bool { return w.WayID == sp.WayID })
		if i < 0 {
			return nil, fmt.Errorf("candidate %q: no road of the routable classes with that id in the extract with the scheme built", s)
		}
		out = append(out, FromRoads(scheme.Roads[i:i+1])...)
	}
	return out, nil
}
