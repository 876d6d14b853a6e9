package main

import (
	"bufio"
	"context"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"
	"strings"

	"narrows/cmd/internal/atomicfile"
	"narrows/regiongraph"
)

// outputKind says what a file written by narrows is. A step replaces a
// file of its own kind (re-running a step is normal) but not one of
// another kind, or a file narrows did not write, without --force.
type outputKind string

const (
	kindRegions       outputKind = "regions"         // regions GeoJSON of the regions step
	kindStore         outputKind = "day-graph store" // Parquet of the ingest step
	kindFindings      outputKind = "findings"        // findings JSON of a scan
	kindFindingsLayer outputKind = "findings layer"  // map layer of a scan or report
	kindRegionsLayer  outputKind = "regions layer"   // map layer of a report
	kindWorkbook      outputKind = "workbook"        // .xlsx report
	kindPage          outputKind = "HTML page"       // .html report
	kindMapPicture    outputKind = "map picture"     // --map export of a report's map (.svg or .png)
	kindDaily         outputKind = "daily values"    // -daily.csv beside a workbook whose Daily sheet would be too long
	kindTown          outputKind = "simulated input" // OSM, trips, GPS files of simulate and demo
	kindStudy         outputKind = "study file"      // study.toml of simulate and demo
)

// manifestName is the file, in every folder narrows writes into, that
// records which kind of output each file there is. It is hidden, one line
// per file ("kind<TAB>name"), sorted, so two identical runs leave
// identical manifests.
const manifestName = ".narrows-outputs"

// runFiles is what one run of a command has read and is about to write:
// an output may never be one of the run's inputs, nor be written twice by
// the run.
type runFiles struct {
	force   bool
	inputs  []inputFile
	claimed map[string]outputKind // absolute path: kind
	// stderr receives the notes on stale temporary files removed.
	stderr io.Writer
	// ctx, when set, is checked before each output is written: an
	// interrupt after the reading is over still stops the run.
	ctx context.Context
	// written lists the outputs written, in order.
	written []string
}

type inputFile struct {
	path string
	info os.FileInfo
}

func newRunFiles(stderr io.Writer) *runFiles {
	return &runFiles{claimed: map[string]outputKind{}, stderr: stderr}
}

// bindForce adds --force to a command that writes outputs.
func (r *runFiles) bindForce(fs *flag.FlagSet) {
	fs.BoolVar(&r.force, "force", false, "replace outputs of another kind, or files narrows did not write")
}

// read records that the run reads path (a file or a folder). A path that
// does not exist is left to the reader to report.
func (r *runFiles) read(paths ...string) {
	for _, p := range paths {
		info, err := os.Stat(p)
		if err != nil {
			continue
		}
		r.inputs = append(r.inputs, inputFile{path: p, info: info})
	}
}

// claim checks, before any work, that path may be written as an output of
// the given kind: it is not an input of this run (nor inside an input
// folder), not claimed twice, and either absent, an earlier output of the
// same kind, or --force was given. It also removes the temporary files a
// killed earlier write of path left behind.
func (r *runFiles) claim(path string, kind outputKind) error {
	abs, err := filepath.Abs(path)
	if err != nil {
		return err
	}
	if strings.ContainsFunc(filepath.Base(path), isControl) {
		return fmt.Errorf("output name %q holds control characters", path)
	}
	if _, dup := r.claimed[abs]; dup {
		return fmt.Errorf("%s would be written twice by this run: choose another --out", path)
	}
	info, statErr := os.Stat(path)
	for _, in := range r.inputs {
		inAbs, _ := filepath.Abs(in.path)
		same := inAbs == abs || (statErr == nil && os.SameFile(info, in.info))
		if same {
			return fmt.Errorf("refusing to write %s: it is an input of this run (%s); choose another output name", path, in.path)
		}
	}
	if statErr == nil {
		if info.IsDir() && (kind != kindStore || !storeIsDataset(path)) {
			return fmt.Errorf("cannot write %s: it is a folder", path)
		}
		was := readManifest(filepath.Dir(path))[filepath.Base(path)]
		if info.IsDir() && was == "" && emptyDir(path) {
			was = kind // an empty folder made for the dataset
		}
		switch {
		case r.force:
		case was == "":
			return fmt.Errorf("refusing to replace %s: narrows did not write it (pass --force to replace it)", path)
		case was != kind:
			return fmt.Errorf("refusing to replace %s: it is a %s, and this step writes a %s (pass --force to replace it)", path, was, kind)
		}
	}
	r.claimed[abs] = kind
	stale, err := atomicfile.Stale(path)
	if err != nil {
		return err
	}
	if kind == kindStore {
		dirs, err := regiongraph.StaleDatasetDirs(path)
		if err != nil {
			return err
		}
		for _, d := range dirs {
			if err := os.RemoveAll(d); err == nil && r.stderr != nil {
				fmt.Fprintf(r.stderr, "removed %s, left by an interrupted run\n", d)
			}
		}
	}
	for _, s := range stale {
		if err := os.Remove(s); err == nil && r.stderr != nil {
			fmt.Fprintf(r.stderr, "removed %s, left by an interrupted run\n", s)
		}
	}
	return nil
}

