package report

import (
	"encoding/json"
	"fmt"
	"io"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"

	"narrows/patterns"
)

// Coordinates are rounded to 7 decimals (about 1 cm), which keeps the
// files small and their bytes stable.
const coordDecimals = 7

// WriteRegionsGeoJSON writes to w the regions as a GeoJSON
// FeatureCollection of polygons (RFC 7946: exterior rings counter-clockwise,
// holes clockwise) with properties id, area_km2, perimeter_km, border_roads
// (names, longest first), neighbours (ids), in_focus and findings (the
// number of weak links touching the region). Nothing is written to w when in
// is not valid.
func WriteRegionsGeoJSON(w io.Writer, in Input) error {
	return render(w, in, (*view).regionsGeoJSON)
}

// WriteFindingsGeoJSON writes to w one LineString per finding edge, from the
// origin region's representative point to the destination's, with
// properties finding, rank, from, to, trips (median per day), speed_kmh,
// detour, extra_vehicle_km_per_day, extra_vehicle_hours_per_day, share, colour (the map's
// colour for the verdict) and, with a comparison, verdict, focus and the
// verdict's evidence (see comparisonProperties). Values
// from fewer trips than the publication threshold are null and the feature
// has suppressed = true. Nothing is written to w when in is not valid.
func WriteFindingsGeoJSON(w io.Writer, in Input) error {
	return render(w, in, (*view).findingsGeoJSON)
}

func (v *view) regionsGeoJSON(w io.Writer) error {
	touching := map[int]int{}
	for _, it := range v.items {
		for _, id := range it.Finding.Regions {
			touching[id]++
		}
	}
	fc := geojson.NewFeatureCollection()
	for _, r := range v.in.Regions.Regions {
		f := geojson.NewFeature(rfc7946Polygon(r.Polygon))
		f.ID = r.ID
		roads := make([]string, len(r.BorderRoads))
		for i, br := range r.BorderRoads {
			roads[i] = br.Name
		}
		nb := make([]int, len(r.Neighbours))
		for i, n := range r.Neighbours {
			nb[i] = n.ID
		}
		f.Properties["id"] = r.ID
		f.Properties["area_km2"] = jsonNumber(r.AreaKM2, 4)
		f.Properties["perimeter_km"] = jsonNumber(r.PerimeterKM, 3)
		f.Properties["border_roads"] = roads
		f.Properties["neighbours"] = nb
		f.Properties["in_focus"] = v.focus[r.ID]
		f.Properties["findings"] = touching[r.ID]
		fc.Append(f)
	}
	return encodeGeoJSON(w, fc, "regions")
}

func (v *view) findingsGeoJSON(w io.Writer) error {
	fc := geojson.NewFeatureCollection()
	for _, it := range v.items {
		for _, e := range it.Finding.Edges {
			a, b := v.regions[e.From].Point, v.regions[e.To].Point
			f := geojson.NewFeature(orb.LineString{roundPoint(a), roundPoint(b)})
			f.ID = it.Key + "/" + edgeLabel(e.From, e.To)
			hide := v.suppressed(e.TripsMedian)
			f.Properties["finding"] = it.Finding.ID
			f.Properties["place"] = it.Name
			f.Properties["edge_days"] = len(e.Days)
			f.Properties["edge_share"] = jsonNumber(e.Share, 4)
			f.Properties["rank"] = it.Finding.Rank
			f.Properties["from"] = e.From
			f.Properties["to"] = e.To
			f.Properties["share"] = jsonNumber(it.Finding.Share, 4)
			f.Properties["suppressed"] = hide
			f.Properties["colour"] = lookOf(it.Verdict()).Hex // as on the report's map
			if hide {
				for _, k := range []string{"trips", "speed_kmh", "detour", "extra_vehicle_km_per_day", "extra_vehicle_hours_per_day"} {
					f.Properties[k] = nil
				}
			} else {
				f.Properties["trips"] = jsonNumber(e.TripsMedian, 1)
				f.Properties["speed_kmh"] = jsonNumber(kmh(e.SpeedMedian), 2)
				f.Properties["detour"] = jsonNumber(e.DetourMedian, 3)
				f.Properties["extra_vehicle_km_per_day"] = jsonNumber(e.ExtraKMPerDay, 2)
				f.Properties["extra_vehicle_hours_per_day"] = jsonNumber(e.ExtraHoursPerDay, 3)
			}
			if a := it.Assessment; a != nil {
				f.Properties["verdict"] = string(a.Verdict)
				f.Properties["focus"] = a.Focus
				v.comparisonProperties(f.Properties, a, hide)
			}
			fc.Append(f)
		}
	}
	return encodeGeoJSON(w, fc, "findings")
}

