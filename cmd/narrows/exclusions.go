package main

import (
	"narrows/patterns"
	"narrows/regiongraph"
)

// applyExclusions checks the study's exclusions against the regions, adds
// the excluded days to the scan's days to leave out and returns the store
// without the excluded pairs and regions. Run and appraise analyse the
// store this returns; explore applies the same patterns.Exclusions itself.
func (s *study) applyExclusions(store *regiongraph.Store, regions int) (*regiongraph.Store, error) {
	x := s.Scan.exclusions()
	if err := x.Validate(regions); err != nil {
		return nil, err
	}
	store, opts, err := x.Apply(store, s.Scan.ScanOptions)
	if err != nil {
		return nil, err
	}
	s.Scan.ScanOptions = opts
	return store, nil
}

// exclusionSettings lists the exclusions with their reasons for the
// report's table of what was analysed.
func exclusionSettings(x patterns.Exclusions) [][2]string {
	var out [][2]string
	for _, d := range x.Days {
		out = append(out, [2]string{"excluded days " + d.String(), d.Reason})
	}
	for _, p := range x.Pairs {
		out = append(out, [2]string{"excluded " + pairLabel(p), p.Reason})
	}
	return out
}

func pairLabel(p patterns.PairExclusion) string {
	if p.B == 0 {
		return p.String() + " (every pair)"
	}
	return "region pair " + p.String() + " (both directions)"
}
