package main

import (
	"archive/zip"
	"encoding/json"
	"html"
	"io"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"

	"github.com/xuri/excelize/v2"

	"narrows/patterns"
)

// placeOwners collects, per output, which finding holds each region pair
// (either direction) in each period, and which directed edges each
// finding lists.
type placeOwners struct {
	name  string
	t     *testing.T
	owner map[string]string          // period + " " + pair -> finding ID
	edges map[string]map[string]bool // period + " " + finding ID -> "a>b"
}

func newPlaceOwners(t *testing.T, name string) *placeOwners {
	return &placeOwners{name: name, t: t, owner: map[string]string{}, edges: map[string]map[string]bool{}}
}

// add records that finding id of period holds edge "a>b".
func (p *placeOwners) add(period, id, edge string) {
	p.t.Helper()
	a, b, ok := strings.Cut(edge, ">")
	from, err1 := strconv.Atoi(strings.TrimSpace(a))
	to, err2 := strconv.Atoi(strings.TrimSpace(b))
	if !ok || err1 != nil || err2 != nil {
		p.t.Errorf("%s: edge %q of finding %s is not FROM>TO", p.name, edge, id)
		return
	}
	pair := period + " " + strconv.Itoa(min(from, to)) + "-" + strconv.Itoa(max(from, to))
	if other, ok := p.owner[pair]; ok && other != id {
		p.t.Errorf("%s: region pair %s in findings %s and %s", p.name, pair, other, id)
	}
	p.owner[pair] = id
	k := period + " " + id
	if p.edges[k] == nil {
		p.edges[k] = map[string]bool{}
	}
	p.edges[k][strconv.Itoa(from)+">"+strconv.Itoa(to)] = true
}

// sameAs checks that two outputs list the same findings with the same edges.
func (p *placeOwners) sameAs(q *placeOwners) {
	p.t.Helper()
	if len(p.edges) != len(q.edges) {
		p.t.Errorf("%s lists %d findings, %s %d", p.name, len(p.edges), q.name, len(q.edges))
	}
	for k, es := range p.edges {
		if len(q.edges[k]) != len(es) {
			p.t.Errorf("finding %s: %d edges in %s, %d in %s", k, len(es), p.name, len(q.edges[k]), q.name)
			continue
		}
		for e := range es {
			if !q.edges[k][e] {
				p.t.Errorf("finding %s: edge %s in %s, not in %s", k, e, p.name, q.name)
			}
		}
	}
}

// sheetRows reads a sheet of the workbook as maps from header to value.
func sheetRows(t *testing.T, f *excelize.File, sheet string) []map[string]string {
	t.Helper()
	rows, err := f.GetRows(sheet)
	if err != nil {
		t.Fatalf("sheet %s: %v", sheet, err)
	}
	if len(rows) < 2 {
		t.Fatalf("sheet %s has %d rows", sheet, len(rows))
	}
	var out []map[string]string
	for _, r := range rows[1:] {
		m := map[string]string{}
		for i, h := range rows[0] {
			if i < len(r) {
				m[h] = r[i]
			}
		}
		out = append(out, m)
	}
	return out
}

