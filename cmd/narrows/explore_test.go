package main

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"maps"
	"math"
	"net/http"
	"net/http/httptest"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"sync"
	"testing"

	"github.com/xuri/excelize/v2"

	"narrows/cmd/internal/explore"
	"narrows/patterns"
	"narrows/regiongraph"
	"narrows/report"
)

// exploreFixture is a scan-only simulated study served by explore.
type exploreFixture struct {
	study string
	st    *explore.Study
	srv   *explore.Server
	http  *httptest.Server
}

func newExploreFixture(t *testing.T) *exploreFixture {
	t.Helper()
	study := exploreStudyFile(t)
	env := &environment{stdout: &bytes.Buffer{}, stderr: &bytes.Buffer{}}
	st, err := exploreStudy(context.Background(), env, study)
	if err != nil {
		t.Fatal(err)
	}
	srv, err := explore.New(context.Background(), st)
	if err != nil {
		t.Fatal(err)
	}
	hs := httptest.NewServer(srv.Handler()) // listens on 127.0.0.1
	t.Cleanup(hs.Close)
	srv.AllowHost(strings.TrimPrefix(hs.URL, "http://"))
	return &exploreFixture{study: study, st: st, srv: srv, http: hs}
}

// exploreStudyFile writes a scan-only study of a simulated 14 days and
// returns its path.
func exploreStudyFile(t *testing.T) string {
	t.Helper()
	dir := t.TempDir()
	mustRunCLI(t, "simulate", "--out", dir, "--days", "14", "--trips-per-day", "4000", "--no-study")
	text, err := os.ReadFile(filepath.Join("..", "..", "testdata", "study.toml"))
	if err != nil {
		t.Fatal(err)
	}
	head, _, _ := strings.Cut(string(text), "[compare]")
	study := filepath.Join(dir, "study.toml")
	if err := os.WriteFile(study, []byte(head), 0o644); err != nil {
		t.Fatal(err)
	}
	return study
}

// post sends body to path with the token (unless token is "") and returns
// the status and the decoded answer.
func (f *exploreFixture) post(t *testing.T, path, token, body string) (int, map[string]any) {
	t.Helper()
	req, _ := http.NewRequest("POST", f.http.URL+path, strings.NewReader(body))
	req.Header.Set("Content-Type", "application/json")
	if token != "" {
		req.Header.Set(explore.TokenHeader, token)
	}
	return do(t, req)
}

func do(t *testing.T, req *http.Request) (int, map[string]any) {
	t.Helper()
	res, err := http.DefaultClient.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	defer res.Body.Close()
	var out map[string]any
	if err := json.NewDecoder(res.Body).Decode(&out); err != nil {
		t.Fatalf("%s %s: answer is not JSON: %v", req.Method, req.URL.Path, err)
	}
	return res.StatusCode, out
}

func (f *exploreFixture) state(t *testing.T) explore.State {
	t.Helper()
	res, err := http.Get(f.http.URL + "/api/state")
	if err != nil {
		t.Fatal(err)
	}
	defer res.Body.Close()
	var s explore.State
	if err := json.NewDecoder(res.Body).Decode(&s); err != nil {
		t.Fatal(err)
	}
	return s
}

func settingsJSON(s explore.Settings) string {
	b, _ := json.Marshal(s)
	return string(b)
}

