package partition

import (
	"context"
	"fmt"
	"os"
	"slices"
	"strings"

	"github.com/paulmach/orb"
)

// NetworkLine is one line of an extract's network as the maps draw it: a
// run of consecutive present nodes of one OSM way.
type NetworkLine struct {
	// WayID is the OSM way the line belongs to (a way cut by missing
	// nodes gives several lines with the same id).
	WayID int64
	// Class is the highway class ("primary", "residential", ...) or the
	// barrier kind ("rail", "river", "canal", "coastline", "water"; water
	// lines are the banks of water areas).
	Class string
	// Name is the way's name (motorways and trunks by their ref); "" when
	// it has none.
	Name string
	// Line is in WGS84 longitude/latitude.
	Line orb.LineString
}

// networkOf collects the extract's linework whose extent meets the study
// area: the bounding roads and barriers, the split roads of NetworkRoads
// classes, the barriers of kinds not chosen and the NetworkRoads, in that
// order (each in the
// reader's order of class rank and way id, so the list is deterministic).
func networkOf(ex *extract, bound orb.Bound) []NetworkLine {
	var out []NetworkLine
	add := func(id int64, class, name string, pts []orb.Point) {
		if !lineMeets(pts, bound) {
			return
		}
		if strings.HasPrefix(name, "(unnamed ") {
			name = ""
		}
		out = append(out, NetworkLine{WayID: id, Class: class, Name: name, Line: slices.Clone(orb.LineString(pts))})
	}
	for _, l := range ex.lines {
		w := ex.ways[l.way]
		add(int64(w.id), w.class, w.label, l.pts)
	}
	for _, l := range ex.splitLines {
		w := ex.ways[l.way]
		if !ex.splitDrawn[w.class] {
			continue // a track read only to split regions
		}
		add(int64(w.id), w.class, w.label, l.pts)
	}
	for _, l := range ex.unused {
		add(int64(l.way), l.kind, l.name, l.pts)
	}
	for _, l := range ex.network {
		add(int64(l.way), l.kind, l.name, l.pts)
	}
	return out
}

// lineMeets reports whether the extent of pts meets b.
func lineMeets(pts []orb.Point, b orb.Bound) bool {
	if len(pts) == 0 {
		return false
	}
	lb := orb.Bound{Min: pts[0], Max: pts[0]}
	for _, p := range pts[1:] {
		lb = lb.Extend(p)
	}
	return lb.Intersects(b)
}

// ReadNetwork reads only the linework of the OSM extract at path, as
// Partition.Network holds it, without building regions: for the extract
// of a later state of the network (with a scheme built), whose new ways
// NewWays finds. Lines are kept when they meet opts.BBox, else the file's
// bounds, else all.
func ReadNetwork(ctx context.Context, path string, opts Options) ([]NetworkLine, error) {
	ex, err := readExtractFile(ctx, path, &opts)
	if err != nil {
		return nil, err
	}
	bound := orb.Bound{Min: orb.Point{-180, -90}, Max: orb.Point{180, 90}}
	switch {
	case opts.BBox != nil:
		bound = *opts.BBox
	case ex.header != nil:
		bound = *ex.header
	}
	return networkOf(ex, bound), nil
}

// NewWays returns the lines of after whose way is not in before: the
// links a scheme added, when before and after are the network of the
// same area read before and after it was built (as OSM keeps the ids of
// unchanged ways).
func NewWays(before, after []NetworkLine) []NetworkLine {
	old := make(map[int64]bool, len(before))
	for _, l := range before {
		old[l.WayID] = true
	}
	var out []NetworkLine
	for _, l := range after {
		if !old[l.WayID] {
			out = append(out, l)
		}
	}
	return out
}

// readExtractFile checks opts and reads the extract at path, for the
// readers that keep only part of it (ReadNetwork, ReadRouting).
func readExtractFile(ctx context.Context, path string, opts *Options) (*extract, error) {
	if err := opts.validate(); err != nil {
		return nil, fmt.Errorf("partition: %s: %v", path, err)
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("partition: %w", err)
	}
	defer f.Close()
	ex, err := readOSM(ctx, f, opts)
	if err != nil {
		return nil, fmt.Errorf("partition: %s: %w", path, err)
	}
	return ex, nil
}
