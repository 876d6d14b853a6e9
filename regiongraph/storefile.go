package regiongraph

import (
	"bytes"
	"cmp"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"

	"github.com/parquet-go/parquet-go"

	"narrows/partition"
)

// SchemaVersion is the version of the store's Parquet layout (SCHEMA.md).
const SchemaVersion = 1

// File metadata keys of the store.
const (
	metaSchemaVersion = "schema_version"
	metaRegions       = "regions_sha256"
	metaTimeZone      = "time_zone"
	metaWindows       = "windows"
	metaQuality       = "quality"
	metaSources       = "sources"
	metaRegionsJSON   = "regions_geojson"
)

// edgeRow is the Parquet row of an Edge; see SCHEMA.md.
type edgeRow struct {
	Day            string  `parquet:"day"`
	Window         string  `parquet:"window"`
	FromRegion     int32   `parquet:"from_region"`
	ToRegion       int32   `parquet:"to_region"`
	Trips          int64   `parquet:"trips"`
	SpeedP25       float64 `parquet:"speed_p25_mps"`
	SpeedMedian    float64 `parquet:"speed_median_mps"`
	SpeedP75       float64 `parquet:"speed_p75_mps"`
	DetourP25      float64 `parquet:"detour_p25"`
	DetourMedian   float64 `parquet:"detour_median"`
	DetourP75      float64 `parquet:"detour_p75"`
	DistanceMedian float64 `parquet:"distance_median_m"`
	DurationMedian float64 `parquet:"duration_median_s"`
	DistanceSum    float64 `parquet:"distance_sum_m"`
	StraightSum    float64 `parquet:"straight_sum_m"`
	DurationSum    float64 `parquet:"duration_sum_s"`
}

type windowJSON struct {
	Name  string `json:"name"`
	Start string `json:"start"` // HH:MM
	End   string `json:"end"`   // HH:MM, 24:00 allowed
}

type qualityJSON struct {
	Read     int64            `json:"read"`
	Used     int64            `json:"used"`
	Rejected map[string]int64 `json:"rejected"`
}

type sourceJSON struct {
	Path   string `json:"path"`
	SHA256 string `json:"sha256"`
	Rows   int64  `json:"rows"`
}

func clock(m int) string { return fmt.Sprintf("%02d:%02d", m/60, m%60) }

