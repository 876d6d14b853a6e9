package main

import (
	"bytes"
	"fmt"
	"io"
	"path/filepath"

	"narrows/cmd/internal/atomicfile"
	"narrows/report"
)

// File names of the map layers written beside a report.
const (
	regionsLayerName  = "regions.geojson"
	findingsLayerName = "findings.geojson"
)

// writeReportFiles writes the workbook dir/base.xlsx, the map layers
// dir/regions.geojson and dir/findings.geojson, and the page dir/base.html,
// in that order, and returns their paths. All four are rendered in memory
// first, so a failure leaves no report half-written: either none of them is
// replaced or, barring a failing disk, all are.
func writeReportFiles(dir, base string, in report.Input) ([]string, error) {
	if base == "" || base != filepath.Base(base) {
		return nil, fmt.Errorf("report: base name %q must be a plain file name", base)
	}
	outputs := []struct {
		name  string
		write func(io.Writer, report.Input) error
	}{
		{base + ".xlsx", report.WriteWorkbook},
		{regionsLayerName, report.WriteRegionsGeoJSON},
		{findingsLayerName, report.WriteFindingsGeoJSON},
		{base + ".html", report.WriteHTML},
	}
	rendered := make([]bytes.Buffer, len(outputs))
	for i, o := range outputs {
		if err := o.write(&rendered[i], in); err != nil {
			return nil, err
		}
	}
	paths := make([]string, 0, len(outputs))
	for i, o := range outputs {
		p := filepath.Join(dir, o.name)
		if err := atomicfile.Write(p, func(w io.Writer) error {
			_, err := rendered[i].WriteTo(w)
			return err
		}); err != nil {
			return nil, err
		}
		paths = append(paths, p)
	}
	return paths, nil
}
