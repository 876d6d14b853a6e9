package appraise

import (
	"cmp"
	"fmt"
	"slices"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/planar"

	"narrows/partition"
	"narrows/partition/geodesy"
	"narrows/partition/route"
)

// Generate proposes new links for the region pairs (region ids): for
// each pair, straight links between junctions (three or more neighbours,
// a road of MinClass or higher) of the one region and of the other that
// cross a barrier, shortest first, no longer than MaxLinkMetres, skipping
// near copies; at most opts.Generate over all pairs.
func Generate(net *route.Network, regions *partition.Partition, pairs [][2]int, opts Options) ([]Candidate, error) {
	if opts.Generate <= 0 {
		return nil, nil
	}
	minRank := route.ClassRank(opts.MinClass)
	if minRank >= route.ClassRank("no such class") {
		return nil, fmt.Errorf("appraise: min_class %q is not a road class (motorway ... living_street)", opts.MinClass)
	}
	comp, _ := net.Components()
	polygon := func(id int) (orb.Polygon, error) {
		if id < 1 || id > len(regions.Regions) {
			return nil, fmt.Errorf("appraise: region %d is not in the regions (1..%d)", id, len(regions.Regions))
		}
		return regions.Regions[id-1].Polygon, nil
	}
	junctions := func(poly orb.Polygon) []int {
		b := poly.Bound()
		var out []int
		for v, p := range net.Points {
			if comp[v] != 0 || net.Degree[v] < 3 || int(net.Rank[v]) > minRank || net.OSMIDs[v] == 0 {
				continue
			}
			if b.Contains(p) && planar.PolygonContains(poly, p) {
				out = append(out, v)
			}
		}
		return out
	}
	type option struct {
		a, b   int
		metres float64
	}
	var opt []option
	seen := map[[2]int]bool{}
	for _, pr := range pairs {
		lo, hi := min(pr[0], pr[1]), max(pr[0], pr[1])
		if seen[[2]int{lo, hi}] {
			continue
		}
		seen[[2]int{lo, hi}] = true
		pa, err := polygon(lo)
		if err != nil {
			return nil, err
		}
		pb, err := polygon(hi)
		if err != nil {
			return nil, err
		}
		ja, jb := junctions(pa), junctions(pb)
		for _, a := range ja {
			for _, b := range jb {
				m := geodesy.GreatCircleMetres(net.Points[a], net.Points[b])
				if m > opts.MaxLinkMetres {
					continue
				}
				if _, _, crosses := net.Crosses(net.Points[a], net.Points[b]); !crosses {
					continue
				}
				opt = append(opt, option{a, b, m})
			}
		}
	}
	slices.SortFunc(opt, func(x, y option) int {
		return cmp.Or(cmp.Compare(x.metres, y.metres), cmp.Compare(x.a, y.a), cmp.Compare(x.b, y.b))
	})
	var out []Candidate
	var chosen []option
	near := func(u, v int) bool {
		return geodesy.GreatCircleMetres(net.Points[u], net.Points[v]) <= opts.SpacingMetres
	}
	for _, o := range opt {
		if len(out) == opts.Generate {
			break
		}
		dup := false
		for _, c := range chosen {
			if (near(o.a, c.a) && near(o.b, c.b)) || (near(o.a, c.b) && near(o.b, c.a)) {
				dup = true
				break
			}
		}
		if dup {
			continue
		}
		chosen = append(chosen, o)
		out = append(out, Candidate{Generated: true, Link: route.Link{
			Name:     fmt.Sprintf("G%d", len(out)+1),
			Class:    opts.LinkClass,
			Line:     orb.LineString{net.Points[o.a], net.Points[o.b]},
			Nodes:    []int64{net.OSMIDs[o.a], net.OSMIDs[o.b]},
			Crossing: true,
		}})
	}
	return out, nil
}

// FromRoads makes user candidates of the roads a scheme added (an extract
// with the scheme built, read with partition.ReadRouting and compared
// with partition.NewRoads).
func FromRoads(roads []partition.RoadWay) []Candidate {
	var out []Candidate
	for _, w := range roads {
		name := w.Name
		if name == "" {
			name = fmt.Sprintf("way/%d", w.WayID)
		}
		out = append(out, Candidate{Link: route.Link{Name: name, Class: w.Class, Line: w.Line, Nodes: w.Nodes,
			Oneway: w.Oneway, MaxSpeedKMH: w.MaxSpeedKMH, Crossing: w.Crossing}})
	}
	return out
}

// ObservedSaving is the saving the trips themselves show between two
// periods, on the before period's trips per day: the fall in mean
// observed metres and seconds per trip times the before trips per day.
func ObservedSaving(before, after []float64Pair, daysBefore int) (metres, seconds float64) {
	mean := func(ps []float64Pair) (m, s float64) {
		for _, p := range ps {
			m += p.Metres
			s += p.Seconds
		}
		return m / float64(len(ps)), s / float64(len(ps))
	}
	if len(before) == 0 || len(after) == 0 || daysBefore <= 0 {
		return 0, 0
	}
	mb, sb := mean(before)
	ma, sa := mean(after)
	perDay := float64(len(before)) / float64(daysBefore)
	return (mb - ma) * perDay, (sb - sa) * perDay
}

// float64Pair is one trip's observed metres and seconds.
type float64Pair = struct{ Metres, Seconds float64 }
