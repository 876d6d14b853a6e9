package main

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"net"
	"net/http"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"time"

	"github.com/BurntSushi/toml"

	"narrows/cmd/internal/atomicfile"
	"narrows/cmd/internal/explore"
	"narrows/partition"
	"narrows/patterns"
	"narrows/regiongraph"
)

func runExplore(ctx context.Context, env *environment, args []string) error {
	fs := newFlagSet(env, "explore", "[--port N | --listen HOST:PORT] study.toml | --graphs G.parquet [--regions R.geojson]")
	var in storeFlags
	var port int
	var file, listen string
	in.register(fs)
	fs.IntVar(&port, "port", 0, "port on 127.0.0.1 to serve on (default: a free one)")
	fs.StringVar(&listen, "listen", "", "serve on `HOST:PORT` instead; an address other machines can reach needs the printed access token")
	if err := parseFlagsWithRest(env, fs, args, func(rest []string) {
		if file == "" && len(rest) > 0 {
			file, rest = rest[0], rest[1:]
		}
		if len(rest) > 0 {
			file = "\x00"
		}
	}); err != nil {
		return err
	}
	if (file == "") == (in.graphs == "") || file == "\x00" {
		return usagef("give one study file, or --graphs")
	}
	if port < 0 || port > 65535 {
		return usagef("--port: %d is not a port", port)
	}
	loopback := true
	if listen != "" {
		if port != 0 {
			return usagef("give --port or --listen, not both")
		}
		var err error
		if loopback, err = explore.IsLoopback(listen); err != nil {
			return usagef("--listen %q: want HOST:PORT, such as 127.0.0.1:8080 or 0.0.0.0:8080 (%v)", listen, err)
		}
	}
	var st *explore.Study
	var err error
	if file != "" {
		st, err = exploreStudy(ctx, env, file)
	} else {
		st, err = exploreStore(&in)
	}
	if err != nil {
		return err
	}
	srv, err := explore.New(ctx, st)
	if err != nil {
		return err
	}
	var ln net.Listener
	if listen == "" {
		ln, err = explore.Listen(port)
	} else {
		ln, err = net.Listen("tcp", listen)
	}
	if err != nil {
		return err
	}
	addr := ln.Addr().String()
	hs := &http.Server{Handler: srv.Handler(), ReadHeaderTimeout: 10 * time.Second}
	if loopback {
		srv.AllowHost(addr)
		srv.AllowHost(strings.Replace(addr, "127.0.0.1", "localhost", 1))
		fmt.Fprintf(env.stdout, "narrows explore: open http://%s/ (this machine only; Ctrl-C to stop)\n", addr)
	} else {
		// Other machines name this one as they will: the host is not
		// checked, the access token stands in for it.
		access, err := srv.RequireAccess()
		if err != nil {
			ln.Close()
			return err
		}
		fmt.Fprintf(env.stdout, "narrows explore: open http://%s/?%s=%s\n", addr, explore.AccessParam, access)
		fmt.Fprintln(env.stdout, "  reachable from other machines: whoever has this address with its token can read the study and save into its file; plain HTTP, so use a trusted network; Ctrl-C to stop")
	}
	done := make(chan error, 1)
	go func() { done <- hs.Serve(ln) }()
	select {
	case err := <-done:
		return err
	case <-ctx.Done():
		shut, cancel := context.WithTimeout(context.Background(), 2*time.Second)
		defer cancel()
		hs.Shutdown(shut)
		<-done
		return nil
	}
}

// exploreStore opens a day-graph store with its regions, at the default
// scan options; there is no study file to save into.
func exploreStore(in *storeFlags) (*explore.Study, error) {
	opts := patterns.DefaultScanOptions()
	// Every edge is read: the page may lower the minimum of trips.
	opts.Skyline.MinTrips = 0
	store, regions, err := in.open(opts)
	if err != nil {
		return nil, err
	}
	return &explore.Study{Title: "narrows explore " + filepath.Base(in.graphs), Store: store, Regions: regions,
		Scan: patterns.DefaultScanOptions(), Compare: patterns.DefaultCompareOptions()}, nil
}

