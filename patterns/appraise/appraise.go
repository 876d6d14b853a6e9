package appraise

import (
	"cmp"
	"context"
	"errors"
	"fmt"
	"math"
	"slices"

	"narrows/partition/geodesy"
	"narrows/partition/route"
	"narrows/regiongraph"
)

// Options sets the appraisal. Defaults are documented on each field.
type Options struct {
	// TripSnapMetres is how far a trip end may lie from the network's
	// nearest node (default 500 m); trips farther are not routed.
	TripSnapMetres float64 `toml:"trip_snap_metres"`
	// AttachMetres is how far a candidate's end may lie from a node of the
	// network (default 50 m).
	AttachMetres float64 `toml:"attach_metres"`
	// Generate is the number of candidates generated per finding (default
	// 5; 0 generates none).
	Generate int `toml:"generate"`
	// MinClass is the lowest road class at whose junctions generated
	// candidates may end (default "tertiary").
	MinClass string `toml:"min_class"`
	// LinkClass is the class, hence the free-flow speed, of generated
	// links (default "secondary").
	LinkClass string `toml:"link_class"`
	// MaxLinkMetres bounds a generated link's length (default 1,500 m).
	MaxLinkMetres float64 `toml:"max_link_metres"`
	// SpacingMetres: a generated candidate whose two ends both lie within
	// this of an earlier one's ends is a near copy and skipped (default 300).
	SpacingMetres float64 `toml:"spacing_metres"`
	// Candidates are the user's own candidates, each "way/N" (a way of
	// the extract with the scheme built) or a drawn line with a road
	// class (see Spec); none by default. Generated candidates re-generate
	// the same from the same inputs; listing one here (its text is in the
	// appraisal's outputs) keeps it when the inputs change.
	Candidates []string `toml:"candidates"`
	// Speeds is where the routes' times come from: SpeedsFreeFlow
	// (default: class speeds or tagged maxspeed, see route.Options) or
	// SpeedsObserved: every road's free-flow time, and the candidate's,
	// times the finding's own pace factor, the median over its routed
	// trips of observed seconds per metre over free-flow seconds per
	// metre along the routed path. One factor for the whole network
	// leaves every shortest path, hence the vehicle-km saved and the
	// share using a link, as at free-flow, and scales every time by it.
	Speeds string `toml:"speeds"`
}

// The values of Options.Speeds.
const (
	SpeedsFreeFlow = "free-flow"
	SpeedsObserved = "observed"
)

// Check reports an option out of range, naming its study-file key.
func (o Options) Check() error {
	switch o.Speeds {
	case "", SpeedsFreeFlow, SpeedsObserved:
	default:
		return fmt.Errorf("speeds %q, want %q or %q", o.Speeds, SpeedsFreeFlow, SpeedsObserved)
	}
	if !(o.TripSnapMetres > 0) || !(o.AttachMetres > 0) {
		return fmt.Errorf("trip_snap_metres %v and attach_metres %v must be more than 0", o.TripSnapMetres, o.AttachMetres)
	}
	if o.Generate < 0 {
		return fmt.Errorf("generate %d, want 0 or more", o.Generate)
	}
	return nil
}

// DefaultOptions returns the defaults documented on each field.
func DefaultOptions() Options {
	return Options{TripSnapMetres: 500, AttachMetres: 50, Generate: 5, MinClass: "tertiary", LinkClass: "secondary",
		MaxLinkMetres: 1500, SpacingMetres: 300, Speeds: SpeedsFreeFlow}
}

// Candidate is a link to appraise.
type Candidate struct {
	// Generated is false for the user's own candidates.
	Generated bool
	Link      route.Link
}

// Result is one candidate's appraisal.
type Result struct {
	Candidate Candidate
	// LengthMetres is the new road's length.
	LengthMetres float64
	// VehicleMetresSaved and VehicleSecondsSaved are per day of the
	// period, over the routed trips (base minus with the link).
	VehicleMetresSaved  float64
	VehicleSecondsSaved float64
	// ShareUsing is the share of routed trips whose path uses the link.
	ShareUsing float64
	// Detour is routed metres over straight-line metres, summed over the
	// routed trips, with the link.
	Detour float64
	// SecondsSavedPerMetre ranks candidates: vehicle-seconds saved per day
	// per metre of new road.
	SecondsSavedPerMetre float64
}

