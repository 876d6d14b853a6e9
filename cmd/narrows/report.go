package main

import (
	"bytes"
	"fmt"
	"io"
	"path/filepath"
	"sync"

	"narrows/report"
)

// reportOutputs are the files of a report named from base in dir: the
// workbook base.xlsx, the map layers base-regions.geojson and
// base-findings.geojson, and the page base.html, in the order written.
func reportOutputs(dir, base string) []output {
	p := filepath.Join(dir, base)
	return []output{
		{p + ".xlsx", kindWorkbook},
		{p + "-regions.geojson", kindRegionsLayer},
		{p + "-findings.geojson", kindFindingsLayer},
		{p + ".html", kindPage},
	}
}

// writeReportFiles writes the files of reportOutputs(dir, base) and returns
// their paths. All four are rendered in memory first, so a failure leaves
// no report half-written: either none of them is replaced or, barring a
// failing disk, all are.
func writeReportFiles(files *runFiles, dir, base string, in report.Input) ([]string, error) {
	if base == "" || base != filepath.Base(base) || base == "." || base == ".." {
		return nil, fmt.Errorf("report: base name %q must be a plain file name", base)
	}
	writers := []func(io.Writer, report.Input) error{report.WriteWorkbook, report.WriteRegionsGeoJSON, report.WriteFindingsGeoJSON, report.WriteHTML}
	outs := reportOutputs(dir, base)
	// A Daily sheet too long for the workbook goes to a CSV beside it,
	// written first, so that the workbook never names a CSV not there.
	in.DailyCSVName = base + "-daily.csv"
	if over, err := report.DailyOverflows(in); err != nil {
		return nil, err
	} else if over {
		outs = append([]output{{filepath.Join(dir, in.DailyCSVName), kindDaily}}, outs...)
		writers = append([]func(io.Writer, report.Input) error{report.WriteDailyCSV}, writers...)
	}
	if in.Appraisal != nil {
		outs = append(outs, candidatesOutput(dir, base))
		writers = append(writers, report.WriteCandidatesGeoJSON)
	}
	outputs := make([]struct {
		output
		write func(io.Writer, report.Input) error
	}, len(outs))
	for i := range outs {
		outputs[i].output, outputs[i].write = outs[i], writers[i]
	}
	// The outputs are rendered at once (the workbook takes longest); the
	// first error in the order of the outputs is returned.
	rendered := make([]bytes.Buffer, len(outputs))
	errs := make([]error, len(outputs))
	var wg sync.WaitGroup
	for i, o := range outputs {
		wg.Go(func() { errs[i] = o.write(&rendered[i], in) })
	}
	wg.Wait()
	for _, err := range errs {
		if err != nil {
			return nil, err
		}
	}
	paths := make([]string, 0, len(outputs))
	for i, o := range outputs {
		p := o.path
		if err := files.write(p, o.kind, func(w io.Writer) error {
			_, err := rendered[i].WriteTo(w)
			return err
		}); err != nil {
			return nil, err
		}
		paths = append(paths, p)
	}
	return paths, nil
}
