package main

import (
	"context"
	"fmt"
	"math"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/paulmach/orb"

	"narrows/partition"
)

// schemeSpec is a study's scheme key, parsed: OSM way ids, a line, or an
// extract of the network with the scheme built.
type schemeSpec struct {
	ways    []int64
	line    orb.LineString
	extract string // path as written in the study
}

// parseScheme reads the study key scheme. Three forms:
//
//	"way/812 way/813"          OSM ways of the regions' extract
//	"4.101,51.2 4.107,51.21"   a line, longitude,latitude pairs (WGS84)
//	"town/after.osm"           an extract with the scheme built: its ways
//	                           missing from the regions' extract
func parseScheme(s string) (schemeSpec, error) {
	fields := strings.Fields(s)
	if len(fields) == 0 {
		return schemeSpec{}, nil
	}
	if strings.HasPrefix(fields[0], "way/") {
		var spec schemeSpec
		for _, f := range fields {
			id, err := strconv.ParseInt(strings.TrimPrefix(f, "way/"), 10, 64)
			if !strings.HasPrefix(f, "way/") || err != nil || id <= 0 {
				return schemeSpec{}, fmt.Errorf("scheme %q: %q is not an OSM way id written way/N", s, f)
			}
			spec.ways = append(spec.ways, id)
		}
		return spec, nil
	}
	if strings.Contains(fields[0], ",") {
		var spec schemeSpec
		for _, f := range fields {
			lon, lat, ok := strings.Cut(f, ",")
			x, err1 := strconv.ParseFloat(lon, 64)
			y, err2 := strconv.ParseFloat(lat, 64)
			if !ok || err1 != nil || err2 != nil || math.IsNaN(x) || math.IsNaN(y) || math.Abs(x) > 180 || math.Abs(y) > 90 {
				return schemeSpec{}, fmt.Errorf("scheme %q: %q is not a longitude,latitude pair in degrees", s, f)
			}
			spec.line = append(spec.line, orb.Point{x, y})
		}
		if len(spec.line) < 2 {
			return schemeSpec{}, fmt.Errorf("scheme %q: a line needs two or more longitude,latitude pairs", s)
		}
		return spec, nil
	}
	if len(fields) > 1 {
		return schemeSpec{}, fmt.Errorf("scheme %q: want way/N ids, lon,lat pairs or one OSM extract", s)
	}
	return schemeSpec{extract: fields[0]}, nil
}

// lines resolves the scheme to the lines the maps highlight: the named
// ways of the regions' network, the line as given, or the ways of the
// extract at path that the regions' network lacks. opts are the regions'
// options (the same road classes are read from both extracts).
func (spec schemeSpec) lines(ctx context.Context, regions *partition.Partition, path func(string) string, opts partition.Options) ([]partition.NetworkLine, error) {
	switch {
	case len(spec.ways) > 0:
		var out []partition.NetworkLine
		for _, id := range spec.ways {
			found := false
			for _, l := range regions.Network {
				if l.WayID == id {
					out, found = append(out, l), true
				}
			}
			if !found {
				return nil, fmt.Errorf("scheme: way/%d is not a road, railway or waterway of %s inside the study area", id, regions.Source)
			}
		}
		return out, nil
	case len(spec.line) > 0:
		return []partition.NetworkLine{{Class: "scheme", Line: spec.line}}, nil
	case spec.extract != "":
		after, err := partition.ReadNetwork(ctx, path(spec.extract), opts)
		if err != nil {
			return nil, fmt.Errorf("scheme: %w", err)
		}
		out := partition.NewWays(regions.Network, after)
		if len(out) == 0 {
			return nil, fmt.Errorf("scheme: %s holds no way that %s lacks", filepath.Base(spec.extract), regions.Source)
		}
		return out, nil
	}
	return nil, nil
}
