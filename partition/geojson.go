package partition

import (
	"bufio"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"

	"github.com/paulmach/orb"
)

// WriteGeoJSON writes the partition as an RFC 7946 FeatureCollection: one
// Polygon feature per region (WGS84, exterior rings counter-clockwise,
// holes clockwise), in id order, with properties id, name, area_km2,
// perimeter_km, point [lon, lat], border_roads [{name, length_km}] and
// neighbours [{id, shared_km}]. The collection carries a "bbox" (the study
// area), and the foreign members "source", "water_km2" (when water areas
// lie outside every region) and, if any, "warnings". The
// same partition always gives the same bytes.
func (p *Partition) WriteGeoJSON(w io.Writer) error {
	bw := bufio.NewWriter(w)
	bw.WriteString(`{"type":"FeatureCollection","source":`)
	writeString(bw, p.Source)
	bw.WriteString(`,"bbox":[`)
	for i, v := range []float64{p.Bound.Min[0], p.Bound.Min[1], p.Bound.Max[0], p.Bound.Max[1]} {
		if i > 0 {
			bw.WriteByte(',')
		}
		bw.WriteString(coord(v))
	}
	bw.WriteByte(']')
	if p.WaterKM2 > 0 {
		bw.WriteString(`,"water_km2":`)
		bw.WriteString(measure(p.WaterKM2))
	}
	if len(p.Warnings) > 0 {
		bw.WriteString(`,"warnings":[`)
		for i, s := range p.Warnings {
			if i > 0 {
				bw.WriteByte(',')
			}
			writeString(bw, s)
		}
		bw.WriteByte(']')
	}
	bw.WriteString(`,"features":[`)
	for i := range p.Regions {
		r := &p.Regions[i]
		if i > 0 {
			bw.WriteByte(',')
		}
		bw.WriteString("\n{\"type\":\"Feature\",\"id\":")
		bw.WriteString(strconv.Itoa(r.ID))
		bw.WriteString(`,"geometry":{"type":"Polygon","coordinates":[`)
		for j, ring := range r.Polygon {
			if j > 0 {
				bw.WriteByte(',')
			}
			bw.WriteByte('[')
			for k, pt := range ring {
				if k > 0 {
					bw.WriteByte(',')
				}
				writePoint(bw, pt)
			}
			bw.WriteByte(']')
		}
		bw.WriteString(`]},"properties":{"id":`)
		bw.WriteString(strconv.Itoa(r.ID))
		bw.WriteString(`,"name":`)
		writeString(bw, r.Name)
		bw.WriteString(`,"area_km2":`)
		bw.WriteString(measure(r.AreaKM2))
		bw.WriteString(`,"perimeter_km":`)
		bw.WriteString(measure(r.PerimeterKM))
		bw.WriteString(`,"point":`)
		writePoint(bw, r.Point)
		bw.WriteString(`,"border_roads":[`)
		for j, b := range r.BorderRoads {
			if j > 0 {
				bw.WriteByte(',')
			}
			bw.WriteString(`{"name":`)
			writeString(bw, b.Name)
			bw.WriteString(`,"length_km":`)
			bw.WriteString(measure(b.LengthKM))
			bw.WriteByte('}')
		}
		bw.WriteString(`],"neighbours":[`)
		for j, n := range r.Neighbours {
			if j > 0 {
				bw.WriteByte(',')
			}
			bw.WriteString(`{"id":`)
			bw.WriteString(strconv.Itoa(n.ID))
			bw.WriteString(`,"shared_km":`)
			bw.WriteString(measure(n.SharedKM))
			bw.WriteByte('}')
		}
		bw.WriteString("]}}")
	}
	bw.WriteString("\n]}\n")
	return bw.Flush()
}

func writeString(w *bufio.Writer, s string) {
	b, _ := json.Marshal(s) // a string always marshals
	w.Write(b)
}

func writePoint(w *bufio.Writer, p orb.Point) {
	w.WriteByte('[')
	w.WriteString(coord(p[0]))
	w.WriteByte(',')
	w.WriteString(coord(p[1]))
	w.WriteByte(']')
}

// coord formats a coordinate losslessly (shortest form that reads back
// to the same float64), so that rings stay valid and closed.
func coord(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "null"
	}
	return strconv.FormatFloat(v, 'f', -1, 64)
}

// measure formats a length or area to six significant digits, enough for
// a reported figure, without exponent notation.
func measure(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "null"
	}
	r, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'g', 6, 64), 64)
	return strconv.FormatFloat(r, 'f', -1, 64)
}

// geoJSON mirrors what WriteGeoJSON writes.
type geoJSON struct {
	Type     string            `json:"type"`
	Source   string            `json:"source"`
	BBox     []float64         `json:"bbox"`
	WaterKM2 float64           `json:"water_km2"`
	Warnings []string          `json:"warnings"`
	Features []json.RawMessage `json:"features"`
}

type geoFeature struct {
	Type     string `json:"type"`
	Geometry *struct {
		Type        string          `json:"type"`
		Coordinates json.RawMessage `json:"coordinates"`
	} `json:"geometry"`
	Properties *struct {
		ID          *int      `json:"id"`
		Name        string    `json:"name"`
		AreaKM2     *float64  `json:"area_km2"`
		PerimeterKM *float64  `json:"perimeter_km"`
		Point       []float64 `json:"point"`
		BorderRoads []struct {
			Name     string  `json:"name"`
			LengthKM float64 `json:"length_km"`
		} `json:"border_roads"`
		Neighbours []struct {
			ID       int     `json:"id"`
			SharedKM float64 `json:"shared_km"`
		} `json:"neighbours"`
	} `json:"properties"`
}

