package main

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"net/http/httptest"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/chromedp/cdproto/runtime"
	"github.com/chromedp/chromedp"

	"narrows/cmd/internal/explore"
	"narrows/patterns"
	"narrows/report"
)

// chromiumPath is where the Debian package installs Chromium.
const chromiumPath = "/usr/bin/chromium"

// browser starts headless Chromium and returns a tab whose console errors
// and uncaught exceptions are collected by the returned func. It skips the
// test when Chromium is not installed.
func browser(t *testing.T) (context.Context, func() []string) {
	t.Helper()
	if _, err := os.Stat(chromiumPath); err != nil {
		t.Skip("no " + chromiumPath + ": browser test skipped (.ci/run installs chromium)")
	}
	opts := []chromedp.ExecAllocatorOption{
		chromedp.ExecPath(chromiumPath), chromedp.Headless, chromedp.NoSandbox, chromedp.DisableGPU,
		chromedp.NoFirstRun, chromedp.NoDefaultBrowserCheck, chromedp.UserDataDir(t.TempDir()),
		chromedp.Flag("disable-quic", true), chromedp.Flag("disable-background-networking", true),
		chromedp.Flag("disable-component-update", true), chromedp.Flag("disable-sync", true),
		chromedp.WindowSize(1400, 1800),
	}
	alloc, cancelAlloc := chromedp.NewExecAllocator(context.Background(), opts...)
	var mu sync.Mutex
	var problems []string
	ctx, cancel := chromedp.NewContext(alloc, chromedp.WithListener(func(ev any) {
		mu.Lock()
		defer mu.Unlock()
		switch ev := ev.(type) {
		case *runtime.EventConsoleAPICalled:
			if ev.Type == runtime.ConsoleAPICalledTypeError || ev.Type == runtime.ConsoleAPICalledTypeAssert {
				var args []string
				for _, a := range ev.Args {
					args = append(args, string(a.Value)+a.Description)
				}
				problems = append(problems, "console error: "+strings.Join(args, " "))
			}
		case *runtime.EventExceptionThrown:
			d := ev.ExceptionDetails
			msg := d.Text
			if d.Exception != nil {
				msg += " " + d.Exception.Description
			}
			problems = append(problems, fmt.Sprintf("uncaught exception at %s:%d: %s", d.URL, d.LineNumber+1, msg))
		}
	}))
	t.Cleanup(func() { cancel(); cancelAlloc() })
	// Start the browser with no deadline: a deadline on the first run ends
	// the browser when it passes.
	if err := chromedp.Do(ctx); err != nil {
		t.Fatalf("starting %s: %v", chromiumPath, err)
	}
	return ctx, func() []string {
		mu.Lock()
		defer mu.Unlock()
		return slices.Clone(problems)
	}
}

// pageFindings reads the ranked list and the map's finding arrows as the
// page shows them.
type pageView struct {
	IDs    []string `json:"ids"`
	Arrows []string `json:"arrows"` // each arrow's verdict and title, sorted
	Focus  []string `json:"focus"`  // the findings marked in the focus area
	Errors []string `json:"errors"` // the page's own error list
	Status string   `json:"status"`
}

const readPage = `({
  ids: [...document.querySelectorAll('#ranked tbody tr')].map((r) => r.dataset.id),
  arrows: [...document.querySelectorAll('#mapbox #findings line')].map((l) => l.dataset.verdict + ' ' + l.textContent).sort(),
  focus: [...document.querySelectorAll('#ranked tbody tr')].filter((r) => r.cells[1].textContent.startsWith('◎')).map((r) => r.dataset.id),
  errors: [...document.querySelectorAll('#errors li')].map((e) => e.textContent),
  status: document.getElementById('status').textContent,
})`

