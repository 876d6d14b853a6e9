package regiongraph

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"strings"

	"narrows/partition"
)

// maxParsers caps the CSV parser goroutines; the output does not depend on
// their number.
const maxParsers = 4

// inputFile is one file to read, with its resolved format.
type inputFile struct {
	path   string
	format Format
	size   int64
}

// Ingest reads the inputs in order, places every trip on the regions and
// aggregates the trips per local day, window and directed region pair.
// regionsSHA256 is recorded in the store to tie it to the regions file.
//
// Row-level problems are counted in the store's Quality by reason; with
// Options.Strict the first one is a *RowError "file:line: reason". File-level
// problems (missing file or column, binary or malformed content, unknown
// time zone) are always errors.
//
// Ingest holds every edge in memory; IngestTo writes them as they come.
func Ingest(ctx context.Context, regions *partition.Partition, regionsSHA256 string, inputs []Input, opts Options) (*Store, error) {
	var k memorySink
	if err := ingest(ctx, regions, regionsSHA256, inputs, opts, k.begin); err != nil {
		return nil, err
	}
	return k.store, nil
}

// IngestTo is Ingest writing the store to w as one Parquet file, the bytes
// WriteParquet writes of the store Ingest returns. Edges go to the writer
// day by day as they are aggregated, with the writer's compression beside
// the aggregation of the next days, and are not kept: the returned store
// has the metadata and no edges. edit, when not nil, may change the
// metadata (the sources' names) before it is written.
func IngestTo(ctx context.Context, regions *partition.Partition, regionsSHA256 string, inputs []Input, opts Options, w io.Writer, edit func(*Meta)) (*Store, Written, error) {
	k := fileSink{w: w, edit: edit}
	if err := ingest(ctx, regions, regionsSHA256, inputs, opts, k.begin); err != nil {
		return nil, Written{}, err
	}
	return k.store, k.written(), nil
}

// Written counts what IngestTo wrote.
type Written struct {
	Edges   int   // rows
	Days    int   // distinct local days
	Spilled int64 // bytes that went through the temporary file (Options.MemoryMB)
}

// ingest runs an ingest: it reads the inputs, then calls begin with the
// store's metadata (no edges yet; the checks of the yield passed) and
// hands the edges in store order to the first function begin returns, and
// calls the second at the end.
func ingest(ctx context.Context, regions *partition.Partition, regionsSHA256 string, inputs []Input, opts Options,
	begin sinkBegin) error {
	if regions == nil || len(regions.Regions) == 0 {
		return errors.New("regiongraph: no regions")
	}
	if len(inputs) == 0 {
		return errors.New("regiongraph: no input files")
	}
	st, err := opts.settings()
	if err != nil {
		return err
	}
	parsers := max(1, min(runtime.GOMAXPROCS(0), maxParsers))
	memory := int64(opts.MemoryMB) << 20
	if opts.MemoryMB <= 0 {
		memory = defaultMemoryMB << 20
	}
	st.spill = newSpillFile(opts.SpillDir)
	defer st.spill.close()
	// A quarter for the duplicate check, the rest for trip records.
	st.seen = newRowSet(memory/4, st.spill)
	st.recordBudget = int(max(1, 3*memory/4/recordBytes/int64(parsers)))
	files, err := expandInputs(inputs, st)
	if err != nil {
		return err
	}
	progress := progressOf(files, opts.Progress)
	loc, err := newLocator(regions)
	if err != nil {
		return err
	}
	tallies := make([]*tally, parsers)
	for i := range tallies {
		tallies[i] = newTally(st, loc)
		tallies[i].tallies = parsers
	}
	if opts.KeepTrip != nil {
		visit := tripVisitor(st, loc, opts.KeepTrip)
		for _, t := range tallies {
			t.visit = visit
		}
	}
	sources, err := ingestFiles(ctx, st, files, tallies, progress)
	if err != nil {
		return err
	}
	if st.seen.err != nil {
		return st.seen.err
	}
	st.seen = nil // the duplicate check is over: its tables go before the edges come

	regionsJSON, err := storeRegionsJSON(regions)
	if err != nil {
		return err
	}
	if err := ctx.Err(); err != nil {
		return err
	}
	return finishStore(ctx, st, loc, tallies, regionsJSON, regionsSHA256, sources, nil, begin)
}