// WriteFile writes the store to a Parquet file at path: to a temporary file
// in the same folder first, renamed into place when complete.
func WriteFile(path string, s *Store) error {
	if s == nil {
		return errors.New("regiongraph: write: nil store")
	}
	windows := make([]windowJSON, len(s.Meta.Windows))
	for i, w := range s.Meta.Windows {
		windows[i] = windowJSON{Name: w.Name, Start: clock(w.StartMinute), End: clock(w.EndMinute)}
	}
	rejected := make(map[string]int64)
	for _, r := range RejectReasons() {
		rejected[r] = 0
	}
	for r, n := range s.Meta.Quality.Rejected {
		rejected[r] = n
	}
	sources := make([]sourceJSON, len(s.Meta.Sources))
	for i, src := range s.Meta.Sources {
		sources[i] = sourceJSON{Path: src.Path, SHA256: src.SHA256, Rows: src.Rows}
	}
	meta := []struct {
		key string
		v   any
	}{
		{metaWindows, windows},
		{metaQuality, qualityJSON{Read: s.Meta.Quality.Read, Used: s.Meta.Quality.Used, Rejected: rejected}},
		{metaSources, sources},
	}
	opts := []parquet.WriterOption{
		parquet.Compression(&parquet.Zstd),
		parquet.KeyValueMetadata(metaSchemaVersion, strconv.Itoa(SchemaVersion)),
		parquet.KeyValueMetadata(metaRegions, s.Meta.RegionsSHA256),
		parquet.KeyValueMetadata(metaTimeZone, s.Meta.TimeZone),
	}
	if len(s.regionsGeoJSON) > 0 {
		opts = append(opts, parquet.KeyValueMetadata(metaRegionsJSON, string(s.regionsGeoJSON)))
	}
	for _, m := range meta {
		b, err := json.Marshal(m.v)
		if err != nil {
			return fmt.Errorf("regiongraph: write %s: %v", path, err)
		}
		opts = append(opts, parquet.KeyValueMetadata(m.key, string(b)))
	}

	rows := make([]edgeRow, len(s.Edges))
	for i, e := range s.Edges {
		if e.From < math.MinInt32 || e.From > math.MaxInt32 || e.To < math.MinInt32 || e.To > math.MaxInt32 {
			return fmt.Errorf("regiongraph: write %s: region id out of int32 range in edge %d", path, i)
		}
		rows[i] = edgeRow{Day: e.Day, Window: e.Window, FromRegion: int32(e.From), ToRegion: int32(e.To),
			Trips: int64(e.Trips), SpeedP25: e.SpeedP25, SpeedMedian: e.SpeedMedian, SpeedP75: e.SpeedP75,
			DetourP25: e.DetourP25, DetourMedian: e.DetourMedian, DetourP75: e.DetourP75,
			DistanceMedian: e.DistanceMedian, DurationMedian: e.DurationMedian,
			DistanceSum: e.DistanceSum, StraightSum: e.StraightSum, DurationSum: e.DurationSum}
	}

	tmp, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".*.tmp")
	if err != nil {
		return fmt.Errorf("regiongraph: write %s: %w", path, err)
	}
	ok := false
	defer func() {
		if !ok {
			tmp.Close()
			os.Remove(tmp.Name())
		}
	}()
	w := parquet.NewGenericWriter[edgeRow](tmp, opts...)
	if _, err := w.Write(rows); err != nil {
		return fmt.Errorf("regiongraph: write %s: %w", path, err)
	}
	if err := w.Close(); err != nil {
		return fmt.Errorf("regiongraph: write %s: %w", path, err)
	}
	if err := tmp.Sync(); err != nil {
		return fmt.Errorf("regiongraph: write %s: %w", path, err)
	}
	if err := tmp.Close(); err != nil {
		return fmt.Errorf("regiongraph: write %s: %w", path, err)
	}
	if err := os.Chmod(tmp.Name(), 0o644); err != nil {
		return fmt.Errorf("regiongraph: write %s: %w", path, err)
	}
	if err := os.Rename(tmp.Name(), path); err != nil {
		return fmt.Errorf("regiongraph: write %s: %w", path, err)
	}
	ok = true
	return nil
}

// storeColumns are the columns ReadFile requires.
var storeColumns = []string{"day", "window", "from_region", "to_region", "trips",
	"speed_p25_mps", "speed_median_mps", "speed_p75_mps", "detour_p25", "detour_median", "detour_p75",
	"distance_median_m", "duration_median_s", "distance_sum_m", "straight_sum_m", "duration_sum_s"}

// ReadOptions selects what ReadFileOptions keeps of a store.
type ReadOptions struct {
	// MinTrips drops edges with fewer trips while reading (0 keeps all).
	// A city's store holds mostly pairs with a trip or two a day; an
	// analysis that ignores pairs under its own minimum need not hold them
	// in memory.
	MinTrips int
}

// ReadFile reads a store written by WriteFile, every edge.
func ReadFile(path string) (*Store, error) { return ReadFileOptions(path, ReadOptions{}) }