func TestExploreAPI(t *testing.T) {
	if testing.Short() {
		t.Skip("simulated study")
	}
	f := newExploreFixture(t)
	tok := f.srv.Token()
	s0 := f.state(t)
	if s0.Mode != "scan" || len(s0.Findings) == 0 || len(s0.Days) != 14 {
		t.Fatalf("first state: mode %s, %d findings, %d days", s0.Mode, len(s0.Findings), len(s0.Days))
	}
	top := s0.Findings[0]

	// Bad requests: each a 4xx with a message, the state unchanged.
	huge := `{"min_trips": 5, "window": "` + strings.Repeat("x", explore.MaxBody) + `"}`
	for _, c := range []struct {
		name, path, token, body string
		code                    int
	}{
		{"no token", "/api/settings", "", settingsJSON(s0.Settings), 403},
		{"wrong token", "/api/settings", otherToken(tok), settingsJSON(s0.Settings), 403},
		{"malformed JSON", "/api/settings", tok, `{"min_trips":`, 400},
		{"unknown field", "/api/settings", tok, `{"min_tripz": 3}`, 400},
		{"malformed date", "/api/settings", tok, strings.Replace(settingsJSON(s0.Settings), `"from":""`, `"from":"2026-13-01"`, 1), 400},
		{"support out of range", "/api/settings", tok, strings.Replace(settingsJSON(s0.Settings), `"support":0.3`, `"support":1.5`, 1), 400},
		{"unknown window", "/api/settings", tok, strings.Replace(settingsJSON(s0.Settings), `"window":""`, `"window":"nightly"`, 1), 400},
		{"one period only", "/api/settings", tok, strings.Replace(settingsJSON(s0.Settings), `"before":""`, `"before":"2026-03-02..2026-03-08"`, 1), 400},
		{"huge body", "/api/settings", tok, huge, 413},
		{"malformed focus", "/api/settings", tok, strings.Replace(settingsJSON(s0.Settings), `"focus":""`, `"focus":"north of the river"`, 1), 400},
		{"focus on an unknown region", "/api/settings", tok, strings.Replace(settingsJSON(s0.Settings), `"focus":""`, `"focus":"3,9999"`, 1), 400},
		{"unknown region", "/api/exclusions", tok, `{"pairs":[{"a":9999,"b":1,"reason":"ferry"}]}`, 400},
		{"no reason", "/api/exclusions", tok, `{"days":[{"from":"2026-03-03"}]}`, 400},
		{"range backwards", "/api/exclusions", tok, `{"days":[{"from":"2026-03-05","to":"2026-03-03","reason":"works"}]}`, 400},
		{"malformed day", "/api/exclusions", tok, `{"days":[{"from":"3 March","reason":"works"}]}`, 400},
		{"save without token", "/api/save", "", `{}`, 403},
		{"report without token", "/api/report", "", `{}`, 403},
		{"report with a body", "/api/report", tok, `{"out":"/etc"}`, 400},
	} {
		code, ans := f.post(t, c.path, c.token, c.body)
		if code != c.code || ans["error"] == "" {
			t.Errorf("%s: status %d (want %d), answer %v", c.name, code, c.code, ans["error"])
		}
	}
	req, _ := http.NewRequest("POST", f.http.URL+"/api/settings", strings.NewReader(settingsJSON(s0.Settings)))
	req.Header.Set(explore.TokenHeader, tok)
	req.Header.Set("Content-Type", "text/plain")
	if code, _ := do(t, req); code != 415 {
		t.Errorf("text/plain body: status %d, want 415", code)
	}
	req, _ = http.NewRequest("GET", f.http.URL+"/api/state", nil)
	req.Host = "narrows.example:80"
	if code, _ := do(t, req); code != 421 {
		t.Errorf("foreign Host header: status %d, want 421", code)
	}
	if s := f.state(t); settingsJSON(s.Settings) != settingsJSON(s0.Settings) || len(s.Findings) != len(s0.Findings) {
		t.Errorf("a refused request changed the state")
	}

	// Concurrent requests: every answer whole, the last state one of those sent.
	var wg sync.WaitGroup
	codes := make([]int, 8)
	for i := range codes {
		wg.Add(1)
		go func() {
			defer wg.Done()
			s := s0.Settings
			s.MinTrips = 8 + i%3
			codes[i], _ = f.post(t, "/api/settings", tok, settingsJSON(s))
			f.state(t)
		}()
	}
	wg.Wait()
	for i, c := range codes {
		if c != 200 {
			t.Errorf("concurrent request %d: status %d", i, c)
		}
	}
	if m := f.state(t).Settings.MinTrips; m < 8 || m > 10 {
		t.Errorf("after concurrent requests min trips is %d, none of those sent", m)
	}

	// The planner's changes; each answer is the scan of the library on the
	// same store with the same options (an independent call, not the page's).
	set := s0.Settings
	set.MinTrips = 6
	if code, ans := f.post(t, "/api/settings", tok, settingsJSON(set)); code != 200 {
		t.Fatalf("settings: %d %v", code, ans)
	}
	day := s0.Days[2].Day
	a, b := top.Edges[0].From, top.Edges[0].To
	body := fmt.Sprintf(`{"days":[{"from":%q,"reason":"bridge works"}],"pairs":[{"a":%d,"b":%d,"reason":"ferry"}]}`, day, a, b)
	if code, ans := f.post(t, "/api/exclusions", tok, body); code != 200 {
		t.Fatalf("exclusions: %d %v", code, ans)
	}
	s1 := f.state(t)
	opts := f.st.Scan
	opts.Skyline.MinTrips = 6
	opts.Exclude = append(slices.Clone(opts.Exclude), day)
	kept := f.st.Store.Without(func(e *regiongraph.Edge) bool {
		return (e.From == a && e.To == b) || (e.From == b && e.To == a)
	})
	want, err := patterns.ScanStore(context.Background(), kept, opts)
	if err != nil {
		t.Fatal(err)
	}
	if got, w := findingIDs(s1.Findings), scanIDs(want); !slices.Equal(got, w) {
		t.Errorf("findings after the changes %v, the library's scan %v", got, w)
	}
	for _, fs := range s1.Findings {
		for _, e := range fs.Edges {
			if (e.From == a && e.To == b) || (e.From == b && e.To == a) {
				t.Errorf("excluded pair %d-%d still in finding %s", a, b, fs.ID)
			}
		}
	}
	for _, d := range s1.Days {
		if d.Day == day && (d.Excluded != "bridge works" || d.Period != "") {
			t.Errorf("excluded day %s in the strip: %+v", day, d)
		}
	}
	if slices.Equal(findingIDs(s1.Findings), findingIDs(s0.Findings)) {
		t.Errorf("the changes left the findings as they were: %v", findingIDs(s0.Findings))
	}
	checkUncached(t, f.st, f.srv)
	// The day strip, summed edge by edge (brute force): every pair of the
	// window with at least the minimum of trips, the excluded pair left out.
	strip := map[string]float64{}
	for _, e := range kept.Edges {
		if kept.Meta.WindowName(e.Window) == s1.Window && e.Trips >= 6 {
			strip[e.Day.String()] += max(0, e.DurationSum-e.StraightSum/opts.ReferenceSpeed) / 3600
		}
	}
	for _, d := range s1.Days {
		if w := math.Round(strip[d.Day]*10) / 10; d.Cost != w {
			t.Errorf("strip day %s: %.1f extra veh-h, summed edge by edge %.1f", d.Day, d.Cost, w)
		}
	}

	// Save, then run the saved study: the same findings and costs.
	if code, ans := f.post(t, "/api/save", tok, `{}`); code != 200 {
		t.Fatalf("save: %d %v", code, ans)
	}
	if _, err := os.Stat(strings.TrimSuffix(f.study, ".toml") + ".1.toml"); err != nil {
		t.Errorf("the previous study was not kept: %v", err)
	}
	text, _ := os.ReadFile(f.study)
	for _, s := range []string{"bridge works", "ferry", "min_trips = 6"} {
		if !strings.Contains(string(text), s) {
			t.Errorf("saved study lacks %q:\n%s", s, text)
		}
	}
	mustRunCLI(t, "run", f.study)
	data, err := os.ReadFile(filepath.Join(filepath.Dir(f.study), "out", "report-findings.json"))
	if err != nil {
		t.Fatal(err)
	}
	var run struct {
		Findings []struct {
			ID    string  `json:"id"`
			Hours float64 `json:"extra_vehicle_hours_per_day"`
		} `json:"findings"`
	}
	if err := json.Unmarshal(data, &run); err != nil {
		t.Fatal(err)
	}
	if len(run.Findings) != len(s1.Findings) {
		t.Fatalf("run on the saved study: %d findings, the page showed %d", len(run.Findings), len(s1.Findings))
	}
	for i, rf := range run.Findings {
		// findings.json rounds the cost to its shown decimals.
		if rf.ID != s1.Findings[i].ID || rf.Hours != roundFor(s1.Findings[i].Cost, hoursDecimals) {
			t.Errorf("finding %d: run %s %.6f, page %s %.6f", i+1, rf.ID, rf.Hours, s1.Findings[i].ID, s1.Findings[i].Cost)
		}
	}
	page, _ := os.ReadFile(filepath.Join(filepath.Dir(f.study), "out", "report.html"))
	if !strings.Contains(string(page), "bridge works") || !strings.Contains(string(page), "ferry") {
		t.Errorf("the report does not give the exclusions' reasons")
	}
	out := filepath.Join(filepath.Dir(f.study), "out")
	checkExclusionRows(t, filepath.Join(out, "report.xlsx"), [][2]string{
		{"Excluded day " + day, "bridge works"},
		{fmt.Sprintf("Excluded region pair %d-%d (both directions)", a, b), "ferry"},
	})

	// "Write report" with the choices saved: the files run wrote, byte for byte.
	ran := readFiles(t, out, "report.xlsx", "report.html", "report-findings.geojson", "report-regions.geojson", "report-findings.json")
	var rep explore.ReportAnswer
	if code := f.postInto(t, "/api/report", tok, `{}`, &rep); code != 200 {
		t.Fatalf("write report: %d", code)
	}
	if rep.Saved != "" || len(rep.Written) != len(ran) {
		t.Errorf("write report with nothing changed: saved %q, wrote %v", rep.Saved, rep.Written)
	}
	sameFiles(t, "write report, then run", ran, readFiles(t, out, slices.Sorted(maps.Keys(ran))...))

	// Changed choices: saved first (a new version kept), then written;
	// run on the saved file into another folder gives the same files.
	set.MinTrips = 7
	if code, ans := f.post(t, "/api/settings", tok, settingsJSON(set)); code != 200 {
		t.Fatalf("settings: %d %v", code, ans)
	}
	rep = explore.ReportAnswer{}
	if code := f.postInto(t, "/api/report", tok, `{}`, &rep); code != 200 {
		t.Fatalf("write report: %d", code)
	}
	if _, err := os.Stat(strings.TrimSuffix(f.study, ".toml") + ".2.toml"); rep.Saved == "" || err != nil {
		t.Errorf("write report after a change did not save first: %q, %v", rep.Saved, err)
	}
	for _, p := range rep.Written {
		if filepath.Dir(p) != out {
			t.Errorf("write report wrote %s outside the study's output folder %s", p, out)
		}
	}
	written := readFiles(t, out, slices.Sorted(maps.Keys(ran))...)
	other := t.TempDir()
	mustRunCLI(t, "run", "--output", other, f.study)
	sameFiles(t, "write report after a change, then run --output", written, readFiles(t, other, slices.Sorted(maps.Keys(ran))...))
	if bytes.Equal(written["report-findings.json"], ran["report-findings.json"]) {
		t.Errorf("min trips 7 left the findings as they were")
	}
}

