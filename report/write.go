package report

import (
	"fmt"
	"os"
	"path/filepath"
)

// WriteAll writes the workbook dir/base.xlsx, the map layers
// dir/regions.geojson and dir/findings.geojson, and the page dir/base.html,
// and returns their paths in that order. Every file is rendered before any
// is written, and all are written to temporary names before the first is
// renamed into place, so a failure leaves no half-written output.
func WriteAll(dir, base string, in Input) (paths []string, err error) {
	if base == "" || base != filepath.Base(base) {
		return nil, fmt.Errorf("report: base name %q must be a plain file name", base)
	}
	v, err := newView(in)
	if err != nil {
		return nil, err
	}
	type output struct {
		name   string
		render func() ([]byte, error)
	}
	outputs := []output{
		{base + ".xlsx", v.workbook},
		{"regions.geojson", v.regionsGeoJSON},
		{"findings.geojson", v.findingsGeoJSON},
		{base + ".html", v.html},
	}
	contents := make([][]byte, len(outputs))
	for i, o := range outputs {
		if contents[i], err = o.render(); err != nil {
			return nil, err
		}
	}
	temps := make([]string, 0, len(outputs))
	defer func() {
		if err != nil {
			for _, t := range temps {
				os.Remove(t)
			}
		}
	}()
	for i, o := range outputs {
		t, err := writeTemp(filepath.Join(dir, o.name), contents[i])
		if err != nil {
			return nil, err
		}
		temps = append(temps, t)
	}
	for i, o := range outputs {
		p := filepath.Join(dir, o.name)
		if err := os.Rename(temps[i], p); err != nil {
			return nil, fmt.Errorf("report: %w", err)
		}
		paths = append(paths, p)
	}
	return paths, nil
}

// writeFileAtomic writes data to a temporary file beside path and renames
// it into place.
func writeFileAtomic(path string, data []byte) error {
	t, err := writeTemp(path, data)
	if err != nil {
		return err
	}
	if err := os.Rename(t, path); err != nil {
		os.Remove(t)
		return fmt.Errorf("report: %w", err)
	}
	return nil
}

// writeTemp writes data to a new temporary file in path's directory and
// returns its name; on error nothing is left behind.
func writeTemp(path string, data []byte) (string, error) {
	f, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".tmp-*")
	if err != nil {
		return "", fmt.Errorf("report: writing %s: %w", path, err)
	}
	_, err = f.Write(data)
	if err == nil {
		err = f.Sync()
	}
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	if err == nil {
		err = os.Chmod(f.Name(), 0o644)
	}
	if err != nil {
		os.Remove(f.Name())
		return "", fmt.Errorf("report: writing %s: %w", path, err)
	}
	return f.Name(), nil
}