// exploreStudy builds the study's regions and day graphs in memory, as
// run does but writing nothing, and returns them with the study's
// choices and a Save that writes the choices back into the study file.
func exploreStudy(ctx context.Context, env *environment, file string) (*explore.Study, error) {
	s, err := loadStudy(file)
	if err != nil {
		return nil, err
	}
	r := &studyRun{study: s, file: file, dir: filepath.Dir(file)}
	regions, sum, err := regionsInMemory(ctx, env, r.rel(s.Regions.OSM), s.Regions.Options)
	if err != nil {
		return nil, err
	}
	scheme, err := r.schemeLines(ctx, regions)
	if err != nil {
		return nil, err
	}
	// The trip files are named as run's store names them: relative to
	// the study file.
	trips, names := r.tripFiles()
	store, err := ingestInMemory(ctx, env, regions, sum, tripInputs(trips, s.Trips.Format), names, s.Trips.Options)
	if err != nil {
		return nil, err
	}
	return &explore.Study{
		Title: s.titleOr(file), Store: store, Regions: regions, Scheme: scheme,
		Scan: s.Scan.ScanOptions, Before: s.Compare.Before.String(), After: s.Compare.After.String(),
		Compare: s.Compare.CompareOptions, Exclusions: s.Scan.exclusions(),
		Focus: s.Compare.Focus.String(), ParseFocus: parseFocus,
		Save: func(c explore.Choices) (string, error) { return saveStudy(file, c) },
		Report: func(ctx context.Context) ([]string, error) {
			return writeStudyReport(ctx, file, regions, scheme, store)
		},
	}, nil
}

// writeStudyReport writes the findings and report of the study file as
// run does, into the study's output folder under its name, from regions
// and day graphs already built (those run would build from the study's
// files), and returns the files written.
func writeStudyReport(ctx context.Context, file string, regions *partition.Partition, scheme []partition.NetworkLine, store *regiongraph.Store) ([]string, error) {
	s, err := loadStudy(file)
	if err != nil {
		return nil, err
	}
	r := &studyRun{study: s, file: file, dir: filepath.Dir(file)}
	r.out = r.rel(s.Output)
	r.steps = filepath.Join(r.out, "steps")
	var log bytes.Buffer
	env := &environment{stdout: &log, stderr: &log, files: newRunFiles(&log)}
	env.files.ctx = ctx
	if err := r.claimOutputs(env.files); err != nil {
		return nil, err
	}
	if err := os.MkdirAll(r.out, 0o755); err != nil {
		return nil, err
	}
	if err := r.analyse(ctx, env, regions, scheme, store); err != nil {
		return nil, err
	}
	return env.files.written, nil
}

// regionsInMemory partitions an extract as buildRegions does, reading the
// regions back from their GeoJSON bytes so that they are the regions run
// analyses, without writing them.
func regionsInMemory(ctx context.Context, env *environment, osmPath string, opts partition.Options) (*partition.Partition, string, error) {
	p, geojson, err := partitionExtract(ctx, env, osmPath, opts)
	if err != nil {
		return nil, "", err
	}
	return regionsAsWritten(p, geojson, osmPath)
}

