package regiongraph

import (
	"errors"
	"fmt"
	"io"
	"os"
)

// ReadDayRange returns the first and last day of the store at path, over
// every edge, reading only the day column (of a dataset, only the
// manifest). A reader that keeps only some
// edges (ReadOptions.MinTrips) does not see the days whose edges it drops;
// checks of a period against the data need the days of the whole file.
func ReadDayRange(path string) (first, last string, err error) {
	if IsDataset(path) {
		return datasetDayRange(path)
	}
	f, err := os.Open(path)
	if err != nil {
		return "", "", fmt.Errorf("regiongraph: %w", err)
	}
	defer f.Close()
	fi, err := f.Stat()
	if err != nil {
		return "", "", fmt.Errorf("regiongraph: %w", err)
	}
	pf, err := openParquetChecked(f, fi.Size())
	if err != nil {
		return "", "", fmt.Errorf("regiongraph: %s: not a Parquet day-graph store: %v", path, err)
	}
	leaf, err := storeLeaves(path, pf)
	if err != nil {
		return "", "", err
	}
	defer func() {
		// The footer was checked; a page the library cannot decode must
		// still be an error, not a crash.
		if r := recover(); r != nil {
			first, last, err = "", "", fmt.Errorf("regiongraph: %s: day column: %v", path, r)
		}
	}()
	for g, rg := range pf.RowGroups() {
		pages := rg.ColumnChunks()[leaf[storeDay]].Pages()
		for {
			p, err := pages.ReadPage()
			if errors.Is(err, io.EOF) {
				break
			}
			if err != nil {
				pages.Close()
				return "", "", fmt.Errorf("regiongraph: %s: row group %d, day column: %v", path, g, err)
			}
			lo, hi, ok := p.Bounds()
			if ok {
				if d := string(lo.ByteArray()); first == "" || d < first {
					first = d
				}
				if d := string(hi.ByteArray()); d > last {
					last = d
				}
			}
		}
		pages.Close()
	}
	return first, last, nil
}