// storeRegionsJSON encodes the regions a store carries, so that later
// steps need not be given the regions file again.
func storeRegionsJSON(regions *partition.Partition) ([]byte, error) {
	var b bytes.Buffer
	if err := regions.WriteGeoJSON(&b); err != nil {
		return nil, fmt.Errorf("regiongraph: keeping the regions in the store: %v", err)
	}
	return b.Bytes(), nil
}

// finishStore finishes the tallies into the store's edges: the store's
// metadata (the regions and their hash, the time zone, the windows, the
// tallies' quality with prior added when not nil, the sources) goes to
// begin after the yield check and, in strict mode, the time offsets'
// check; the edges then go to the first function begin returns, and the
// second is called at the end.
func finishStore(ctx context.Context, st *settings, loc *locator, tallies []*tally, regionsJSON []byte, regionsSHA256 string, sources []Source, prior *Quality, begin sinkBegin) error {
	var end func() error
	_, err := finish(ctx, st, loc, tallies, func(quality Quality) (func([]Edge) error, error) {
		if prior != nil {
			addQuality(&quality, *prior)
		}
		if err := checkYield(st, quality, sources); err != nil {
			return nil, err
		}
		if st.opts.Strict && quality.OffsetMismatch > 0 {
			return nil, OffsetMismatchError(quality, st.loc.String())
		}
		s := &Store{
			spilled:        st.spill.written(),
			regionsGeoJSON: regionsJSON,
			Meta: Meta{
				RegionsSHA256: regionsSHA256,
				TimeZone:      st.opts.TimeZone,
				Windows:       slices.Clone(st.windows),
				Quality:       quality,
				Sources:       slices.Clone(sources),
			},
		}
		add, e, err := begin(s)
		end = e
		return add, err
	})
	if err != nil {
		return err
	}
	return end()
}

// progressOf returns the function the readers call with the bytes they
// have read, which reports the total so far to report (if not nil).
func progressOf(files []inputFile, report func(done, total int64)) func(n int64) {
	var total, done int64
	for _, f := range files {
		total += f.size
	}
	if report != nil {
		report(0, total)
	}
	return func(n int64) {
		done += n
		if report != nil {
			report(min(done, total), total)
		}
	}
}

// ingestFiles reads the files in order into the tallies and returns them
// as the store's sources.
func ingestFiles(ctx context.Context, st *settings, files []inputFile, tallies []*tally, progress func(int64)) ([]Source, error) {
	rowsRead := func() int64 {
		var n int64
		for _, t := range tallies {
			n += t.read + t.placedRows
		}
		return n
	}
	var sources []Source
	for _, f := range files {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		before := rowsRead()
		sum, err := ingestFile(ctx, st, f, tallies, progress)
		if err != nil {
			return nil, err
		}
		sources = append(sources, Source{Path: f.path, SHA256: sum, Rows: rowsRead() - before})
	}
	return sources, nil
}

// ingestFile reads one file into the tallies by its format and returns its
// SHA-256.
func ingestFile(ctx context.Context, st *settings, f inputFile, tallies []*tally, progress func(int64)) (string, error) {
	if f.format == FormatGPX {
		sum, _, err := ingestGPX(ctx, st, f.path, tallies[0], progress)
		return sum, err
	}
	if isParquet(f.path) {
		if f.format == FormatPoints {
			return "", fmt.Errorf("regiongraph: %s: GPS points are read from CSV; Parquet holds trip tables", f.path)
		}
		return ingestTripParquet(ctx, st, f.path, tallies[0], progress)
	}
	c, err := openCSV(f.path)
	if err != nil {
		return "", err
	}
	defer c.Close()
	if f.format == FormatTrips {
		return ingestTripCSV(ctx, st, c, tallies, progress)
	}
	return ingestPointsCSV(ctx, st, c, tallies[0], progress)
}