// Appraisal is the outcome for one finding.
type Appraisal struct {
	// Trips is the number of the finding's trips given, Routed those
	// routed (both ends snapped, distinct nodes, reachable), Days the
	// analysed days they are averaged over.
	Trips, Routed, Days int
	// Per day of the period, over the routed trips, without any candidate:
	// routed metres and free-flow seconds, and the observed metres and
	// seconds of the same trips.
	RoutedMetres, RoutedSeconds     float64
	ObservedMetres, ObservedSeconds float64
	// Detour is routed over straight-line metres without a candidate.
	Detour float64
	// Results are ranked by SecondsSavedPerMetre, then saving, then name.
	Results []Result
	// Speeds is Options.Speeds as used; PaceFactor the factor every
	// free-flow time was multiplied by (1 at free-flow).
	Speeds     string
	PaceFactor float64
}

// od is a routed trip's snapped ends.
type od struct {
	o, d     int
	straight float64
	trip     int
}

// Appraise routes the trips without and with each candidate (one at a
// time). days is the number of analysed days of the period.
func Appraise(ctx context.Context, net *route.Network, trips []regiongraph.Trip, days int, cands []Candidate, opts Options) (*Appraisal, error) {
	if len(trips) == 0 {
		return nil, errors.New("appraise: the finding has no trips in the period to re-route")
	}
	if days <= 0 {
		return nil, fmt.Errorf("appraise: %d analysed days", days)
	}
	comp, _ := net.Components()
	snap := net.NewSnapper(func(v int) bool { return comp[v] == 0 })
	a := &Appraisal{Trips: len(trips), Days: days}
	var ods []od
	for i, t := range trips {
		o, _, ok1 := snap.Nearest(t.Origin, opts.TripSnapMetres)
		d, _, ok2 := snap.Nearest(t.Dest, opts.TripSnapMetres)
		if !ok1 || !ok2 || o == d {
			continue
		}
		ods = append(ods, od{o, d, geodesy.GreatCircleMetres(t.Origin, t.Dest), i})
	}
	if len(ods) == 0 {
		return nil, errors.New("appraise: none of the finding's trips has both ends near the road network")
	}
	sortByOrigin(ods)
	// Every candidate's network first: each origin's search on the base
	// network is followed at once by each candidate's repair of it.
	nets := make([]*route.Network, len(cands))
	for i, c := range cands {
		w, err := net.WithLinks([]route.Link{c.Link}, snap, opts.AttachMetres)
		if err != nil {
			return nil, err
		}
		nets[i] = w
	}
	base, withs := routeAll(ctx, net, nets, ods)
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	perDay := 1 / float64(days)
	var straight float64
	for i, r := range base {
		if r.secs < 0 {
			continue
		}
		t := trips[ods[i].trip]
		a.Routed++
		a.RoutedMetres += r.metres * perDay
		a.RoutedSeconds += r.secs * perDay
		a.ObservedMetres += t.DistanceMetres * perDay
		a.ObservedSeconds += t.DurationSeconds * perDay
		straight += ods[i].straight * perDay
	}
	if a.Routed == 0 {
		return nil, errors.New("appraise: no trip of the finding could be routed")
	}
	a.Detour = a.RoutedMetres / straight
	a.Speeds, a.PaceFactor = SpeedsFreeFlow, 1
	if opts.Speeds == SpeedsObserved {
		a.Speeds, a.PaceFactor = SpeedsObserved, paceFactor(trips, ods, base)
		a.RoutedSeconds *= a.PaceFactor
	}
	for ci, c := range cands {
		with := withs[ci]
		res := Result{Candidate: c, LengthMetres: c.Link.LengthMetres()}
		var used int
		var metres float64
		for i, r := range with {
			if base[i].secs < 0 {
				continue
			}
			if r.secs < 0 { // cannot happen: adding edges only shortens
				r = base[i]
			}
			res.VehicleMetresSaved += (base[i].metres - r.metres) * perDay
			res.VehicleSecondsSaved += (base[i].secs - r.secs) * perDay
			metres += r.metres * perDay
			if r.link >= 0 {
				used++
			}
		}
		res.ShareUsing = float64(used) / float64(a.Routed)
		res.Detour = metres / straight
		res.VehicleSecondsSaved *= a.PaceFactor
		if res.LengthMetres > 0 {
			res.SecondsSavedPerMetre = res.VehicleSecondsSaved / res.LengthMetres
		}
		a.Results = append(a.Results, res)
	}
	slices.SortStableFunc(a.Results, func(x, y Result) int {
		return cmp.Or(cmp.Compare(y.SecondsSavedPerMetre, x.SecondsSavedPerMetre),
			cmp.Compare(y.VehicleSecondsSaved, x.VehicleSecondsSaved), cmp.Compare(x.Candidate.Link.Name, y.Candidate.Link.Name))
	})
	return a, nil
}