// claimAll claims each path with its kind (see claim).
func (r *runFiles) claimAll(outs []output) error {
	for _, o := range outs {
		if err := r.claim(o.path, o.kind); err != nil {
			return err
		}
	}
	return nil
}

// output is a file a step writes and its kind.
type output struct {
	path string
	kind outputKind
}

// write writes an output of the given kind atomically (see
// atomicfile.Write) and records its kind in the folder's manifest. An
// output not claimed before (the commands claim theirs before any work)
// is claimed now.
func (r *runFiles) write(path string, kind outputKind, write func(io.Writer) error) error {
	abs, err := filepath.Abs(path)
	if err != nil {
		return err
	}
	if was, ok := r.claimed[abs]; !ok {
		if err := r.claim(path, kind); err != nil {
			return err
		}
	} else if was != kind {
		return fmt.Errorf("%s would be written twice by this run, as a %s and a %s", path, was, kind)
	}
	if r.ctx != nil && r.ctx.Err() != nil {
		return r.ctx.Err()
	}
	if _, err := outputDir(path); err != nil {
		return err
	}
	// The kind is recorded before the file is put in place: a run killed
	// between the two must leave a file the next run may replace.
	if err := recordOutput(path, kind); err != nil {
		return err
	}
	if err := atomicfile.Write(path, write); err != nil {
		return err
	}
	r.written = append(r.written, path)
	return nil
}

// writeDataset writes a dataset output (a folder) with write, which
// writes it atomically itself (regiongraph.DatasetWriter), and records its
// kind as write does for a file.
func (r *runFiles) writeDataset(path string, kind outputKind, write func() error) error {
	abs, err := filepath.Abs(path)
	if err != nil {
		return err
	}
	if _, ok := r.claimed[abs]; !ok {
		if err := r.claim(path, kind); err != nil {
			return err
		}
	}
	if r.ctx != nil && r.ctx.Err() != nil {
		return r.ctx.Err()
	}
	if _, err := outputDir(path); err != nil {
		return err
	}
	if err := recordOutput(path, kind); err != nil { // before, as in write
		return err
	}
	if err := write(); err != nil {
		return err
	}
	r.written = append(r.written, path)
	return nil
}

// storeIsDataset tells whether a day-graph store output at path is a
// dataset folder: any name but one ending in .parquet, the single-file
// layout.
func storeIsDataset(path string) bool {
	return !strings.EqualFold(filepath.Ext(path), ".parquet")
}

// emptyDir tells whether path is a folder with nothing in it.
func emptyDir(path string) bool {
	entries, err := os.ReadDir(path)
	return err == nil && len(entries) == 0
}

// readManifest returns the kinds of the outputs recorded in dir by name.
func readManifest(dir string) map[string]outputKind {
	kinds := map[string]outputKind{}
	f, err := os.Open(filepath.Join(dir, manifestName))
	if err != nil {
		return kinds
	}
	defer f.Close()
	sc := bufio.NewScanner(io.LimitReader(f, 1<<20))
	for sc.Scan() {
		kind, name, ok := strings.Cut(sc.Text(), "\t")
		if ok && name != "" {
			kinds[name] = outputKind(kind)
		}
	}
	return kinds
}

// recordOutput notes in the manifest of path's folder that path is an
// output of the given kind.
func recordOutput(path string, kind outputKind) error {
	dir, name := filepath.Dir(path), filepath.Base(path)
	kinds := readManifest(dir)
	if kinds[name] == kind {
		return nil
	}
	kinds[name] = kind
	names := make([]string, 0, len(kinds))
	for n := range kinds {
		names = append(names, n)
	}
	slices.Sort(names)
	return atomicfile.Write(filepath.Join(dir, manifestName), func(w io.Writer) error {
		for _, n := range names {
			if _, err := fmt.Fprintf(w, "%s\t%s\n", kinds[n], n); err != nil {
				return err
			}
		}
		return nil
	})
}

// stemOf returns path without its extension: the stem that the outputs of
// a step are named from.
func stemOf(path string) string { return strings.TrimSuffix(path, filepath.Ext(path)) }