// expandInputs resolves formats and expands GPX folders into their .gpx
// files in name order.
func expandInputs(inputs []Input, st *settings) ([]inputFile, error) {
	var files []inputFile
	for _, in := range inputs {
		fi, err := os.Stat(in.Path)
		if err != nil {
			return nil, fmt.Errorf("regiongraph: %w", err)
		}
		format := in.Format
		switch format {
		case FormatAuto, FormatTrips, FormatPoints, FormatGPX:
		default:
			return nil, fmt.Errorf("regiongraph: %s: unknown format %q (want trips, points or gpx)", in.Path, format)
		}
		if fi.IsDir() {
			if format != FormatAuto && format != FormatGPX {
				return nil, fmt.Errorf("regiongraph: %s is a folder; only GPX is read from folders", in.Path)
			}
			entries, err := os.ReadDir(in.Path)
			if err != nil {
				return nil, fmt.Errorf("regiongraph: %w", err)
			}
			var names []string
			for _, e := range entries {
				if !e.IsDir() && strings.EqualFold(filepath.Ext(e.Name()), ".gpx") {
					names = append(names, e.Name())
				}
			}
			slices.Sort(names)
			if len(names) == 0 {
				return nil, fmt.Errorf("regiongraph: %s: no .gpx files in folder", in.Path)
			}
			for _, n := range names {
				p := filepath.Join(in.Path, n)
				gi, err := os.Stat(p)
				if err != nil {
					return nil, fmt.Errorf("regiongraph: %w", err)
				}
				files = append(files, inputFile{path: p, format: FormatGPX, size: gi.Size()})
			}
			continue
		}
		if format == FormatAuto {
			format, err = detectFormat(in.Path, st)
			if err != nil {
				return nil, err
			}
		}
		files = append(files, inputFile{path: in.Path, format: format, size: fi.Size()})
	}
	return files, nil
}

func isParquet(path string) bool {
	if strings.EqualFold(filepath.Ext(path), ".parquet") {
		return true
	}
	f, err := os.Open(path)
	if err != nil {
		return false
	}
	defer f.Close()
	var magic [4]byte
	_, err = io.ReadFull(f, magic[:])
	return err == nil && string(magic[:]) == "PAR1"
}

// detectFormat picks the format of a file given without one.
func detectFormat(path string, st *settings) (Format, error) {
	if strings.EqualFold(filepath.Ext(path), ".gpx") {
		return FormatGPX, nil
	}
	if isParquet(path) {
		return FormatTrips, nil
	}
	f, err := os.Open(path)
	if err != nil {
		return "", fmt.Errorf("regiongraph: %w", err)
	}
	defer f.Close()
	head := make([]byte, 4096)
	n, _ := io.ReadFull(f, head)
	head = head[:n]
	if bytes.HasPrefix(bytes.TrimLeft(head, " \t\r\n\xef\xbb\xbf"), []byte("<?xml")) || bytes.Contains(head, []byte("<gpx")) {
		return FormatGPX, nil
	}
	first, _, _ := bytes.Cut(head, []byte("\n"))
	hasCol := func(name string) bool {
		for _, h := range strings.Split(string(first), ",") {
			if strings.EqualFold(strings.Trim(strings.TrimSpace(h), `"`), name) {
				return true
			}
		}
		return false
	}
	if hasCol(st.column(colVehicleID)) && hasCol(st.column(colTime)) && !hasCol(st.column(colStartTime)) {
		return FormatPoints, nil
	}
	return FormatTrips, nil
}