// postInto posts body and decodes a 200 answer into v.
func (f *exploreFixture) postInto(t *testing.T, path, token, body string, v any) int {
	t.Helper()
	req, _ := http.NewRequest("POST", f.http.URL+path, strings.NewReader(body))
	req.Header.Set("Content-Type", "application/json")
	req.Header.Set(explore.TokenHeader, token)
	res, err := http.DefaultClient.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	defer res.Body.Close()
	if res.StatusCode == 200 {
		if err := json.NewDecoder(res.Body).Decode(v); err != nil {
			t.Fatal(err)
		}
	}
	return res.StatusCode
}

func readFiles(t *testing.T, dir string, names ...string) map[string][]byte {
	t.Helper()
	out := map[string][]byte{}
	for _, n := range names {
		b, err := os.ReadFile(filepath.Join(dir, n))
		if err != nil {
			t.Fatal(err)
		}
		out[n] = b
	}
	return out
}

func sameFiles(t *testing.T, what string, a, b map[string][]byte) {
	t.Helper()
	for n, data := range a {
		if !bytes.Equal(data, b[n]) {
			t.Errorf("%s: %s differs (%d and %d bytes)", what, n, len(data), len(b[n]))
		}
	}
}

// checkExclusionRows checks that the workbook's Method and Data quality
// sheets each list the exclusions with their reasons, in order.
func checkExclusionRows(t *testing.T, workbook string, want [][2]string) {
	t.Helper()
	f, err := excelize.OpenFile(workbook)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	for _, sheet := range []string{report.SheetMethod, report.SheetDataQuality} {
		rows, err := f.GetRows(sheet)
		if err != nil {
			t.Fatal(err)
		}
		var got [][2]string
		for _, r := range rows {
			if len(r) >= 2 && strings.HasPrefix(r[0], "Excluded ") {
				got = append(got, [2]string{r[0], r[1]})
			}
		}
		if !slices.Equal(got, want) {
			t.Errorf("%s: %s lists %q, want %q", workbook, sheet, got, want)
		}
	}
}