// checkOnePlacePerPair reads every output of a demo's comparison in dir
// (the workbook's Weak links, Edges and Daily sheets, the HTML page and
// the findings map layer) and checks that no region pair appears in two
// findings of a period, that the outputs list the same findings with the
// same edges, and that the Daily sheet has one row per edge and day.
func checkOnePlacePerPair(t *testing.T, dir string) {
	t.Helper()
	f, err := excelize.OpenFile(filepath.Join(dir, "report.xlsx"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()

	weak := newPlaceOwners(t, "Weak links sheet")
	for _, r := range sheetRows(t, f, "Weak links") {
		if strings.HasPrefix(r["Rank in period"], "Total") {
			continue
		}
		for _, e := range strings.Split(r["Edges"], ", ") {
			weak.add(r["Ranked in"], r["Weak link"], e)
		}
	}
	edges := newPlaceOwners(t, "Edges sheet")
	for _, r := range sheetRows(t, f, "Edges") {
		edges.add(r["Ranked in"], r["Weak link"], r["From"]+">"+r["To"])
	}
	weak.sameAs(edges)
	if len(weak.edges) == 0 {
		t.Fatal("the workbook lists no finding")
	}

	// Daily: a pair's days sit under one finding per period, and each
	// edge and day is one row.
	daily := newPlaceOwners(t, "Daily sheet")
	seen := map[string]bool{}
	for _, r := range sheetRows(t, f, "Daily") {
		daily.add(r["Period"], r["Weak link"], r["From"]+">"+r["To"])
		k := r["Period"] + " " + r["From"] + ">" + r["To"] + " " + r["Day"]
		if seen[k] {
			t.Errorf("Daily sheet: edge and day %s in two rows", k)
		}
		seen[k] = true
	}

	// The HTML page: one row per finding, its edges in the title.
	page, err := os.ReadFile(filepath.Join(dir, "report.html"))
	if err != nil {
		t.Fatal(err)
	}
	row := regexp.MustCompile(`<tr><td class="num">\d+ \((before|after)\)</td><td title="Edges ([^"]*)">[^<]*<span class="ci">\(([^)]*)\)</span>`)
	htmlOwners := newPlaceOwners(t, "HTML page")
	for _, m := range row.FindAllStringSubmatch(string(page), -1) {
		for _, e := range strings.Split(html.UnescapeString(m[2]), ", ") {
			htmlOwners.add(m[1], html.UnescapeString(m[3]), e)
		}
	}
	weak.sameAs(htmlOwners)

	// The map layer has no period; a pair belongs to one finding over the
	// whole layer (in the demo the after period's places are the before
	// period's or lie elsewhere).
	data, err := os.ReadFile(filepath.Join(dir, "report-findings.geojson"))
	if err != nil {
		t.Fatal(err)
	}
	var layer struct {
		Features []struct {
			Properties struct {
				Finding  string `json:"finding"`
				From, To int
			} `json:"properties"`
		} `json:"features"`
	}
	if err := json.Unmarshal(data, &layer); err != nil {
		t.Fatal(err)
	}
	mapOwners := newPlaceOwners(t, "report-findings.geojson")
	for _, ft := range layer.Features {
		p := ft.Properties
		mapOwners.add("", p.Finding, strconv.Itoa(p.From)+">"+strconv.Itoa(p.To))
	}
	if len(mapOwners.edges) == 0 {
		t.Errorf("%s lists no finding", "report-findings.geojson")
	}
}

// checkTimeline reads the Timeline sheet of the workbook in dir and
// recounts it from the scans of the periods: on each day the candidates
// are the day's candidate edges and the weak places the findings with at
// least one of their edges among them (a brute-force recount over the
// findings' edges, not over Finding.Days). Since every candidate edge
// belongs to at most one finding, the places of a day never exceed its
// candidates. The chart draws those two columns under their headers.
func checkTimeline(t *testing.T, dir string, scans map[string]*patterns.Scan) {
	t.Helper()
	path := filepath.Join(dir, "report.xlsx")
	f, err := excelize.OpenFile(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows := sheetRows(t, f, "Timeline")
	want := 0
	for _, s := range scans {
		want += len(s.Days)
	}
	if len(rows) != want {
		t.Errorf("Timeline has %d days, the scans %d", len(rows), want)
	}
	for _, r := range rows {
		s := scans[r["Period"]]
		if s == nil {
			t.Errorf("Timeline row %v: no such period", r)
			continue
		}
		i := slices.Index(s.Days, r["Day"])
		if i < 0 {
			t.Errorf("Timeline row %v: not an analysed day", r)
			continue
		}
		places := 0
		for _, fd := range s.Findings {
			for _, e := range fd.Edges {
				if slices.Contains(s.DayCandidates[i], patterns.EdgeKey{From: e.From, To: e.To}) {
					places++
					break
				}
			}
		}
		cands, err1 := strconv.Atoi(r["Candidates"])
		got, err2 := strconv.Atoi(r["Weak links"])
		if err1 != nil || err2 != nil {
			t.Errorf("Timeline row %v: counts are not numbers", r)
			continue
		}
		if cands != len(s.DayCandidates[i]) || got != places {
			t.Errorf("Timeline %s: %d candidates and %d weak places, recount %d and %d", r["Day"], cands, got, len(s.DayCandidates[i]), places)
		}
		if got > cands {
			t.Errorf("Timeline %s: %d weak places but %d candidates", r["Day"], got, cands)
		}
	}

	// The chart: two series over the rows below the header, named by the
	// header cells of the Candidates and Weak links columns.
	z, err := zip.OpenReader(path)
	if err != nil {
		t.Fatal(err)
	}
	defer z.Close()
	var chart []byte
	for _, zf := range z.File {
		if zf.Name != "xl/charts/chart1.xml" {
			continue
		}
		rc, err := zf.Open()
		if err != nil {
			t.Fatal(err)
		}
		chart, err = io.ReadAll(rc)
		rc.Close()
		if err != nil {
			t.Fatal(err)
		}
	}
	last := strconv.Itoa(len(rows) + 1)
	text := html.UnescapeString(string(chart))
	for _, ref := range []string{"'Timeline'!$C$1", "'Timeline'!$D$1", "'Timeline'!$C$2:$C$" + last, "'Timeline'!$D$2:$D$" + last, "weak links per day"} {
		if !strings.Contains(text, ref) {
			t.Errorf("Timeline chart lacks %q", ref)
		}
	}
}
