package main

import (
	"context"
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"

	"github.com/xuri/excelize/v2"

	"narrows/report"
)

// TestDemoReport checks, on one demo run, what a reader of the report
// meets first: the workbook's summary prints on one landscape page, and
// the outputs keep to one vocabulary.
func TestDemoReport(t *testing.T) {
	if testing.Short() {
		t.Skip("end-to-end demo")
	}
	dir := t.TempDir()
	stdout := mustRunCLI(t, "demo", "--dir", dir)
	out := filepath.Join(dir, "out")

	t.Run("one vocabulary", func(t *testing.T) {
		texts := map[string][]string{"terminal": strings.Split(stdout, "\n")}
		f, err := excelize.OpenFile(filepath.Join(out, "report.xlsx"))
		if err != nil {
			t.Fatal(err)
		}
		defer f.Close()
		for _, sh := range f.GetSheetList() {
			rows, err := f.GetRows(sh)
			if err != nil {
				t.Fatal(err)
			}
			for _, r := range rows {
				texts["workbook "+sh] = append(texts["workbook "+sh], r...)
			}
		}
		page, err := os.ReadFile(filepath.Join(out, "report.html"))
		if err != nil {
			t.Fatal(err)
		}
		texts["HTML"] = []string{string(page)}
		readme, err := os.ReadFile(filepath.Join("..", "..", "README.md"))
		if err != nil {
			t.Fatal(err)
		}
		texts["README"] = []string{string(readme)}
		var keys []string
		for _, name := range []string{"report-findings.geojson", "report-regions.geojson"} {
			data, err := os.ReadFile(filepath.Join(out, name))
			if err != nil {
				t.Fatal(err)
			}
			var doc any
			if err := json.Unmarshal(data, &doc); err != nil {
				t.Fatalf("%s: %v", name, err)
			}
			jsonKeys(doc, &keys)
			texts[name] = []string{string(data)}
		}
		for _, term := range vocabulary {
			for where, cells := range texts {
				for _, c := range cells {
					if term.not.MatchString(c) {
						t.Errorf("%s: %q says %q; the report's word is %q", where, clip(c), term.not.FindString(c), term.use)
						break
					}
				}
			}
			for _, k := range keys {
				if term.key && term.not.MatchString(k) {
					t.Errorf("JSON key %q; the report's word is %q", k, term.use)
				}
			}
		}
	})

	t.Run("summary prints on one page", func(t *testing.T) {
		soffice, err := exec.LookPath("soffice")
		if err != nil {
			t.Skip("no soffice: the printing check needs LibreOffice (apt-get install libreoffice-calc-nogui)")
		}
		// Only the summary is kept, so that every page of the PDF is
		// one of the summary's; both paper sizes a planner prints on.
		for _, paper := range []struct {
			name string
			size int // the format's paper size code
		}{{"Letter", 1}, {"A4", 9}} {
			pdf := printSummary(t, soffice, filepath.Join(out, "report.xlsx"), paper.size, filepath.Join(t.TempDir()))
			if n := pdfPages(pdf); n != 1 {
				t.Errorf("%s: the summary prints on %d pages, want 1", paper.name, n)
			}
			if !regexp.MustCompile(`/Subtype\s*/Image`).Match(pdf) {
				t.Errorf("%s: the printed summary holds no picture (the map)", paper.name)
			}
		}
	})
}

// printSummary writes a copy of the workbook at path holding only its
// summary sheet on the given paper, prints it to PDF through LibreOffice
// in dir and returns the PDF.
func printSummary(t *testing.T, soffice, path string, paper int, dir string) []byte {
	t.Helper()
	f, err := excelize.OpenFile(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	for _, sh := range f.GetSheetList() {
		if sh != report.SheetSummary {
			if err := f.DeleteSheet(sh); err != nil {
				t.Fatal(err)
			}
		}
	}
	if err := f.SetPageLayout(report.SheetSummary, &excelize.PageLayoutOptions{Size: &paper}); err != nil {
		t.Fatal(err)
	}
	xlsx := filepath.Join(dir, "summary.xlsx")
	if err := f.SaveAs(xlsx); err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithTimeout(context.Background(), 3*time.Minute)
	defer cancel()
	cmd := exec.CommandContext(ctx, soffice, "-env:UserInstallation=file://"+filepath.Join(dir, "profile"), "--headless", "--convert-to", "pdf", "--outdir", dir, xlsx)
	cmd.Env = append(os.Environ(), "HOME="+dir)
	if msg, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("soffice: %v\n%s", err, msg)
	}
	pdf, err := os.ReadFile(filepath.Join(dir, "summary.pdf"))
	if err != nil {
		t.Fatal(err)
	}
	if os.Getenv("NARROWS_KEEP_PDF") != "" { // to look at the page
		_ = os.WriteFile(os.Getenv("NARROWS_KEEP_PDF")+"-"+filepath.Base(dir)+".pdf", pdf, 0o644)
	}
	return pdf
}

// pdfPages counts the page objects of a PDF written without object
// streams, as LibreOffice writes it: "/Type /Page", not "/Type /Pages".
func pdfPages(pdf []byte) int {
	return len(regexp.MustCompile(`/Type\s*/Page[^s]`).FindAll(pdf, -1))
}

// vocabulary lists, for each term of the report, the spellings it does not
// use (not) and the one it does (use); key marks terms checked in JSON keys.
var vocabulary = []struct {
	not *regexp.Regexp
	use string
	key bool
}{
	{regexp.MustCompile(`\bkm2\b`), "km²", false}, // JSON keys keep ASCII: area_km2
	{regexp.MustCompile(`Licence`), "License (the ODbL's spelling)", false},
	{regexp.MustCompile(`Read with care`), "Cautions", false},
	{regexp.MustCompile(`>Why<|^Why$`), "Reason", false},
	{regexp.MustCompile(`\d→\d`), "> in edge ids (18>24)", false},
	{regexp.MustCompile(`(^|[^_])extra_(hours|km)_per`), "extra_vehicle_hours_per_day, extra_vehicle_km_per_day", true},
	{regexp.MustCompile(`(hours|km) a day`), "per day", false},
	{regexp.MustCompile(`(^|[^\d.])1 days`), "1 day", false},
	{regexp.MustCompile(`\d\.\d*(0{6,}|9{6,})\d`), "numbers rounded for their meaning (no float noise)", false},
}

// jsonKeys appends every object key of a decoded JSON document to keys.
func jsonKeys(doc any, keys *[]string) {
	switch d := doc.(type) {
	case map[string]any:
		for k, v := range d {
			*keys = append(*keys, k)
			jsonKeys(v, keys)
		}
	case []any:
		for _, v := range d {
			jsonKeys(v, keys)
		}
	}
}

// clip shortens a long text for a message.
func clip(s string) string {
	if len(s) > 120 {
		return s[:120] + "..."
	}
	return s
}