// ReadGeoJSON reads a partition written by WriteGeoJSON. name labels r in
// errors, which also give the feature's position and id. Region ids must
// be 1..n, each once; neighbours must refer to regions in the file.
func ReadGeoJSON(r io.Reader, name string) (*Partition, error) {
	fail := func(format string, args ...any) error {
		return fmt.Errorf("partition: %s: %s", name, fmt.Sprintf(format, args...))
	}
	var doc geoJSON
	dec := json.NewDecoder(r)
	if err := dec.Decode(&doc); err != nil {
		var se *json.SyntaxError
		if errors.As(err, &se) {
			return nil, fail("not JSON at byte %d: %v", se.Offset, err)
		}
		if errors.Is(err, io.EOF) {
			return nil, fail("empty file")
		}
		return nil, fail("not a region FeatureCollection: %v", err)
	}
	if doc.Type != "FeatureCollection" {
		return nil, fail("type %q, want FeatureCollection", doc.Type)
	}
	if !(doc.WaterKM2 >= 0) {
		return nil, fail("water_km2 %v is not a non-negative number", doc.WaterKM2)
	}
	p := &Partition{Source: doc.Source, Warnings: doc.Warnings, WaterKM2: doc.WaterKM2}
	for i, raw := range doc.Features {
		var f geoFeature
		if err := json.Unmarshal(raw, &f); err != nil {
			return nil, fail("feature %d: %v", i, err)
		}
		if f.Type != "Feature" {
			return nil, fail("feature %d: type %q, want Feature", i, f.Type)
		}
		if f.Properties == nil || f.Properties.ID == nil {
			return nil, fail("feature %d: no properties.id", i)
		}
		pr := f.Properties
		id := *pr.ID
		where := fmt.Sprintf("feature %d (id %d)", i, id)
		if f.Geometry == nil || f.Geometry.Type != "Polygon" {
			return nil, fail("%s: geometry is not a Polygon", where)
		}
		var rings [][][]float64
		if err := json.Unmarshal(f.Geometry.Coordinates, &rings); err != nil {
			return nil, fail("%s: polygon coordinates: %v", where, err)
		}
		if len(rings) == 0 {
			return nil, fail("%s: polygon has no rings", where)
		}
		reg := Region{ID: id, Name: pr.Name}
		for j, ring := range rings {
			if len(ring) < 4 {
				return nil, fail("%s: ring %d has %d positions, want at least 4", where, j, len(ring))
			}
			rg := make(orb.Ring, len(ring))
			for k, pos := range ring {
				pt, err := position(pos)
				if err != nil {
					return nil, fail("%s: ring %d position %d: %v", where, j, k, err)
				}
				rg[k] = pt
			}
			if rg[0] != rg[len(rg)-1] {
				return nil, fail("%s: ring %d is not closed", where, j)
			}
			reg.Polygon = append(reg.Polygon, rg)
		}
		if pr.AreaKM2 == nil || pr.PerimeterKM == nil || !(*pr.AreaKM2 >= 0) || !(*pr.PerimeterKM >= 0) {
			return nil, fail("%s: area_km2 and perimeter_km must be non-negative numbers", where)
		}
		reg.AreaKM2, reg.PerimeterKM = *pr.AreaKM2, *pr.PerimeterKM
		pt, err := position(pr.Point)
		if err != nil {
			return nil, fail("%s: point: %v", where, err)
		}
		reg.Point = pt
		for _, b := range pr.BorderRoads {
			reg.BorderRoads = append(reg.BorderRoads, BorderRoad{Name: b.Name, LengthKM: b.LengthKM})
		}
		for _, n := range pr.Neighbours {
			reg.Neighbours = append(reg.Neighbours, Neighbour{ID: n.ID, SharedKM: n.SharedKM})
		}
		p.Regions = append(p.Regions, reg)
	}
	slices.SortStableFunc(p.Regions, func(a, b Region) int { return a.ID - b.ID })
	for i, reg := range p.Regions {
		if reg.ID != i+1 {
			return nil, fail("region ids must be 1..%d, each once; found id %d where %d was expected", len(p.Regions), reg.ID, i+1)
		}
	}
	for _, reg := range p.Regions {
		for _, n := range reg.Neighbours {
			if n.ID < 1 || n.ID > len(p.Regions) || n.ID == reg.ID {
				return nil, fail("region %d: neighbour id %d is not another region of the file", reg.ID, n.ID)
			}
		}
	}
	switch {
	case len(doc.BBox) == 4:
		p.Bound = orb.Bound{Min: orb.Point{doc.BBox[0], doc.BBox[1]}, Max: orb.Point{doc.BBox[2], doc.BBox[3]}}
	case len(doc.BBox) != 0:
		return nil, fail("bbox has %d numbers, want 4", len(doc.BBox))
	case len(p.Regions) > 0:
		b := p.Regions[0].Polygon.Bound()
		for _, reg := range p.Regions[1:] {
			b = b.Union(reg.Polygon.Bound())
		}
		p.Bound = b
	}
	return p, nil
}

func position(pos []float64) (orb.Point, error) {
	if len(pos) < 2 {
		return orb.Point{}, fmt.Errorf("want [lon, lat], got %d numbers", len(pos))
	}
	lon, lat := pos[0], pos[1]
	if !(lon >= -180 && lon <= 180 && lat >= -90 && lat <= 90) {
		return orb.Point{}, fmt.Errorf("[%v, %v] is not a longitude, latitude", lon, lat)
	}
	return orb.Point{lon, lat}, nil
}
