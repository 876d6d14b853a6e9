package main

import (
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/hex"
	"flag"
	"fmt"
	"io"
	"os"
	"time"

	"narrows/partition"
	"narrows/report"
)

func runRegions(ctx context.Context, env *environment, args []string) error {
	fs := newFlagSet(env, "regions", "--osm FILE [--bbox W,S,E,N] [--roads LIST] [--barriers LIST|none] [--snap METRES] [--extend METRES] [--min-area KM2] [--max-region-area KM2] [--exact] --out FILE.geojson")
	var osmPath, out string
	fs.StringVar(&osmPath, "osm", "", "OpenStreetMap extract: PBF or XML (plain, gzip or bzip2)")
	fs.StringVar(&out, "out", "", "GeoJSON file to write")
	env.files.bindForce(fs)
	opts := partition.DefaultOptions()
	optFlags := bindOptions(fs, func(fs *flag.FlagSet) { bindRegions(fs, &opts) })
	if err := parseFlags(env, fs, args); err != nil {
		return err
	}
	if osmPath == "" || out == "" {
		return usagef("--osm and --out are required")
	}
	if err := optFlags.check(opts.Validate()); err != nil {
		return err
	}
	env.files.read(osmPath)
	if err := env.files.claim(out, kindRegions); err != nil {
		return err
	}
	_, _, err := buildRegions(ctx, env, osmPath, opts, out)
	return err
}

// buildRegions partitions an extract, writes the GeoJSON and prints the
// summary line. It returns the regions as the later steps see them, read
// back from the bytes written (lengths and areas are rounded there), and
// the SHA-256 of those bytes, which ties a day-graph store to its regions.
func buildRegions(ctx context.Context, env *environment, osmPath string, opts partition.Options, out string) (*partition.Partition, string, error) {
	start := time.Now()
	p, geojson, err := partitionExtract(ctx, env, osmPath, opts)
	if err != nil {
		return nil, "", err
	}
	if err := env.files.write(out, kindRegions, func(w io.Writer) error { _, err := w.Write(geojson); return err }); err != nil {
		return nil, "", err
	}
	var area float64
	for _, r := range p.Regions {
		area += r.AreaKM2
	}
	fmt.Fprintf(env.stdout, "%d regions covering %.2f km² in %.2f s -> %s\n", len(p.Regions), area, time.Since(start).Seconds(), out)
	printRegionSteps(env.stdout, p, opts)
	return regionsAsWritten(p, geojson, out)
}

// partitionExtract partitions the extract at osmPath, warnings to stderr,
// and returns the regions with their GeoJSON.
func partitionExtract(ctx context.Context, env *environment, osmPath string, opts partition.Options) (*partition.Partition, []byte, error) {
	opts.Warn = func(msg string) { fmt.Fprintf(env.stderr, "warning: %s: %s\n", osmPath, msg) }
	p, err := partition.ReadFile(ctx, osmPath, opts)
	if err != nil {
		return nil, nil, err
	}
	var geojson bytes.Buffer
	if err := p.WriteGeoJSON(&geojson); err != nil {
		return nil, nil, err
	}
	return p, geojson.Bytes(), nil
}

// regionsAsWritten returns the regions as read back from their GeoJSON
// (what a later step reading the file gets, so that a run in memory equals
// one from files) with its SHA-256, keeping p's linework: the GeoJSON
// holds none, and the maps and the routing take it from the extract's read.
func regionsAsWritten(p *partition.Partition, geojson []byte, name string) (*partition.Partition, string, error) {
	back, sum, err := decodeRegions(geojson, name)
	if err != nil {
		return nil, "", err
	}
	back.Network, back.Routing = p.Network, p.Routing
	return back, sum, nil
}

// printRegionSteps says what bounds the regions and what each cleaning
// step did.
func printRegionSteps(w io.Writer, p *partition.Partition, opts partition.Options) {
	for _, line := range report.RegionSteps(p, opts) {
		fmt.Fprintf(w, "  %s\n", line)
	}
}

// readRegions reads a regions file written by buildRegions and returns the
// regions and the file's SHA-256.
func readRegions(path string) (*partition.Partition, string, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, "", err
	}
	return decodeRegions(data, path)
}

// decodeRegions parses the regions GeoJSON data read from name and hashes it.
func decodeRegions(data []byte, name string) (*partition.Partition, string, error) {
	p, err := partition.ReadGeoJSON(bytes.NewReader(data), name)
	if err != nil {
		return nil, "", err
	}
	sum := sha256.Sum256(data)
	return p, hex.EncodeToString(sum[:]), nil
}
