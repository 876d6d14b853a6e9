package regiongraph

import (
	"cmp"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"slices"
)

// An engine that aggregates days on several workers writes a dataset in
// parts: each worker writes its days' files into a staging directory
// beside the dataset (WriteDayFile), and one step at the end, which knows
// the quality counts of all shards, adds the manifest and puts the
// dataset in place (FinishDataset). The files are those DatasetWriter
// writes.

// DayFile is a day file written into a staging directory.
type DayFile struct {
	Day   string // YYYY-MM-DD
	Edges int64
	Bytes int64
	// Totals are the day's totals by window (see DayTotal), which the
	// manifest lists; none when nil.
	Totals []DayTotal
}

// NewDatasetStaging creates the staging directory of a dataset to be
// written at dir, beside it (a rename then puts it in place).
func NewDatasetStaging(dir string) (string, error) {
	if dir == "" {
		return "", errors.New("regiongraph: dataset: no directory")
	}
	if err := replaceable(dir); err != nil {
		return "", err
	}
	clean := filepath.Clean(dir)
	tmp, err := os.MkdirTemp(filepath.Dir(clean), "."+filepath.Base(clean)+".tmp-")
	if err != nil {
		return "", fmt.Errorf("regiongraph: dataset: %w", err)
	}
	return tmp, nil
}

// WriteDayFile writes the edges of one day (every window, any order) into
// the staging directory of a dataset with metadata meta (its regions hash
// and time zone go into the file). The file is written beside and renamed
// into place, so that writing a day again (an engine's retry) replaces it
// whole.
func WriteDayFile(staging string, meta Meta, day Day, edges []Edge) (DayFile, error) {
	if len(edges) == 0 {
		return DayFile{}, fmt.Errorf("regiongraph: dataset: day %s has no edges", day)
	}
	tmp, err := os.MkdirTemp(staging, attemptPrefix)
	if err != nil {
		return DayFile{}, fmt.Errorf("regiongraph: dataset: %w", err)
	}
	defer os.RemoveAll(tmp)
	dw := &DatasetWriter{dir: staging, tmp: tmp, meta: meta, pageBytes: datasetPageBytes}
	if err := dw.WriteDay(day, edges); err != nil {
		return DayFile{}, err
	}
	name := filepath.FromSlash(dayFileName(day.String()))
	final := filepath.Join(staging, name)
	if err := os.MkdirAll(filepath.Dir(final), 0o755); err != nil {
		return DayFile{}, fmt.Errorf("regiongraph: dataset: %w", err)
	}
	if err := os.Rename(filepath.Join(tmp, name), final); err != nil {
		return DayFile{}, fmt.Errorf("regiongraph: dataset: %w", err)
	}
	d := dw.days[0]
	return DayFile{Day: d.Day, Edges: d.Edges, Bytes: d.Bytes, Totals: totalsOf(meta.Windows, edges)}, nil
}

// attemptPrefix begins the folders WriteDayFile writes a day in before
// renaming it into the staging directory.
const attemptPrefix = ".day-"

// FinishDataset writes the regions and the manifest of the day files
// into staging and puts it in place of the dataset at dir, as
// DatasetWriter.Close does.
func FinishDataset(staging, dir string, meta Meta, regionsGeoJSON []byte, days []DayFile) error {
	days = slices.Clone(days)
	slices.SortFunc(days, func(a, b DayFile) int { return cmp.Compare(a.Day, b.Day) })
	// Left by day writers that were stopped half-way.
	if left, err := filepath.Glob(filepath.Join(staging, attemptPrefix+"*")); err == nil {
		for _, l := range left {
			os.RemoveAll(l)
		}
	}
	dw := &DatasetWriter{dir: filepath.Clean(dir), tmp: staging, meta: meta, regions: regionsGeoJSON, pageBytes: datasetPageBytes}
	for i, d := range days {
		if i > 0 && d.Day == days[i-1].Day {
			return fmt.Errorf("regiongraph: dataset %s: day %s written twice", dir, d.Day)
		}
		dw.days = append(dw.days, dayJSON{Day: d.Day, File: dayFileName(d.Day), Edges: d.Edges, Bytes: d.Bytes,
			Totals: totalsJSON(meta.Windows, d.Totals, false)})
		dw.written.Edges += int(d.Edges)
		dw.written.Days++
	}
	return dw.Close()
}

// RegionsGeoJSON returns the regions the store carries as GeoJSON (as
// partition.WriteGeoJSON writes them), or nil.
func (s *Store) RegionsGeoJSON() []byte { return s.regionsGeoJSON }