// mapArrows draws the map of in as report.WriteMapSVG does for the page
// and returns its finding arrows as readPage does.
func mapArrows(t *testing.T, in report.Input) []string {
	t.Helper()
	var svg bytes.Buffer
	if err := report.WriteMapSVG(&svg, in); err != nil {
		t.Fatal(err)
	}
	_, findings, _ := strings.Cut(svg.String(), `<g id="findings"`)
	findings, _, _ = strings.Cut(findings, `</g>`)
	var out []string
	re := regexp.MustCompile(`<line [^>]*data-verdict="([^"]*)"><title>([^<]*)</title></line>`)
	for _, m := range re.FindAllStringSubmatch(findings, -1) {
		out = append(out, unescapeXML(m[1])+" "+unescapeXML(m[2]))
	}
	slices.Sort(out)
	return out
}

func unescapeXML(s string) string {
	return strings.NewReplacer("&lt;", "<", "&gt;", ">", "&quot;", `"`, "&#39;", "'", "&apos;", "'", "&amp;", "&").Replace(s)
}

// TestExploreInBrowser drives the page of the demo study in headless
// Chromium as a planner would: it raises the minimum of trips, excludes a
// day and a region pair with reasons, and saves. After each change the
// list and the map must be those of an independent comparison of the
// library on the same choices; narrows run on the saved study must give
// the same findings. A console error or an uncaught exception fails it.
func TestExploreInBrowser(t *testing.T) {
	if testing.Short() {
		t.Skip("demo study and a browser")
	}
	ctx, problems := browser(t)
	dir := t.TempDir()
	mustRunCLI(t, "demo", "--dir", dir)
	study := filepath.Join(dir, "study.toml")
	env := &environment{stdout: &bytes.Buffer{}, stderr: &bytes.Buffer{}}
	st, err := exploreStudy(context.Background(), env, study)
	if err != nil {
		t.Fatal(err)
	}
	srv, err := explore.New(context.Background(), st)
	if err != nil {
		t.Fatal(err)
	}
	hs := httptest.NewServer(srv.Handler())
	t.Cleanup(hs.Close)
	srv.AllowHost(strings.TrimPrefix(hs.URL, "http://"))

	step, cancel := context.WithTimeout(ctx, 3*time.Minute)
	defer cancel()
	run := func(what string, actions ...chromedp.Action[chromedp.Void]) {
		t.Helper()
		if err := chromedp.Do(step, actions...); err != nil {
			t.Fatalf("%s: %v (page problems: %v)", what, err, problems())
		}
	}
	read := func() pageView {
		t.Helper()
		v, err := chromedp.Run(step, chromedp.Evaluate[pageView](readPage))
		if err != nil {
			t.Fatal(err)
		}
		return v
	}
	waitShown := func(n int) chromedp.Action[chromedp.Void] {
		return chromedp.Poll[chromedp.Void](fmt.Sprintf(`document.body.dataset.shown === "%d"`, n), chromedp.WithPollingTimeout(time.Minute))
	}
	// check compares the page with the server's state and with the
	// library's comparison of the choices the server holds.
	check := func(when string) pageView {
		t.Helper()
		v := read()
		state := srv.State()
		if !slices.Equal(v.IDs, findingIDs(state.Findings)) {
			t.Errorf("%s: page lists %v, the server's state %v", when, v.IDs, findingIDs(state.Findings))
		}
		c := srv.Choices()
		store, opts, err := c.Exclusions.Apply(st.Store, c.Scan)
		if err != nil {
			t.Fatal(err)
		}
		b, a := opts, opts
		b.From, b.To, _ = patterns.ParsePeriod(c.Before)
		a.From, a.To, _ = patterns.ParsePeriod(c.After)
		copts := st.Compare
		if copts.Focus, err = parseFocus(c.Focus); c.Focus == "" {
			copts.Focus = nil
		} else if err != nil {
			t.Fatal(err)
		}
		cmp, err := patterns.Compare(context.Background(), store, st.Regions, b, a, copts)
		if err != nil {
			t.Fatal(err)
		}
		var want, focus []string
		for _, as := range cmp.Assessments {
			want = append(want, as.Finding.ID)
			if as.Focus {
				focus = append(focus, as.Finding.ID)
			}
		}
		if got := slices.Sorted(slices.Values(v.Focus)); !slices.Equal(got, slices.Sorted(slices.Values(focus))) {
			t.Errorf("%s: page marks %v in the focus area, the library's comparison %v", when, got, focus)
		}
		if got := slices.Sorted(slices.Values(v.IDs)); !slices.Equal(got, slices.Sorted(slices.Values(want))) {
			t.Errorf("%s: page lists %v, the library's comparison %v", when, got, want)
		}
		in := report.Input{Title: st.Title, Regions: st.Regions, Store: &store.Meta, Scheme: st.Scheme, Comparison: cmp, Scan: cmp.Before}
		if w := mapArrows(t, in); !slices.Equal(v.Arrows, w) {
			t.Errorf("%s: the map's arrows\n%q\nthe library's\n%q", when, v.Arrows, w)
		}
		if len(v.Errors) > 0 {
			t.Errorf("%s: the page reports %v", when, v.Errors)
		}
		return v
	}

	start := time.Now()
	run("load", chromedp.Navigate(hs.URL+"/"), waitShown(1))
	loaded, err := chromedp.Run(step, chromedp.Evaluate[float64](`performance.getEntriesByName('narrows-list-rendered')[0].startTime`))
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("demo page: list rendered %.0f ms after navigation start (%.0f ms wall, shared machine)", loaded, float64(time.Since(start).Milliseconds()))
	v0 := check("first load")
	if len(v0.IDs) == 0 || len(v0.Arrows) == 0 {
		t.Fatalf("the demo page shows no findings: %+v", v0)
	}
	s0 := srv.State()

	// Minimum trips up.
	minTrips := s0.Settings.MinTrips + 5
	run("min trips", chromedp.SetValue(chromedp.CSS("#min_trips"), fmt.Sprint(minTrips)), chromedp.Click(chromedp.CSS("#apply")), waitShown(2))
	if got := srv.Choices().Scan.Skyline.MinTrips; got != minTrips {
		t.Fatalf("after the form, the server's minimum of trips is %d, want %d", got, minTrips)
	}
	check("minimum trips raised")

	// A day out, with its reason.
	day := s0.Days[len(s0.Days)/4].Day
	for _, d := range s0.Days {
		if d.Period == "before" {
			day = d.Day // a day that counts: one analysed
			break
		}
	}
	run("exclude a day", chromedp.SetValue(chromedp.CSS("#xday_from"), day), chromedp.SetValue(chromedp.CSS("#xday_reason"), "works"),
		chromedp.Click(chromedp.CSS("#xday_add")), waitShown(3))
	s2 := srv.State()
	for _, d := range s2.Days {
		if d.Day == day && (d.Excluded != "works" || d.Period != "") {
			t.Errorf("excluded day %s in the strip: %+v", day, d)
		}
	}
	check("a day excluded")

	// The top finding's first pair out.
	top := s2.Findings[0]
	a, b := top.Edges[0].From, top.Edges[0].To
	run("exclude a pair", chromedp.SetValue(chromedp.CSS("#xpair_a"), fmt.Sprint(a)), chromedp.SetValue(chromedp.CSS("#xpair_b"), fmt.Sprint(b)),
		chromedp.SetValue(chromedp.CSS("#xpair_reason"), "ferry"), chromedp.Click(chromedp.CSS("#xpair_add")), waitShown(4))
	x := srv.Choices().Exclusions
	if len(x.Days) != 1 || x.Days[0].Reason != "works" || len(x.Pairs) != 1 || x.Pairs[0].Reason != "ferry" || x.Pairs[0].A != a || x.Pairs[0].B != b {
		t.Fatalf("the server holds the exclusions %+v", x)
	}
	v3 := check("a pair excluded")
	if slices.Equal(v3.IDs, v0.IDs) && slices.Equal(v3.Arrows, v0.Arrows) {
		t.Errorf("the changes left list and map as they were: %v", v0.IDs)
	}
	for _, f := range srv.State().Findings {
		for _, e := range f.Edges {
			if (e.From == a && e.To == b) || (e.From == b && e.To == a) {
				t.Errorf("excluded pair %d-%d still in finding %s", a, b, f.ID)
			}
		}
	}
	// Focus on the second place of the list, from its detail.
	place := srv.State().Findings[1]
	run("focus on a place", chromedp.Click(chromedp.CSS("#ranked tbody tr:nth-child(2)")), chromedp.Click(chromedp.CSS("#focus-here")), waitShown(5))
	wantFocus := strings.Trim(strings.Join(strings.Fields(fmt.Sprint(place.Regions)), ","), "[]")
	if got := srv.Choices().Focus; got != wantFocus {
		t.Fatalf("after focusing on %s the server's focus is %q, want %q", place.ID, got, wantFocus)
	}
	v4 := check("focus on a place")
	if len(v4.Focus) == 0 {
		t.Errorf("focus on %s (regions %s) marks no finding", place.Name, wantFocus)
	}
	text, err := chromedp.Run(step, chromedp.TextContent(chromedp.CSS("#exclusions")))
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(text, "works") || !strings.Contains(text, "ferry") {
		t.Errorf("the exclusion list reads %q", text)
	}
	if shot, err := chromedp.Run(step, chromedp.FullScreenshot(100)); err != nil {
		t.Errorf("screenshot: %v", err)
	} else if path := os.Getenv("NARROWS_SCREENSHOT"); path != "" {
		if err := os.WriteFile(path, shot, 0o644); err != nil {
			t.Error(err)
		}
	}

	// Save, then run the saved study.
	run("save", chromedp.Click(chromedp.CSS("#save")), chromedp.Poll[chromedp.Void](`document.getElementById('saved').textContent !== ''`))
	saved := read()
	if !strings.HasPrefix(saved.Status, "Saved") {
		t.Errorf("after save the status reads %q", saved.Status)
	}
	// Write report from the page, then run the saved study: the same files.
	run("write report", chromedp.Click(chromedp.CSS("#write-report")), chromedp.Poll[chromedp.Void](`document.querySelectorAll('#written li').length > 0`))
	out := filepath.Join(dir, "out")
	names := []string{"report.xlsx", "report.html", "report-findings.geojson", "report-regions.geojson"}
	fromPage := readFiles(t, out, names...)
	mustRunCLI(t, "run", study)
	sameFiles(t, "the page's report and run's", fromPage, readFiles(t, out, names...))
	checkExclusionRows(t, filepath.Join(out, "report.xlsx"), [][2]string{
		{"Excluded day " + day, "works"},
		{fmt.Sprintf("Excluded region pair %d-%d (both directions)", a, b), "ferry"},
	})
	data, err := os.ReadFile(filepath.Join(dir, "out", "report-findings.geojson"))
	if err != nil {
		t.Fatal(err)
	}
	var layer struct {
		Features []struct {
			Properties struct {
				Finding string `json:"finding"`
				Verdict string `json:"verdict"`
			} `json:"properties"`
		} `json:"features"`
	}
	if err := json.Unmarshal(data, &layer); err != nil {
		t.Fatal(err)
	}
	ran := map[string]string{}
	for _, f := range layer.Features {
		ran[f.Properties.Finding] = f.Properties.Verdict
	}
	page := map[string]string{}
	for _, f := range srv.State().Findings {
		page[f.ID] = f.Verdict
	}
	if fmt.Sprint(ran) != fmt.Sprint(page) {
		t.Errorf("narrows run on the saved study: findings and verdicts %v, the page %v", ran, page)
	}
	if p := problems(); len(p) > 0 {
		t.Errorf("the browser reported %d problems:\n%s", len(p), strings.Join(p, "\n"))
	}
}
