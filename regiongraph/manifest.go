package regiongraph

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"time"
)

// manifest is manifest.json of a dataset (SCHEMA.md): the store's
// metadata, as the single-file layout keeps it in the file's key-value
// metadata, and the list of day files.
type manifest struct {
	Format        string       `json:"format"`
	SchemaVersion int          `json:"schema_version"`
	RegionsSHA256 string       `json:"regions_sha256"`
	TimeZone      string       `json:"time_zone"`
	Windows       []windowJSON `json:"windows"`
	Quality       qualityJSON  `json:"quality"`
	Sources       []sourceJSON `json:"sources"`
	// Regions is the file in the dataset holding the regions as GeoJSON,
	// of RegionsBytes bytes; empty when the store carries none.
	Regions      string    `json:"regions,omitempty"`
	RegionsBytes int64     `json:"regions_bytes,omitempty"`
	Days         []dayJSON `json:"days"`

	// totals are the days' totals, checked, when every day records them
	// (totalsRecorded); parseManifest sets them.
	totals         []DayTotal
	totalsRecorded bool
}

// dayJSON is one day of the manifest: its file in the dataset, the rows
// (edges) it holds, its size in bytes and its totals by window (see
// DayTotal; none in a dataset written before them).
type dayJSON struct {
	Day    string      `json:"day"`
	File   string      `json:"file"`
	Edges  int64       `json:"edges"`
	Bytes  int64       `json:"bytes"`
	Totals []totalJSON `json:"totals,omitempty"`
}

// maxManifestBytes bounds the manifest read: a year's manifest is some
// tens of kilobytes.
const maxManifestBytes = 64 << 20

// windowsJSON returns the windows as the metadata writes them.
func windowsJSON(ws []Window) ([]windowJSON, error) {
	out := make([]windowJSON, len(ws))
	for i, w := range ws {
		out[i] = windowJSON{Name: w.Name, Start: clock(w.StartMinute), End: clock(w.EndMinute)}
		if _, err := ParseWindow(out[i].Name + "=" + out[i].Start + "-" + out[i].End); err != nil {
			return nil, fmt.Errorf("window %d: %v", i+1, err)
		}
	}
	return out, nil
}

// qualityOf returns the quality as the metadata writes it, every reason
// present.
func qualityOf(q Quality) qualityJSON {
	rejected := make(map[string]int64)
	for _, r := range RejectReasons() {
		rejected[string(r)] = 0
	}
	for r, n := range q.Rejected {
		rejected[r] = n
	}
	return qualityJSON{Read: q.Read, Used: q.Used, Rejected: rejected, OffsetTimes: q.OffsetTimes, OffsetMismatch: q.OffsetMismatch}
}

func sourcesOf(srcs []Source) []sourceJSON {
	out := make([]sourceJSON, len(srcs))
	for i, s := range srcs {
		out[i] = sourceJSON{Path: s.Path, SHA256: s.SHA256, Rows: s.Rows}
	}
	return out
}

func newManifest(meta Meta, days []dayJSON) (*manifest, error) {
	windows, err := windowsJSON(meta.Windows)
	if err != nil {
		return nil, err
	}
	if days == nil {
		days = []dayJSON{}
	}
	return &manifest{
		Format:        datasetFormat,
		SchemaVersion: schemaVersion,
		RegionsSHA256: meta.RegionsSHA256,
		TimeZone:      meta.TimeZone,
		Windows:       windows,
		Quality:       qualityOf(meta.Quality),
		Sources:       sourcesOf(meta.Sources),
		Days:          days,
	}, nil
}

// parseManifest decodes and checks a manifest read from path. The day
// files' names are the fixed names of their days, so that a manifest
// cannot point outside its dataset.
func parseManifest(path string, data []byte) (*manifest, Meta, error) {
	var m manifest
	bad := func(format string, args ...any) (*manifest, Meta, error) {
		return nil, Meta{}, fmt.Errorf("regiongraph: %s: %s", path, fmt.Sprintf(format, args...))
	}
	dec := json.NewDecoder(bytes.NewReader(data))
	if err := dec.Decode(&m); err != nil {
		return bad("not a dataset manifest: %v", err)
	}
	if _, err := dec.Token(); !errors.Is(err, io.EOF) {
		return bad("not a dataset manifest: text after the JSON object")
	}
	if m.Format != datasetFormat {
		return bad("format %q, want %q", m.Format, datasetFormat)
	}
	if m.SchemaVersion != schemaVersion {
		return bad("schema version %d, this build reads %d", m.SchemaVersion, schemaVersion)
	}
	if m.Regions != "" && m.Regions != datasetRegionsName {
		return bad("regions file %q, want %q", m.Regions, datasetRegionsName)
	}
	if m.RegionsBytes < 0 || m.RegionsBytes > 1<<40 {
		return bad("regions of %d bytes", m.RegionsBytes)
	}
	var meta Meta
	meta.RegionsSHA256, meta.TimeZone = m.RegionsSHA256, m.TimeZone
	for i, w := range m.Windows {
		pw, err := ParseWindow(w.Name + "=" + w.Start + "-" + w.End)
		if err != nil {
			return bad("window %d: %v", i+1, err)
		}
		meta.Windows = append(meta.Windows, pw)
	}
	if err := checkWindowCount(meta.Windows); err != nil {
		return bad("%v", err)
	}
	q := m.Quality
	meta.Quality = Quality{Read: q.Read, Used: q.Used, Rejected: q.Rejected, OffsetTimes: q.OffsetTimes, OffsetMismatch: q.OffsetMismatch}
	if meta.Quality.Rejected == nil {
		meta.Quality.Rejected = make(map[string]int64)
	}
	for _, src := range m.Sources {
		meta.Sources = append(meta.Sources, Source{Path: src.Path, SHA256: src.SHA256, Rows: src.Rows})
	}
	for i, d := range m.Days {
		if _, err := time.Parse(time.DateOnly, d.Day); err != nil || len(d.Day) != len(time.DateOnly) {
			return bad("day %d: %q is not YYYY-MM-DD", i+1, d.Day)
		}
		if i > 0 && d.Day <= m.Days[i-1].Day {
			return bad("day %s listed after %s; days must be ascending and distinct", d.Day, m.Days[i-1].Day)
		}
		if d.File != dayFileName(d.Day) {
			return bad("day %s: file %q, want %q", d.Day, d.File, dayFileName(d.Day))
		}
		if d.Edges < 1 || d.Edges > math.MaxInt32 || d.Bytes < 12 {
			return bad("day %s: %d edges in %d bytes", d.Day, d.Edges, d.Bytes)
		}
	}
	if err := m.parseTotals(&meta); err != nil {
		return bad("%v", err)
	}
	return &m, meta, nil
}

// parseTotals checks the days' totals, when every day records them, and
// sets m.totals: each day's add up to its edges.
func (m *manifest) parseTotals(meta *Meta) error {
	var all []totalJSON
	for _, d := range m.Days {
		if len(d.Totals) == 0 {
			return nil // written before day totals, or by a writer without them
		}
		var edges int64
		for _, t := range d.Totals {
			if t.Day != "" && t.Day != d.Day {
				return fmt.Errorf("day %s: a total of day %q", d.Day, t.Day)
			}
			t.Day = d.Day
			all = append(all, t)
			edges += t.Edges
		}
		if edges != d.Edges {
			return fmt.Errorf("day %s: its totals count %d edges, the day %d", d.Day, edges, d.Edges)
		}
	}
	totals, err := parseTotals(meta, all)
	if err != nil {
		return err
	}
	m.totals, m.totalsRecorded = totals, true
	return nil
}