// saveStudy writes the choices into the study file: the previous version
// is kept beside it first (STEM.N.toml, never replaced), then the study is
// replaced atomically and read back with every check of loadStudy; if that
// fails, the previous version is put back. Keys the page does not set are
// kept as they were; comments are not.
func saveStudy(file string, c explore.Choices) (string, error) {
	old, err := os.ReadFile(file)
	if err != nil {
		return "", err
	}
	doc := map[string]any{}
	if _, err := toml.Decode(string(old), &doc); err != nil {
		return "", fmt.Errorf("study file %s: %w", file, err)
	}
	setStudyChoices(doc, c)
	var buf bytes.Buffer
	buf.WriteString("# narrows study file, saved by narrows explore. Paths are relative to this file.\n")
	if err := toml.NewEncoder(&buf).Encode(doc); err != nil {
		return "", err
	}
	kept, err := keepVersion(file, old)
	if err != nil {
		return "", err
	}
	if err := atomicfile.Write(file, func(w io.Writer) error { _, err := w.Write(buf.Bytes()); return err }); err != nil {
		return "", err
	}
	if _, err := loadStudy(file); err != nil {
		restore := atomicfile.Write(file, func(w io.Writer) error { _, err := w.Write(old); return err })
		return "", errors.Join(fmt.Errorf("the saved study does not read back, the previous one is restored: %w", err), restore)
	}
	return file + " (previous version kept as " + filepath.Base(kept) + ")", nil
}

// setStudyChoices sets the study keys the page controls in doc.
func setStudyChoices(doc map[string]any, c explore.Choices) {
	scan := table(doc, "scan")
	o := c.Scan
	for k, v := range map[string]string{"from": o.From, "to": o.To, "window": o.Window} {
		if v == "" {
			delete(scan, k)
		} else {
			scan[k] = v
		}
	}
	scan["days"] = string(o.Days)
	scan["min_trips"] = int64(o.Skyline.MinTrips)
	scan["support"] = o.Support
	scan["k"] = int64(o.Skyline.K)
	scan["detour_floor"] = o.Skyline.DetourFloor
	scan["no_speed_gate"] = o.Skyline.NoSpeedGate
	if len(o.Exclude) == 0 {
		delete(scan, "exclude")
	} else {
		scan["exclude"] = o.Exclude
	}
	days := []map[string]any{}
	for _, d := range c.Exclusions.Days {
		m := map[string]any{"from": d.From, "reason": d.Reason}
		if d.To != "" {
			m["to"] = d.To
		}
		days = append(days, m)
	}
	pairs := []map[string]any{}
	for _, p := range c.Exclusions.Pairs {
		m := map[string]any{"a": int64(p.A), "reason": p.Reason}
		if p.B != 0 {
			m["b"] = int64(p.B)
		}
		pairs = append(pairs, m)
	}
	scan["excluded_days"], scan["excluded_pairs"] = days, pairs
	if len(days) == 0 {
		delete(scan, "excluded_days")
	}
	if len(pairs) == 0 {
		delete(scan, "excluded_pairs")
	}
	cmp := table(doc, "compare")
	if c.Before == "" {
		delete(cmp, "before")
		delete(cmp, "after")
	} else {
		cmp["before"], cmp["after"] = c.Before, c.After
	}
	if c.Focus == "" {
		delete(cmp, "focus")
	} else {
		cmp["focus"] = c.Focus
	}
	if len(cmp) == 0 {
		delete(doc, "compare")
	}
}

func table(doc map[string]any, key string) map[string]any {
	t, ok := doc[key].(map[string]any)
	if !ok {
		t = map[string]any{}
		doc[key] = t
	}
	return t
}

// keepVersion writes old beside file as STEM.N.toml with the first N not
// taken, never replacing a file, and returns its path.
func keepVersion(file string, old []byte) (string, error) {
	stem := strings.TrimSuffix(file, filepath.Ext(file))
	for n := 1; n < 10000; n++ {
		path := stem + "." + strconv.Itoa(n) + filepath.Ext(file)
		f, err := os.OpenFile(path, os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o644)
		if errors.Is(err, os.ErrExist) {
			continue
		}
		if err != nil {
			return "", err
		}
		if _, err := f.Write(old); err != nil {
			f.Close()
			return "", err
		}
		if err := f.Sync(); err != nil {
			f.Close()
			return "", err
		}
		return path, f.Close()
	}
	return "", fmt.Errorf("%s: no free name for the previous version", file)
}
