package main

import (
	"errors"
	"fmt"
	"path/filepath"
	"strings"
)

// checkPlaces keeps a study file's outputs inside its folder: studies are
// shared and re-run, and a received file must not create or replace files
// elsewhere. name is a plain file stem; output is a relative folder that
// stays inside the study's folder. (A folder given with run --output on
// the command line may be anywhere.)
func (s *study) checkPlaces() error {
	switch {
	case s.Name == "." || s.Name == ".." || strings.ContainsAny(s.Name, `/\`) || filepath.Base(s.Name) != s.Name:
		return fmt.Errorf("name %q: give a plain file name stem, without folders", terminalText(s.Name))
	case strings.ContainsFunc(s.Name, isControl):
		return fmt.Errorf("name %q holds control characters", terminalText(s.Name))
	case filepath.IsAbs(s.Output) || strings.HasPrefix(s.Output, `\`) || filepath.VolumeName(s.Output) != "":
		return fmt.Errorf("output %q: give a folder relative to the study file (or pass run --output on the command line)", terminalText(s.Output))
	case !filepath.IsLocal(s.Output):
		return fmt.Errorf("output %q leaves the study's folder: give a folder inside it (or pass run --output on the command line)", terminalText(s.Output))
	case strings.ContainsFunc(s.Output, isControl):
		return errors.New("output holds control characters")
	}
	return nil
}

// findingsPath is where a study that scans one period writes its findings.
func (r *studyRun) findingsPath() string { return filepath.Join(r.out, r.Name+"-findings.json") }

// claimOutputs records the study's inputs and claims every output before
// any work (see runFiles.claim).
func (r *studyRun) claimOutputs(files *runFiles) error {
	files.read(r.file, r.rel(r.Regions.OSM))
	if spec, err := parseScheme(r.Scheme); err == nil && spec.extract != "" {
		files.read(r.rel(spec.extract))
	}
	for _, t := range r.Trips.Files {
		files.read(r.rel(t))
	}
	outs := []output{
		{filepath.Join(r.steps, "partition.geojson"), kindRegions},
		{filepath.Join(r.steps, "graphs.parquet"), kindStore},
	}
	if r.Compare.Before.from == "" && r.Compare.After.from == "" {
		outs = append(outs, output{r.findingsPath(), kindFindings})
	}
	outs = append(outs, reportOutputs(r.out, r.Name)...)
	if r.appraise {
		outs = append(outs, candidatesOutput(r.out, r.Name))
	}
	return files.claimAll(outs)
}