// ReadFileOptions reads a store written by WriteFile, keeping the edges
// that opts selects. The quality accounting and metadata are the file's
// whatever is dropped.
func ReadFileOptions(path string, opts ReadOptions) (*Store, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("regiongraph: %w", err)
	}
	defer f.Close()
	fi, err := f.Stat()
	if err != nil {
		return nil, fmt.Errorf("regiongraph: %w", err)
	}
	pf, err := parquet.OpenFile(f, fi.Size())
	if err != nil {
		return nil, fmt.Errorf("regiongraph: %s: not a Parquet day-graph store: %v", path, err)
	}
	version, ok := pf.Lookup(metaSchemaVersion)
	if !ok {
		return nil, fmt.Errorf("regiongraph: %s: no %s metadata: not a day-graph store", path, metaSchemaVersion)
	}
	if v, err := strconv.Atoi(version); err != nil || v != SchemaVersion {
		return nil, fmt.Errorf("regiongraph: %s: store schema version %q, this build reads %d", path, version, SchemaVersion)
	}
	for _, c := range storeColumns {
		if _, ok := pf.Schema().Lookup(c); !ok {
			return nil, fmt.Errorf("regiongraph: %s: store has no column %q", path, c)
		}
	}
	s := &Store{}
	s.Meta.RegionsSHA256, _ = pf.Lookup(metaRegions)
	s.Meta.TimeZone, _ = pf.Lookup(metaTimeZone)
	if text, ok := pf.Lookup(metaRegionsJSON); ok {
		s.regionsGeoJSON = []byte(text)
	}
	var windows []windowJSON
	var quality qualityJSON
	var sources []sourceJSON
	for _, m := range []struct {
		key string
		v   any
	}{{metaWindows, &windows}, {metaQuality, &quality}, {metaSources, &sources}} {
		text, ok := pf.Lookup(m.key)
		if !ok {
			return nil, fmt.Errorf("regiongraph: %s: no %s metadata", path, m.key)
		}
		if err := json.Unmarshal([]byte(text), m.v); err != nil {
			return nil, fmt.Errorf("regiongraph: %s: %s metadata: %v", path, m.key, err)
		}
	}
	for _, w := range windows {
		pw, err := ParseWindow(w.Name + "=" + w.Start + "-" + w.End)
		if err != nil {
			return nil, fmt.Errorf("regiongraph: %s: windows metadata: %v", path, err)
		}
		s.Meta.Windows = append(s.Meta.Windows, pw)
	}
	s.Meta.Quality = Quality{Read: quality.Read, Used: quality.Used, Rejected: quality.Rejected}
	if s.Meta.Quality.Rejected == nil {
		s.Meta.Quality.Rejected = make(map[string]int64)
	}
	for _, src := range sources {
		s.Meta.Sources = append(s.Meta.Sources, Source{Path: src.Path, SHA256: src.SHA256, Rows: src.Rows})
	}

	// Rows are read in batches into one buffer, and the day and window
	// strings, repeated on every row, are shared: a city's year of day
	// graphs holds tens of millions of rows.
	r := parquet.NewGenericReader[edgeRow](pf)
	defer r.Close()
	const batch = 1 << 14
	rows := make([]edgeRow, batch)
	shared := map[string]string{}
	intern := func(v string) string {
		if c, ok := shared[v]; ok {
			return c
		}
		shared[v] = v
		return v
	}
	var read int64
	for {
		n, err := r.Read(rows)
		read += int64(n)
		for _, e := range rows[:n] {
			if int(e.Trips) < opts.MinTrips {
				continue
			}
			s.Edges = append(s.Edges, Edge{Day: intern(e.Day), Window: intern(e.Window), From: int(e.FromRegion), To: int(e.ToRegion),
				Trips: int(e.Trips), SpeedP25: e.SpeedP25, SpeedMedian: e.SpeedMedian, SpeedP75: e.SpeedP75,
				DetourP25: e.DetourP25, DetourMedian: e.DetourMedian, DetourP75: e.DetourP75,
				DistanceMedian: e.DistanceMedian, DurationMedian: e.DurationMedian,
				DistanceSum: e.DistanceSum, StraightSum: e.StraightSum, DurationSum: e.DurationSum})
		}
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			return nil, fmt.Errorf("regiongraph: %s: %v", path, err)
		}
		if n == 0 {
			break
		}
	}
	if read != pf.NumRows() {
		return nil, fmt.Errorf("regiongraph: %s: read %d of %d rows", path, read, pf.NumRows())
	}
	if !slices.IsSortedFunc(s.Edges, compareEdges) {
		slices.SortStableFunc(s.Edges, compareEdges)
	}
	return s, nil
}

// compareEdges orders edges by day, window name, from, to.
func compareEdges(a, b Edge) int {
	if c := cmp.Compare(a.Day, b.Day); c != 0 {
		return c
	}
	if c := cmp.Compare(a.Window, b.Window); c != 0 {
		return c
	}
	if c := cmp.Compare(a.From, b.From); c != 0 {
		return c
	}
	return cmp.Compare(a.To, b.To)
}

