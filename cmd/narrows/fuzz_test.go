package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"narrows/patterns"
)

// FuzzLoadStudy: any study file either loads or gives an error naming the
// file; none panics.
func FuzzLoadStudy(f *testing.F) {
	example, err := os.ReadFile(filepath.Join("..", "..", "testdata", "study.toml"))
	if err != nil {
		f.Fatal(err)
	}
	f.Add(string(example))
	f.Add("")
	f.Add("[regions]\nosm = 3\n")
	f.Add("title = \"x\"\n[[windows]]\nname = 1\n")
	f.Add("[scan]\nsupport = \"high\"\n")
	dir := f.TempDir()
	f.Fuzz(func(t *testing.T, text string) {
		path := filepath.Join(dir, "study.toml")
		if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
		s, err := loadStudy(path)
		if err != nil {
			if !strings.Contains(err.Error(), path) {
				t.Errorf("error does not name the file: %v", err)
			}
			return
		}
		if s.Regions.OSM == "" || len(s.Trips.Files) == 0 || s.Output == "" || s.Name == "" {
			t.Errorf("loaded a study without its required parts: %+v", s)
		}
	})
}

// FuzzParsePeriodAndFocus: the command line's own small parsers never
// panic and accept only what they can use.
func FuzzParsePeriodAndFocus(f *testing.F) {
	for _, s := range []string{"2026-03-02..2026-03-29", "2026-03-29..2026-03-02", "..", "8.5,0.7@600", "12,15", "1,2@x", "@", ",@,"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		if from, to, err := patterns.ParsePeriod(s); err == nil && (from > to || len(from) != 10 || len(to) != 10) {
			t.Errorf("patterns.ParsePeriod(%q) = %q, %q", s, from, to)
		}
		if focus, err := parseFocus(s); err == nil && focus != nil {
			if focus.Point == nil && len(focus.Regions) == 0 {
				t.Errorf("parseFocus(%q) gave an empty focus", s)
			}
			if focus.Point != nil && !(focus.RadiusMetres > 0) {
				t.Errorf("parseFocus(%q) gave radius %v", s, focus.RadiusMetres)
			}
		}
	})
}