func sortByOrigin(ods []od) {
	slices.SortStableFunc(ods, func(x, y od) int { return cmp.Compare(x.o, y.o) })
}

type routed struct {
	secs, metres float64 // secs < 0: unreachable
	link         int
}

// routeAll routes the trips (sorted by origin) on net, one search per
// distinct origin node, and on each network of nets (net with a
// candidate, from WithLinks) by repairing that search: only the nodes the
// candidate makes strictly quicker are searched again, up to the
// origin's farthest destination (Search.Repair). A trip keeps its route
// on net unless the candidate is strictly quicker.
func routeAll(ctx context.Context, net *route.Network, nets []*route.Network, ods []od) (base []routed, withs [][]routed) {
	base = make([]routed, len(ods))
	withs = make([][]routed, len(nets))
	for c := range withs {
		withs[c] = make([]routed, len(ods))
	}
	s, repair := route.NewSearch(net), route.NewSearch(net)
	var targets []int
	for i := 0; i < len(ods); {
		if ctx.Err() != nil {
			return base, withs
		}
		j := i
		targets = targets[:0]
		for j < len(ods) && ods[j].o == ods[i].o {
			targets = append(targets, ods[j].d)
			j++
		}
		s.From(ods[i].o, targets)
		far := 0.0
		for k := i; k < j; k++ {
			d := ods[k].d
			secs := s.Seconds(d)
			if secs > 1e300 {
				base[k] = routed{-1, -1, -1}
				far = math.Inf(1)
				continue
			}
			base[k] = routed{secs, s.Metres(d), s.Link(d)}
			far = max(far, secs)
		}
		// No destination is farther than far: a repair beyond it cannot
		// make one quicker.
		for c, w := range nets {
			repair.Repair(w, s, far)
			for k := i; k < j; k++ {
				d := ods[k].d
				if repair.Improved(d) {
					withs[c][k] = routed{repair.Seconds(d), repair.Metres(d), repair.Link(d)}
				} else {
					withs[c][k] = base[k]
				}
			}
		}
		i = j
	}
	return base, withs
}

// paceFactor is the median over the routed trips of their observed
// seconds per metre over the free-flow seconds per metre of their routed
// path: how much slower than free-flow the finding's trips moved. Trips
// with no distance or time either way are left out; with none left it
// is 1.
func paceFactor(trips []regiongraph.Trip, ods []od, base []routed) float64 {
	var r []float64
	for i, b := range base {
		t := trips[ods[i].trip]
		if b.secs <= 0 || b.metres <= 0 || !(t.DistanceMetres > 0) || !(t.DurationSeconds > 0) {
			continue
		}
		r = append(r, (t.DurationSeconds/t.DistanceMetres)/(b.secs/b.metres))
	}
	if len(r) == 0 {
		return 1
	}
	slices.Sort(r)
	n := len(r)
	if n%2 == 1 {
		return r[n/2]
	}
	return (r[n/2-1] + r[n/2]) / 2
}
