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
// and time zone go into the file). A day file already there is an error:
// each day is written once.
func WriteDayFile(staging string, meta Meta, day string, edges []Edge) (DayFile, error) {
	if len(edges) == 0 {
		return DayFile{}, fmt.Errorf("regiongraph: dataset: day %s has no edges", day)
	}
	dw := &DatasetWriter{dir: staging, tmp: staging, meta: meta, pageBytes: datasetPageBytes}
	if err := dw.WriteDay(day, edges); err != nil {
		return DayFile{}, err
	}
	d := dw.days[0]
	return DayFile{Day: d.Day, Edges: d.Edges, Bytes: d.Bytes}, nil
}

// FinishDataset writes the regions and the manifest of the day files
// into staging and puts it in place of the dataset at dir, as
// DatasetWriter.Close does.
func FinishDataset(staging, dir string, meta Meta, regionsGeoJSON []byte, days []DayFile) error {
	days = slices.Clone(days)
	slices.SortFunc(days, func(a, b DayFile) int { return cmp.Compare(a.Day, b.Day) })
	dw := &DatasetWriter{dir: filepath.Clean(dir), tmp: staging, meta: meta, regions: regionsGeoJSON, pageBytes: datasetPageBytes}
	for i, d := range days {
		if i > 0 && d.Day == days[i-1].Day {
			return fmt.Errorf("regiongraph: dataset %s: day %s written twice", dir, d.Day)
		}
		dw.days = append(dw.days, dayJSON{Day: d.Day, File: dayFileName(d.Day), Edges: d.Edges, Bytes: d.Bytes})
		dw.written.Edges += int(d.Edges)
		dw.written.Days++
	}
	return dw.Close()
}

// RegionsGeoJSON returns the regions the store carries as GeoJSON (as
// partition.WriteGeoJSON writes them), or nil.
func (s *Store) RegionsGeoJSON() []byte { return s.regionsGeoJSON }