func findingIDs(fs []explore.FindingState) []string {
	var out []string
	for _, f := range fs {
		out = append(out, f.ID)
	}
	return out
}

func scanIDs(s *patterns.Scan) []string {
	var out []string
	for _, f := range s.Findings {
		out = append(out, f.ID)
	}
	return out
}

// otherToken returns a token of the same length that differs from tok in
// its first character.
func otherToken(tok string) string {
	if strings.HasPrefix(tok, "0") {
		return "1" + tok[1:]
	}
	return "0" + tok[1:]
}

// checkUncached checks that the server's state, derived through its cache
// over several requests, is the state of a server that derives everything
// afresh from the same choices.
func checkUncached(t *testing.T, st *explore.Study, srv *explore.Server) {
	t.Helper()
	c := srv.Choices()
	fresh := *st
	fresh.NoCache = true
	fresh.Scan, fresh.Before, fresh.After, fresh.Exclusions, fresh.Focus = c.Scan, c.Before, c.After, c.Exclusions, c.Focus
	ref, err := explore.New(context.Background(), &fresh)
	if err != nil {
		t.Fatal(err)
	}
	got, want := srv.State(), ref.State()
	got.Millis, want.Millis, got.Saved, want.Saved = 0, 0, "", ""
	a, _ := json.Marshal(got)
	b, _ := json.Marshal(want)
	if !bytes.Equal(a, b) {
		t.Errorf("the cached state differs from the state derived afresh (%d and %d bytes of JSON)", len(a), len(b))
	}
}