// Regions returns the regions the store was built on, kept in the store by
// Ingest (and in the file by WriteFile) so that later steps need not be
// given the regions file again.
func (s *Store) Regions() (*partition.Partition, error) {
	if len(s.regionsGeoJSON) == 0 {
		return nil, errors.New("regiongraph: the store carries no regions; give the regions file it was built on")
	}
	p, err := partition.ReadGeoJSON(bytes.NewReader(s.regionsGeoJSON), "regions in the day-graph store")
	if err != nil {
		return nil, fmt.Errorf("regiongraph: %w", err)
	}
	return p, nil
}

// Days returns the local days that have at least one edge in the named
// window, in ascending order.
func (s *Store) Days(window string) []string {
	var days []string
	for _, e := range s.Edges {
		if e.Window == window && (len(days) == 0 || days[len(days)-1] != e.Day) {
			days = append(days, e.Day)
		}
	}
	slices.Sort(days)
	return slices.Compact(days)
}

// WindowNames returns the names of the store's windows in the order given
// at ingest.
func (s *Store) WindowNames() []string {
	names := make([]string, len(s.Meta.Windows))
	for i, w := range s.Meta.Windows {
		names[i] = w.Name
	}
	return names
}

// Merge combines stores of separate ingests over the same regions (for
// example January, then February) into a new store. The stores must share
// the regions hash, time zone and windows. A local day may be in only one
// store per window: the quantiles of a day split across two ingests cannot be
// combined exactly, so a (day, window) found in two stores is an error
// naming it. Quality counts add up and sources are concatenated in order.
// The inputs are not modified.
func Merge(stores ...*Store) (*Store, error) {
	if len(stores) == 0 {
		return nil, errors.New("regiongraph: merge: no stores")
	}
	first := stores[0]
	out := &Store{Meta: Meta{
		RegionsSHA256: first.Meta.RegionsSHA256,
		TimeZone:      first.Meta.TimeZone,
		Windows:       slices.Clone(first.Meta.Windows),
		Quality:       Quality{Rejected: make(map[string]int64)},
	}}
	type dayWindow struct{ day, window string }
	owner := make(map[dayWindow]int)
	for i, s := range stores {
		if s == nil {
			return nil, fmt.Errorf("regiongraph: merge: store %d is nil", i+1)
		}
		if s.Meta.RegionsSHA256 != first.Meta.RegionsSHA256 {
			return nil, fmt.Errorf("regiongraph: merge: store %d was built on other regions (sha256 %s, store 1 has %s)",
				i+1, s.Meta.RegionsSHA256, first.Meta.RegionsSHA256)
		}
		if s.Meta.TimeZone != first.Meta.TimeZone {
			return nil, fmt.Errorf("regiongraph: merge: store %d has time zone %q, store 1 has %q", i+1, s.Meta.TimeZone, first.Meta.TimeZone)
		}
		if !slices.Equal(s.Meta.Windows, first.Meta.Windows) {
			return nil, fmt.Errorf("regiongraph: merge: store %d has windows %v, store 1 has %v", i+1, s.Meta.Windows, first.Meta.Windows)
		}
		seen := make(map[dayWindow]bool)
		for _, e := range s.Edges {
			k := dayWindow{e.Day, e.Window}
			if seen[k] {
				continue
			}
			seen[k] = true
			if j, dup := owner[k]; dup {
				return nil, fmt.Errorf("regiongraph: merge: day %s (window %s) is in both store %d and store %d; ingest a day's trips together", e.Day, e.Window, j+1, i+1)
			}
			owner[k] = i
		}
		out.Edges = append(out.Edges, s.Edges...)
		out.Meta.Quality.Read += s.Meta.Quality.Read
		out.Meta.Quality.Used += s.Meta.Quality.Used
		for r, n := range s.Meta.Quality.Rejected {
			out.Meta.Quality.Rejected[r] += n
		}
		out.Meta.Sources = append(out.Meta.Sources, s.Meta.Sources...)
		if len(out.regionsGeoJSON) == 0 {
			out.regionsGeoJSON = s.regionsGeoJSON
		}
	}
	slices.SortStableFunc(out.Edges, compareEdges)
	return out, nil
}
