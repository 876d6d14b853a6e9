package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"strings"
	"time"

	"narrows/partition"
)

// regionFlags are the options of the partition step, shared by regions and
// the commands that build regions on the way.
type regionFlags struct {
	bbox, roads, barriers     string
	snap, minArea, minCompact float64
	maxSliverWidth            float64
	exact                     bool
}

func (f *regionFlags) register(fs *flag.FlagSet) {
	d := partition.DefaultOptions()
	fs.StringVar(&f.bbox, "bbox", "", "study area `W,S,E,N` in degrees (default: the file's header bounds)")
	fs.StringVar(&f.roads, "roads", strings.Join(d.Roads, ","), "highway classes that bound regions, comma-separated")
	fs.StringVar(&f.barriers, "barriers", strings.Join(d.Barriers, ","), "barriers that also bound regions: rail, river, canal, coastline")
	fs.Float64Var(&f.snap, "snap", d.SnapMetres, "close gaps where a road ends within this many `metres` of another")
	fs.Float64Var(&f.minArea, "min-area", d.MinAreaKM2, "merge regions smaller than this (`km2`) into a neighbour")
	fs.Float64Var(&f.minCompact, "min-compactness", d.MinCompactness, "merge regions thinner than this Polsby-Popper compactness (0-1)")
	fs.Float64Var(&f.maxSliverWidth, "max-sliver-width", d.MaxSliverWidthMetres, "the compactness rule merges only regions narrower than this many `metres` (mean width 2A/P; 0: any)")
	fs.BoolVar(&f.exact, "exact", false, "no cleaning: the plain faces of the noded linework plus the study-area rectangle")
}

func (f *regionFlags) options() (partition.Options, error) {
	o := partition.DefaultOptions()
	if f.bbox != "" {
		b, err := partition.ParseBBox(f.bbox)
		if err != nil {
			return o, usagef("--bbox: %v", err)
		}
		o.BBox = &b
	}
	o.Roads = splitList(f.roads)
	if len(o.Roads) == 0 {
		return o, usagef("--roads: give at least one highway class, e.g. motorway,trunk,primary,secondary")
	}
	o.Barriers = splitList(f.barriers)
	if f.snap < 0 || f.minArea < 0 || f.maxSliverWidth < 0 || f.minCompact < 0 || f.minCompact > 1 {
		return o, usagef("--snap, --min-area and --max-sliver-width must be non-negative, --min-compactness between 0 and 1")
	}
	o.SnapMetres, o.MinAreaKM2, o.MinCompactness, o.Exact = f.snap, f.minArea, f.minCompact, f.exact
	o.MaxSliverWidthMetres = f.maxSliverWidth
	return o, nil
}

func splitList(s string) []string {
	var out []string
	for _, p := range strings.Split(s, ",") {
		if p = strings.TrimSpace(p); p != "" {
			out = append(out, p)
		}
	}
	return out
}

func runRegions(ctx context.Context, env *environment, args []string) error {
	fs := newFlagSet(env, "regions", "--osm FILE [--bbox W,S,E,N] [--roads LIST] [--barriers LIST] [--snap METRES] [--min-area KM2] [--exact] --out FILE.geojson")
	var osmPath, out string
	var rf regionFlags
	fs.StringVar(&osmPath, "osm", "", "OpenStreetMap extract: PBF or XML (plain, gzip or bzip2)")
	fs.StringVar(&out, "out", "", "GeoJSON file to write")
	rf.register(fs)
	if err := parseFlags(env, fs, args); err != nil {
		return err
	}
	if osmPath == "" || out == "" {
		return usagef("--osm and --out are required")
	}
	opts, err := rf.options()
	if err != nil {
		return err
	}
	_, err = buildRegions(ctx, env, osmPath, opts, out)
	return err
}

// buildRegions partitions an extract, writes the GeoJSON and prints the
// summary line.
func buildRegions(ctx context.Context, env *environment, osmPath string, opts partition.Options, out string) (*partition.Partition, error) {
	start := time.Now()
	opts.Warn = func(msg string) { fmt.Fprintf(env.stderr, "warning: %s: %s\n", osmPath, msg) }
	p, err := partition.ReadFile(ctx, osmPath, opts)
	if err != nil {
		return nil, err
	}
	if err := writeFileAtomic(out, func(w io.Writer) error { return p.WriteGeoJSON(w) }); err != nil {
		return nil, err
	}
	var area float64
	for _, r := range p.Regions {
		area += r.AreaKM2
	}
	fmt.Fprintf(env.stdout, "%d regions covering %.2f km² in %.2f s -> %s\n", len(p.Regions), area, time.Since(start).Seconds(), out)
	return p, nil
}
