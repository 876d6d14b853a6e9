package main

import (
	"context"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"time"

	"narrows/patterns"
	"narrows/regiongraph"
)

// finding is one line of check's report.
type finding struct {
	level string // "ok", "warning", "error" or "not checked"
	text  string
}

// runCheck validates a study file and its inputs without running the
// analysis: the file's keys and values, the inputs present and readable,
// the study's periods inside the days of the trips, and the time zone
// against the UTC offsets the times carry. The trips' days are those of
// the rows at the start and end of each CSV file (regiongraph.SampleTimes),
// which for a file in time order are its first and last.
func runCheck(_ context.Context, env *environment, args []string) error {
	fs := newFlagSet(env, "check", "study.toml")
	var file string
	file, err := parseStudyArgs(env, fs, args)
	if err != nil {
		return err
	}
	var out []finding
	s, err := loadStudy(file)
	if err != nil {
		out = append(out, finding{"error", err.Error()})
	} else {
		out = append(out, finding{"ok", "study file " + file + " reads, with known keys and valid values"})
		out = append(out, s.checkInputs(file)...)
	}
	errs := 0
	for _, f := range out {
		fmt.Fprintf(env.stdout, "%-11s %s\n", f.level+":", terminalText(f.text))
		if f.level == "error" {
			errs++
		}
	}
	if errs > 0 {
		return fmt.Errorf("%s: %d of %d checks failed", file, errs, len(out))
	}
	fmt.Fprintln(env.stdout, "the study can run")
	return nil
}

// checkInputs checks the inputs a study names, relative to its folder.
func (s *study) checkInputs(file string) []finding {
	r := &studyRun{study: s, file: file, dir: filepath.Dir(file)}
	var out []finding
	readable := func(what, p string) bool {
		f, err := os.Open(p)
		if err == nil {
			_, err = f.Read(make([]byte, 1))
			f.Close()
		}
		if err != nil && err != io.EOF {
			out = append(out, finding{"error", fmt.Sprintf("%s %s cannot be read: %v", what, p, err)})
			return false
		}
		if err == io.EOF {
			out = append(out, finding{"error", fmt.Sprintf("%s %s is empty", what, p)})
			return false
		}
		out = append(out, finding{"ok", fmt.Sprintf("%s %s is readable", what, p)})
		return true
	}
	readable("extract", r.rel(s.Regions.OSM))
	loc, err := time.LoadLocation(s.Trips.TimeZone)
	if err != nil || s.Trips.TimeZone == "" {
		loc = time.UTC
	}
	var first, last string
	for _, t := range s.Trips.Files {
		p := r.rel(t)
		if !readable("trips", p) {
			continue
		}
		ts, err := regiongraph.SampleTimes(p, s.Trips.Format, s.Trips.Options)
		switch {
		case err != nil:
			out = append(out, finding{"error", err.Error()})
			continue
		case ts.Times == 0 && ts.Unparsed == 0:
			out = append(out, finding{"not checked", fmt.Sprintf("the days and time zone of %s (%s files are not sampled)", p, ts.Format)})
			continue
		case ts.Times == 0:
			out = append(out, finding{"error", fmt.Sprintf("none of the %d times sampled in %s's %s column parses", ts.Unparsed, p, ts.Column)})
			continue
		}
		d1 := time.UnixMilli(ts.FirstMS).In(loc).Format("2006-01-02")
		d2 := time.UnixMilli(ts.LastMS).In(loc).Format("2006-01-02")
		how := "its first and last rows"
		if ts.Whole {
			how = "all its rows"
		}
		out = append(out, finding{"ok", fmt.Sprintf("%s runs from %s to %s (%s, %d times read)", p, d1, d2, how, ts.Times)})
		if first == "" || d1 < first {
			first = d1
		}
		if d2 > last {
			last = d2
		}
		switch {
		case ts.OffsetMismatch > 0:
			out = append(out, finding{"warning", fmt.Sprintf("%s: %d of %d times read carry a UTC offset that is not time zone %s's: days and windows would be cut in the wrong zone (time_zone)",
				p, ts.OffsetMismatch, ts.OffsetTimes, loc)})
		case ts.OffsetTimes > 0:
			out = append(out, finding{"ok", fmt.Sprintf("%s: the UTC offsets of its times agree with time zone %s", p, loc)})
		default:
			out = append(out, finding{"not checked", fmt.Sprintf("%s: its times carry no UTC offset, so time zone %s cannot be checked against them", p, loc)})
		}
	}
	if first == "" {
		return out
	}
	if s.Compare.Before.from != "" {
		before, after, err := s.periods()
		if err == nil {
			err = patterns.CheckPeriodsWithin(first, last, before, after)
		}
		if err != nil {
			out = append(out, finding{"error", err.Error()})
		} else {
			out = append(out, finding{"ok", fmt.Sprintf("before %s and after %s lie inside the trips' days, %s to %s, and do not overlap", s.Compare.Before.String(), s.Compare.After.String(), first, last)})
		}
		out = append(out, finding{"not checked", "the focus against the regions, and the minimum of trips against the pairs (both need the regions step)"})
	} else if from, to := s.Scan.From, s.Scan.To; from != "" || to != "" {
		if from != "" && from < first || to != "" && to > last {
			out = append(out, finding{"error", fmt.Sprintf("the scan period %s..%s reaches outside the trips' days, %s to %s", from, to, first, last)})
		} else {
			out = append(out, finding{"ok", fmt.Sprintf("the scan period lies inside the trips' days, %s to %s", first, last)})
		}
	}
	return out
}