// comparisonProperties adds to a finding feature its verdict's evidence:
// the finding's cost (extra vehicle-hours per day) and travel time per trip
// (minutes) before and after with 95 % confidence intervals, the raw
// change, the comparison group's relative change, the adjusted change with
// its confidence interval, and the group's pairs. Figures are null when
// the finding's trips are under the publication threshold (hide).
func (v *view) comparisonProperties(p geojson.Properties, a *patterns.Assessment, hide bool) {
	p["decided_by"] = string(a.Basis)
	p["comparison_pairs"] = groupLabels(a.Group)
	p["comparison_band"] = jsonNumber(a.Group.Band, 2)
	measures := []struct {
		prefix string
		e      patterns.Effect
		scale  float64
		places int
	}{
		{"extra_vehicle_hours_per_day", a.Effects[patterns.Cost], 1, 3},
		{"travel_time_min", a.Effects[patterns.TravelTime], 1.0 / 60, 3},
	}
	for _, m := range measures {
		e := m.e
		vals := map[string]float64{
			"before": e.Before, "before_low": e.BeforeLow, "before_high": e.BeforeHigh,
			"after": e.After, "after_low": e.AfterLow, "after_high": e.AfterHigh,
			"raw_change": e.Raw, "adjusted_change": e.Adjusted.Shift,
			"adjusted_low": e.Adjusted.Low, "adjusted_high": e.Adjusted.High,
		}
		for k, x := range vals {
			if hide {
				p[m.prefix+"_"+k] = nil
				continue
			}
			p[m.prefix+"_"+k] = jsonNumber(x*m.scale, m.places)
		}
		p[m.prefix+"_group_change"] = jsonNumber(e.Group, 4)
		p[m.prefix+"_p_adjusted"] = jsonNumber(e.Adjusted.PAdjusted, 4)
	}
}

// encodeGeoJSON writes fc to w as one line of JSON.
func encodeGeoJSON(w io.Writer, fc *geojson.FeatureCollection, what string) error {
	if err := json.NewEncoder(w).Encode(fc); err != nil {
		return fmt.Errorf("report: encoding %s GeoJSON: %w", what, err)
	}
	return nil
}

// jsonNumber rounds x, or gives nil (JSON null) for NaN and infinities,
// which JSON cannot hold.
func jsonNumber(x float64, decimals int) any {
	if !finite(x) {
		return nil
	}
	return roundTo(x, decimals)
}

func roundPoint(p orb.Point) orb.Point {
	return orb.Point{roundTo(p[0], coordDecimals), roundTo(p[1], coordDecimals)}
}

// rfc7946Polygon returns a rounded copy of poly with closed rings, the
// exterior counter-clockwise and holes clockwise, and rings of fewer than
// four points dropped (a hole of that kind is no hole; a degenerate
// exterior leaves an empty polygon).
func rfc7946Polygon(poly orb.Polygon) orb.Polygon {
	out := make(orb.Polygon, 0, len(poly))
	for i, ring := range poly {
		r := make(orb.Ring, 0, len(ring)+1)
		for _, pt := range ring {
			q := roundPoint(pt)
			if len(r) > 0 && r[len(r)-1] == q {
				continue
			}
			r = append(r, q)
		}
		if len(r) > 0 && r[0] != r[len(r)-1] {
			r = append(r, r[0])
		}
		if len(r) < 4 {
			if i == 0 {
				return orb.Polygon{}
			}
			continue
		}
		want := orb.CCW
		if i > 0 {
			want = orb.CW
		}
		if r.Orientation() != want {
			r.Reverse()
		}
		out = append(out, r)
	}
	return out
}
