package main

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"
	"github.com/paulmach/orb/planar"

	"narrows/cmd/internal/town"
	"narrows/partition"
	"narrows/patterns"
	"narrows/regiongraph"
	"narrows/report"
)

// The example study file in testdata is the one the demo writes: the test
// keeps the two from drifting apart.
func TestExampleStudyFileIsTheDemos(t *testing.T) {
	tw, err := town.Generate(town.Options{Size: town.SizeTown, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	plan, err := town.Scenario("link")
	if err != nil {
		t.Fatal(err)
	}
	want, err := os.ReadFile(filepath.Join("..", "..", "testdata", "study.toml"))
	if err != nil {
		t.Fatal(err)
	}
	if got := studyTemplate(tw.Name, plan, focusOf(tw)); got != string(want) {
		t.Errorf("testdata/study.toml differs from the demo's study file; the demo writes:\n%s", got)
	}
	if _, err := loadStudy(filepath.Join("..", "..", "testdata", "study.toml")); err != nil {
		t.Errorf("the example study file does not load: %v", err)
	}
}

// regionAt returns the id of the region containing pt, or 0.
func regionAt(p *partition.Partition, pt orb.Point) int {
	for _, r := range p.Regions {
		if planar.PolygonContains(r.Polygon, pt) {
			return r.ID
		}
	}
	return 0
}

// studyOutputs runs a simulated study in dir and returns its regions and
// day-graph store.
func studyOutputs(t *testing.T, dir string) (*partition.Partition, *regiongraph.Store) {
	t.Helper()
	regions, _, err := readRegions(filepath.Join(dir, "out", "steps", "partition.geojson"))
	if err != nil {
		t.Fatal(err)
	}
	store, err := regiongraph.ReadFile(filepath.Join(dir, "out", "steps", "graphs.parquet"))
	if err != nil {
		t.Fatal(err)
	}
	return regions, store
}

// studyPeriods returns the scan options of a study file's two periods.
func studyPeriods(t *testing.T, path string) (before, after patterns.ScanOptions) {
	t.Helper()
	s, err := loadStudy(path)
	if err != nil {
		t.Fatal(err)
	}
	if before, after, err = s.periods(); err != nil {
		t.Fatal(err)
	}
	return before, after
}

func hasEdge(f patterns.Finding, a, b int) bool {
	for _, e := range f.Edges {
		if (e.From == a && e.To == b) || (e.From == b && e.To == a) {
			return true
		}
	}
	return false
}

// The planted weakness of the demo town is found before the new bridge
// opens, and the bridge clears or eases it.
func TestDemoFindsThePlantedWeaknessAndTheFixWorks(t *testing.T) {
	if testing.Short() {
		t.Skip("end-to-end demo")
	}
	dir := t.TempDir()
	stdout := mustRunCLI(t, "demo", "--dir", dir)
	for _, name := range []string{"report.xlsx", "report.html", "report-regions.geojson", "report-findings.geojson"} {
		if !strings.Contains(stdout, filepath.Join(dir, "out", name)) {
			t.Errorf("demo does not say where %s is:\n%s", name, stdout)
		}
		if _, err := os.Stat(filepath.Join(dir, "out", name)); err != nil {
			t.Error(err)
		}
	}
	checkOnePlacePerPair(t, filepath.Join(dir, "out"))
	regions, store := studyOutputs(t, dir)
	tw, err := town.Generate(town.Options{Size: town.SizeTown, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	housing, jobs := regionAt(regions, tw.Housing.Centre), regionAt(regions, tw.Jobs.Centre)
	if housing == 0 || jobs == 0 || housing == jobs {
		t.Fatalf("planted districts in regions %d and %d, want two distinct regions", housing, jobs)
	}
	before, after := studyPeriods(t, filepath.Join(dir, "study.toml"))
	ctx := context.Background()
	scan, err := patterns.ScanStore(ctx, store, before)
	if err != nil {
		t.Fatal(err)
	}
	// Among the top findings before: within the first three ranks.
	top := -1
	for i, f := range scan.Findings {
		if hasEdge(f, housing, jobs) {
			top = i
			break
		}
	}
	if top < 0 || top >= 3 {
		t.Fatalf("the planted pair %d-%d is not among the top 3 findings before (first at index %d of %d)", housing, jobs, top, len(scan.Findings))
	}
	checkScanCommand(t, dir, before, housing, jobs, regions)
	afterScan, err := patterns.ScanStore(ctx, store, after)
	if err != nil {
		t.Fatal(err)
	}
	checkTimeline(t, filepath.Join(dir, "out"), map[string]*patterns.Scan{"before": scan, "after": afterScan})
	cmp, err := patterns.Compare(ctx, store, regions, before, after, patterns.DefaultCompareOptions())
	if err != nil {
		t.Fatal(err)
	}
	checked := 0
	for _, a := range cmp.Assessments {
		if !a.InBefore || !hasEdge(a.Finding, housing, jobs) {
			continue
		}
		checked++
		if a.Verdict != patterns.Cleared && a.Verdict != patterns.Eased {
			t.Errorf("finding %s with the planted pair: verdict %s, want cleared or eased (%s)", a.Finding.ID, a.Verdict, report.Reason(&a))
		}
		if d := a.Effects[patterns.Detour].Raw; d >= 0 {
			t.Errorf("finding %s: detour change %+.2f after the bridge opened, want a fall", a.Finding.ID, d)
		}
		// Its cost before and after: tens of extra vehicle-hours a day
		// before, at most half of that after.
		if c := a.Effects[patterns.Cost]; !(c.Before > 10 && c.After < c.Before/2) {
			t.Errorf("finding %s: cost %.1f veh-h/day before, %.1f after; want over 10, then under half", a.Finding.ID, c.Before, c.After)
		}
	}
	if checked == 0 {
		t.Error("no before finding holds the planted pair")
	}
	checkNoSpuriousWorse(t, cmp)
}

// checkNoSpuriousWorse checks every finding: none is new or worse unless
// its own adjusted cost or travel time rose significantly and materially.
func checkNoSpuriousWorse(t *testing.T, cmp *patterns.Comparison) {
	t.Helper()
	o := cmp.Options
	for _, a := range cmp.Assessments {
		if a.Verdict != patterns.New && a.Verdict != patterns.Worse {
			continue
		}
		c, tt := a.Effects[patterns.Cost], a.Effects[patterns.TravelTime]
		costUp := c.Adjusted.PAdjusted < o.Alpha && c.Relative >= o.MaterialCost
		timeUp := tt.Adjusted.PAdjusted < o.Alpha && tt.Relative >= o.MaterialTime
		if !costUp && !timeUp {
			t.Errorf("finding %s is %s without a significant, material rise of its own: %s", a.Finding.ID, a.Verdict, report.Reason(&a))
		}
	}
}

// checkScanCommand runs "narrows scan" on the demo's store for the before
// period and checks its outputs: the planted pair in the top finding of
// findings.json, its border roads in the printed table, and a line per
// finding edge in findings.geojson.
func checkScanCommand(t *testing.T, dir string, before patterns.ScanOptions, housing, jobs int, regions *partition.Partition) {
	t.Helper()
	// A folder that does not exist yet: scan makes it.
	out := filepath.Join(dir, "scan", "findings.json")
	stdout := mustRunCLI(t, "scan", "--graphs", filepath.Join(dir, "out", "steps", "graphs.parquet"),
		"--from", before.From, "--to", before.To, "--days", string(before.Days),
		"--support", fmt.Sprint(before.Support), "--out", out)
	var doc struct {
		Findings []struct {
			Rank   int `json:"rank"`
			Edges  []struct{ From, To int }
			Groups []struct {
				Edges []string `json:"edges"`
			} `json:"recurring_groups"`
		} `json:"findings"`
	}
	data, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(data, &doc); err != nil {
		t.Fatalf("findings.json: %v", err)
	}
	if len(doc.Findings) == 0 || doc.Findings[0].Rank != 1 {
		t.Fatalf("findings.json has no rank-1 finding: %s", data)
	}
	top := false
	for _, e := range doc.Findings[0].Edges {
		top = top || (e.From == housing && e.To == jobs) || (e.From == jobs && e.To == housing)
	}
	if !top {
		t.Errorf("the rank-1 finding of 'narrows scan' does not hold the planted pair %d-%d: %+v", housing, jobs, doc.Findings[0])
	}
	if road := regions.Regions[housing-1].BorderRoads[0].Name; !strings.Contains(stdout, road) {
		t.Errorf("the ranked table does not name %q, a border road of region %d:\n%s", road, housing, stdout)
	}
	layer, err := os.ReadFile(filepath.Join(dir, "scan", "findings.geojson"))
	if err != nil {
		t.Fatal(err)
	}
	fc, err := geojson.UnmarshalFeatureCollection(layer)
	if err != nil {
		t.Fatalf("findings.geojson: %v", err)
	}
	edges := 0
	for _, f := range doc.Findings {
		edges += len(f.Edges)
	}
	if len(fc.Features) != edges {
		t.Errorf("findings.geojson has %d features, want one per finding edge (%d)", len(fc.Features), edges)
	}
	for _, f := range fc.Features {
		if _, ok := f.Geometry.(orb.LineString); !ok {
			t.Errorf("findings.geojson feature is a %T, want a LineString", f.Geometry)
			break
		}
	}

	// One place per region pair: no pair in two findings, and the planted
	// crossing, both directions, in one.
	pairAt := map[[2]int]int{}
	for i, f := range doc.Findings {
		for _, e := range f.Edges {
			k := [2]int{min(e.From, e.To), max(e.From, e.To)}
			if j, ok := pairAt[k]; ok && j != i {
				t.Errorf("findings.json: pair %d-%d in findings %d and %d", k[0], k[1], j+1, i+1)
			}
			pairAt[k] = i
		}
	}
	if i, ok := pairAt[[2]int{min(housing, jobs), max(housing, jobs)}]; !ok || len(doc.Findings[i].Edges) < 2 {
		t.Errorf("findings.json: the planted pair is not one finding with both directions")
	}

	// The same over the map layer written beside it.
	layerData, err := os.ReadFile(strings.TrimSuffix(out, ".json") + ".geojson")
	if err != nil {
		t.Fatal(err)
	}
	var mapLayer struct {
		Features []struct {
			Properties struct {
				Finding  string `json:"finding"`
				Place    string `json:"place"`
				From, To int
			} `json:"properties"`
		} `json:"features"`
	}
	if err := json.Unmarshal(layerData, &mapLayer); err != nil {
		t.Fatal(err)
	}
	layerPair := map[[2]int]string{}
	for _, ft := range mapLayer.Features {
		p := ft.Properties
		k := [2]int{min(p.From, p.To), max(p.From, p.To)}
		if id, ok := layerPair[k]; ok && id != p.Finding || p.Place == "" {
			t.Errorf("%s: pair %d-%d in findings %s and %s (place %q)", "findings.geojson", k[0], k[1], id, p.Finding, p.Place)
		}
		layerPair[k] = p.Finding
	}
	if len(layerPair) != len(pairAt) {
		t.Errorf("%s has %d pairs, findings.json %d", "findings.geojson", len(layerPair), len(pairAt))
	}

	// --maximal-only lists fewer groups within the places, not fewer places.
	mustRunCLI(t, "scan", "--graphs", filepath.Join(dir, "out", "steps", "graphs.parquet"),
		"--from", before.From, "--to", before.To, "--days", string(before.Days),
		"--support", fmt.Sprint(before.Support), "--maximal-only", "--out", out)
	all, allGroups := len(doc.Findings), 0
	for _, f := range doc.Findings {
		allGroups += len(f.Groups)
	}
	doc.Findings = nil
	if data, err = os.ReadFile(out); err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(data, &doc); err != nil {
		t.Fatal(err)
	}
	maximal := 0
	for _, f := range doc.Findings {
		maximal += len(f.Groups)
		for i, g := range f.Groups {
			for j, h := range f.Groups {
				inside := i != j && len(g.Edges) <= len(h.Edges)
				for _, e := range g.Edges {
					inside = inside && slices.Contains(h.Edges, e)
				}
				if inside {
					t.Errorf("--maximal-only: finding %d: group %v lies inside group %v", f.Rank, g.Edges, h.Edges)
				}
			}
		}
	}
	if len(doc.Findings) != all || maximal == 0 || maximal > allGroups {
		t.Errorf("--maximal-only gives %d findings of %d, %d groups of %d", len(doc.Findings), all, maximal, allGroups)
	}
}

// With nothing changed between the periods, no finding is cleared and none
// is worse.
func TestControlScenarioHasNoClearedOrWorse(t *testing.T) {
	if testing.Short() {
		t.Skip("end-to-end control study")
	}
	dir := t.TempDir()
	mustRunCLI(t, "simulate", "--scenario", "control", "--out", dir)
	study := filepath.Join(dir, "study.toml")
	mustRunCLI(t, "run", study)
	regions, store := studyOutputs(t, dir)
	before, after := studyPeriods(t, study)
	cmp, err := patterns.Compare(context.Background(), store, regions, before, after, patterns.DefaultCompareOptions())
	if err != nil {
		t.Fatal(err)
	}
	if len(cmp.Before.Findings) == 0 {
		t.Fatal("the control has no findings before: nothing was tested")
	}
	for _, a := range cmp.Assessments {
		if a.Verdict == patterns.Cleared || a.Verdict == patterns.Worse {
			t.Errorf("control: finding %s is %s: %s", a.Finding.ID, a.Verdict, report.Reason(&a))
		}
	}
	checkNoSpuriousWorse(t, cmp)
}

// Same seed, same bytes: two demo runs give identical files.
func TestDemoIsDeterministic(t *testing.T) {
	if testing.Short() {
		t.Skip("two end-to-end demo runs")
	}
	dirs := []string{t.TempDir(), t.TempDir()}
	for _, d := range dirs {
		mustRunCLI(t, "demo", "--dir", d)
	}
	files := 0
	err := filepath.WalkDir(dirs[0], func(path string, d fs.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return err
		}
		rel, _ := filepath.Rel(dirs[0], path)
		a, err := os.ReadFile(path)
		if err != nil {
			return err
		}
		b, err := os.ReadFile(filepath.Join(dirs[1], rel))
		if err != nil {
			return err
		}
		files++
		if !bytes.Equal(a, b) {
			t.Errorf("%s differs between two demo runs with the same seed", rel)
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	if files < 9 {
		t.Errorf("compared only %d files", files)
	}
}

// BenchmarkDemo times the demo end to end (goal: under 30 s).
func BenchmarkDemo(b *testing.B) {
	for b.Loop() {
		dir := b.TempDir()
		var out bytes.Buffer
		env := &environment{stdout: &out, stderr: &out}
		if code := dispatch(context.Background(), env, []string{"demo", "--dir", dir}); code != exitOK {
			b.Fatalf("demo: exit %d\n%s", code, out.String())
		}
	}
}

// A study file without [compare] scans one period: findings.json, the map
// layers, the workbook and the HTML page, and the scan headline.
func TestStudyWithoutCompareScans(t *testing.T) {
	if testing.Short() {
		t.Skip("simulated study")
	}
	dir := t.TempDir()
	mustRunCLI(t, "simulate", "--out", dir, "--days", "14", "--trips-per-day", "4000", "--no-study")
	study := filepath.Join(dir, "study.toml")
	text, err := os.ReadFile(filepath.Join("..", "..", "testdata", "study.toml"))
	if err != nil {
		t.Fatal(err)
	}
	head, _, ok := strings.Cut(string(text), "[compare]")
	if !ok {
		t.Fatal("the simulated study file has no [compare] section to drop")
	}
	if err := os.WriteFile(study, []byte(head), 0o644); err != nil {
		t.Fatal(err)
	}
	stdout := mustRunCLI(t, "run", study)
	if !strings.Contains(stdout, "analysed days") {
		t.Errorf("no scan headline:\n%s", stdout)
	}
	for _, name := range []string{"report-findings.json", "report-findings.geojson", "report-regions.geojson", "report.xlsx", "report.html"} {
		if _, err := os.Stat(filepath.Join(dir, "out", name)); err != nil {
			t.Errorf("scan-only study: %v", err)
		}
	}
	if _, err := os.Stat(filepath.Join(dir, "out", "report.xlsx")); err == nil && strings.Contains(stdout, "cleared") {
		t.Errorf("a scan-only study speaks of verdicts:\n%s", stdout)
	}
}
