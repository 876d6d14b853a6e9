package partition

import (
	"fmt"
	"math"
	"strings"
)

// Validate reports the first option that Build and ReadFile would refuse:
// no road class or barrier chosen, a road class that is not an OSM highway
// value, an unknown barrier, a negative or non-finite distance, area or
// compactness, a compactness above 1, or an unusable BBox.
func (o Options) Validate() error {
	if err := o.validate(); err != nil {
		return fmt.Errorf("partition: %v", err)
	}
	return nil
}

// validate is Validate without the package prefix: Build puts the input's
// name there.
func (o *Options) validate() error {
	if len(o.Roads) == 0 && len(o.Barriers) == 0 {
		return fmt.Errorf("no road classes or barriers chosen")
	}
	for _, r := range o.Roads {
		if r == "" || strings.ContainsAny(r, " ,=") {
			return fmt.Errorf("road class %q is not an OSM highway value", r)
		}
	}
	for _, r := range o.SplitRoads {
		if r == "" || strings.ContainsAny(r, " ,=") {
			return fmt.Errorf("split road class %q is not an OSM highway value", r)
		}
	}
	for _, b := range o.Barriers {
		if !knownBarrier(b) {
			return fmt.Errorf("unknown barrier %q (want rail, river, canal, coastline or water)", b)
		}
	}
	for _, v := range []struct {
		name string
		x    float64
	}{{"snap distance", o.SnapMetres}, {"minimum area", o.MinAreaKM2}, {"minimum compactness", o.MinCompactness}, {"sliver width", o.MaxSliverWidthMetres},
		{"extension distance", o.ExtendMetres}, {"minimum water area", o.MinWaterAreaKM2}, {"largest region area", o.MaxRegionKM2}, {"minimum border road length", o.MinBorderRoadMetres}} {
		if math.IsNaN(v.x) || math.IsInf(v.x, 0) || v.x < 0 {
			return fmt.Errorf("%s %v must be a non-negative number", v.name, v.x)
		}
	}
	if o.MinCompactness > 1 {
		return fmt.Errorf("minimum compactness %v is above 1", o.MinCompactness)
	}
	if o.BBox != nil {
		if err := checkBound(*o.BBox); err != nil {
			return fmt.Errorf("bbox: %v", err)
		}
	}
	return nil
}
