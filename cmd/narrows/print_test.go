package main

import (
	"context"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
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
	mustRunCLI(t, "demo", "--dir", dir)
	out := filepath.Join(dir, "out")

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
