package report

import (
	"bytes"
	"fmt"
	"image"
	"image/color"
	"image/png"
	"math"
	"math/rand"
	"reflect"
	"strings"
	"testing"

	"github.com/paulmach/orb"

	"narrows/partition"
	"narrows/patterns"
)

// insideEvenOdd is the brute-force oracle for fillPolygon: a point is
// inside when a ray to +x crosses the rings' edges an odd number of times.
func insideEvenOdd(rings [][][2]float64, x, y float64) bool {
	in := false
	for _, ring := range rings {
		n := len(ring)
		for i := 0; i < n; i++ {
			a, b := ring[i], ring[(i+1)%n]
			if (a[1] <= y) != (b[1] <= y) {
				if x < a[0]+(y-a[1])*(b[0]-a[0])/(b[1]-a[1]) {
					in = !in
				}
			}
		}
	}
	return in
}

func TestFillPolygonAgainstBruteForce(t *testing.T) {
	rng := rand.New(rand.NewSource(7))
	on := color.RGBA{200, 0, 0, 255}
	for trial := 0; trial < 60; trial++ {
		var rings [][][2]float64
		for r := 0; r < 1+trial%3; r++ {
			n := 3 + rng.Intn(8)
			ring := make([][2]float64, n)
			for i := range ring {
				ring[i] = [2]float64{rng.Float64()*44 - 2, rng.Float64()*44 - 2} // some outside the image
			}
			rings = append(rings, ring)
		}
		img := image.NewRGBA(image.Rect(0, 0, 40, 40))
		fillPolygon(img, rings, on)
		for y := 0; y < 40; y++ {
			for x := 0; x < 40; x++ {
				want := insideEvenOdd(rings, float64(x)+0.5, float64(y)+0.5)
				if got := img.RGBAAt(x, y) == on; got != want {
					t.Fatalf("trial %d pixel (%d,%d): filled %v, oracle %v", trial, x, y, got, want)
				}
			}
		}
	}
}

func TestFillPolygonRectangleWithHole(t *testing.T) {
	img := image.NewRGBA(image.Rect(0, 0, 30, 30))
	on := color.RGBA{0, 0, 255, 255}
	outer := [][2]float64{{5, 5}, {25, 5}, {25, 25}, {5, 25}}
	hole := [][2]float64{{10, 10}, {10, 20}, {20, 20}, {20, 10}}
	fillPolygon(img, [][][2]float64{outer, hole}, on)
	n := 0
	for i := 0; i < len(img.Pix); i += 4 {
		if img.Pix[i+2] == 255 {
			n++
		}
	}
	if want := 20*20 - 10*10; n != want {
		t.Errorf("filled %d pixels, want %d", n, want)
	}
}

func TestDashPattern(t *testing.T) {
	tests := []struct {
		in   string
		want []float64
	}{
		{"", nil},
		{"7 4", []float64{7, 4}},
		{"3", []float64{3, 3}},
		{"1 x", nil},
		{"0 2", nil},
	}
	for _, tc := range tests {
		if got := dashPattern(tc.in); !reflect.DeepEqual(got, tc.want) {
			t.Errorf("dashPattern(%q) = %v, want %v", tc.in, got, tc.want)
		}
	}
}

// headLead is the headline's start in the fixture: the costliest weak
// link of the before period (rank 1, 1>2) with its cost before and after
// and its adjusted change.
const headLead = "Across Mill Lane between Ring Road 1 and Ring Road 2, the costliest weak link before, worse: from 3.0 to 3.4 extra vehicle-hours per day (comparison group +2 %; adjusted change +0.4, 95 % CI +0.1 to +0.7)"

func TestHeadline(t *testing.T) {
	all := fxInput()
	noneBefore := fxInput()
	var as []patterns.Assessment
	for _, a := range noneBefore.Comparison.Assessments {
		if !a.InBefore {
			as = append(as, a)
		}
	}
	noneBefore.Comparison.Assessments = as
	afterOnly := fxInput()
	afterOnly.Comparison.Assessments[1].Verdict = patterns.Unchanged // the after-only 4>5+5>6
	empty := fxScanInput()
	empty.Scan.Findings = nil
	tests := []struct {
		name string
		in   Input
		want string
	}{
		// The three costliest weak links of the before period lead, by rank,
		// with their cost before and after and the adjusted change.
		// One sentence: the costliest of the before period, then the
		// verdicts of the other four (one of each) in severity order.
		{"comparison", all, "%s; of the 4 others, 1 new, 1 unchanged, 1 eased and 1 cleared."},
		{"after-only without rise", afterOnly, "%s; of the 4 others, 2 unchanged, 1 eased and 1 cleared."},
		{"only new", noneBefore, "No weak link recurred in the before period (2026-03-02 to 2026-03-15); the one weak link of the after period is new."},
		// Costliest is rank 1, 1>2: 40 trips * 1.5 km = 60 km, 40 * 0.05 = 2 h.
		{"scan", fxScanInput(), "The costliest of 4 weak links recurring on at least 20 % of the 14 analysed days (2026-03-02 to 2026-03-15) is across Mill Lane between Ring Road 1 and Ring Road 2 (1>2), with 60 extra vehicle-km and 2 extra vehicle-hours per day."},
		{"empty scan", empty, "No weak link recurred on at least 20 % of the 14 analysed days (2026-03-02 to 2026-03-15)."},
		{"nothing", Input{}, "No scan or comparison to report."},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			want := tc.want
			if strings.Contains(want, "%") && tc.in.Comparison != nil {
				want = fmt.Sprintf(want, headLead)
			}
			if got := Headline(tc.in); got != want {
				t.Errorf("Headline =\n%q\nwant\n%q", got, want)
			}
		})
	}
}

func TestInputErrors(t *testing.T) {
	bad := fxInput()
	bad.Comparison.Assessments[0].Finding.Edges[0].To = 99
	dup := fxInput()
	dup.Regions.Regions[1].ID = 1
	half := fxInput()
	half.Comparison.After = nil
	noRegions := fxInput()
	noRegions.Regions = nil
	nanPoint := fxInput()
	nanPoint.Regions.Regions[2].Polygon[0][1][1] = math.NaN()
	tests := []struct {
		name string
		in   Input
		want string
	}{
		{"unknown region", bad, "region 99 is not in the partition"},
		{"duplicate region", dup, "region 1 appears twice"},
		{"half comparison", half, "lacks its before or after"},
		{"no regions", noRegions, "no regions"},
		{"non-finite coordinate", nanPoint, "region 3: point 1 of ring 0 is not finite"},
		{"no results", Input{Regions: fxRegions()}, "neither a scan nor a comparison"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			for _, w := range writers() {
				var buf bytes.Buffer
				err := w.write(&buf, tc.in)
				if err == nil || !strings.Contains(err.Error(), tc.want) {
					t.Errorf("%s: error = %v, want one containing %q", w.name, err, tc.want)
				}
				if buf.Len() != 0 {
					t.Errorf("%s failed but wrote %d bytes", w.name, buf.Len())
				}
			}
			if _, err := writeAll(tc.in); err == nil {
				t.Error("writeAll: no error")
			}
		})
	}
}

// TestWritersAgree checks that every writer writes the same bytes each
// time, whichever writers ran before it.
func TestWritersAgree(t *testing.T) {
	all, err := writeAll(fxInput())
	if err != nil {
		t.Fatal(err)
	}
	for i, w := range writers() {
		var buf bytes.Buffer
		if err := w.write(&buf, fxInput()); err != nil {
			t.Fatal(err)
		}
		if len(all[i]) == 0 {
			t.Errorf("%s wrote nothing", w.name)
		}
		if !bytes.Equal(all[i], buf.Bytes()) {
			t.Errorf("%s: two writes differ", w.name)
		}
	}
}

func TestNonFiniteValues(t *testing.T) {
	in := fxInput()
	a := &in.Comparison.Assessments[0]
	a.FisherP = math.NaN()
	a.Effects[patterns.Cost].Adjusted.Shift, a.Effects[patterns.Cost].Adjusted.Low = math.NaN(), math.Inf(1)
	a.Finding.Edges[0].DetourMedian = math.Inf(1)
	if _, err := writeAll(in); err != nil {
		t.Fatalf("writing every output with NaN and Inf values: %v", err)
	}
	f, _ := writeBook(t, in)
	cmp := rowsByKey(t, f, SheetComparison, "Weak link")
	detail := rowsByKey(t, f, SheetComparisonDetail, "Weak link")
	if got := detail["1>2"]["Fisher p adjusted"]; got != "0.8100" {
		t.Errorf("Fisher p adjusted shown as %q, want 0.8100", got)
	}
	if got := cmp["1>2"]["Cost adjusted change"]; got != "" {
		t.Errorf("NaN cost change shown as %q, want blank", got)
	}
	if got := detail["1>2"]["Fisher p"]; got != "" {
		t.Errorf("NaN Fisher p shown as %q, want blank", got)
	}
}

func TestPNGColours(t *testing.T) {
	tests := []struct {
		name string
		in   Input
		want []string // colours that must be drawn
	}{
		{"comparison", fxInput(), []string{"#D55E00", "#CC79A7", "#E69F00", "#56B4E9", "#009E73", regionFill, focusFillPNG}},
		{"scan", fxScanInput(), []string{"#0072B2", regionFill}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			v, err := newView(tc.in)
			if err != nil {
				t.Fatal(err)
			}
			data, err := v.png()
			if err != nil {
				t.Fatal(err)
			}
			img, err := png.Decode(bytes.NewReader(data))
			if err != nil {
				t.Fatal(err)
			}
			count := map[color.RGBA]int{}
			b := img.Bounds()
			for y := b.Min.Y; y < b.Max.Y; y++ {
				for x := b.Min.X; x < b.Max.X; x++ {
					r, g, bl, a := img.At(x, y).RGBA()
					count[color.RGBA{uint8(r >> 8), uint8(g >> 8), uint8(bl >> 8), uint8(a >> 8)}]++
				}
			}
			for _, hex := range tc.want {
				if count[rgba(hex)] == 0 {
					t.Errorf("no pixel of %s", hex)
				}
			}
			if tc.name == "scan" && count[rgba(focusFillPNG)] != 0 {
				t.Error("focus colour drawn without a focus area")
			}
		})
	}
}

// TestDegenerateInputs writes every output for inputs at the edges: no
// regions, empty or non-finite geometry, empty scans. Nothing may panic and
// the SVG must stay well-formed.
func TestDegenerateInputs(t *testing.T) {
	emptyScan := &patterns.Scan{}
	nanRegions := fxRegions()
	nanRegions.Bound = orb.Bound{Min: orb.Point{math.NaN(), 0}, Max: orb.Point{1, math.Inf(1)}}
	nanRegions.Regions[1].Polygon = nil
	hugeRegions := fxRegions()
	hugeRegions.Bound = orb.Bound{}
	hugeRegions.Regions[2].Polygon = orb.Polygon{{{-1e300, -1e300}, {1e300, -1e300}, {1e300, 1e300}, {-1e300, -1e300}}}
	onePoint := fxRegions()
	onePoint.Bound = orb.Bound{Min: orb.Point{10, 50}, Max: orb.Point{10, 50}}
	for i := range onePoint.Regions {
		onePoint.Regions[i].Polygon = nil
		onePoint.Regions[i].Point = orb.Point{10, 50}
	}
	shortScan := fxComparison().Before
	shortScan.CandidatesPerDay = shortScan.CandidatesPerDay[:2]
	shortScan.EdgeDaily = nil
	tests := []struct {
		name string
		in   Input
	}{
		{"no regions, empty scan", Input{Regions: &partition.Partition{}, Scan: emptyScan}},
		{"non-finite bound", Input{Regions: nanRegions, Comparison: fxComparison()}},
		{"huge geometry", Input{Regions: hugeRegions, Scan: fxComparison().After}},
		{"all regions at one point", Input{Regions: onePoint, Comparison: fxComparison()}},
		{"short candidate list, no edge daily", Input{Regions: fxRegions(), Scan: shortScan}},
		{"empty comparison", Input{Regions: fxRegions(), Comparison: &patterns.Comparison{Before: emptyScan, After: emptyScan}}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if _, err := writeAll(tc.in); err != nil {
				t.Fatal(err)
			}
			v, err := newView(tc.in)
			if err != nil {
				t.Fatal(err)
			}
			svgFacts(t, []byte(v.svg()))
		})
	}
}

func TestCautionsThreshold(t *testing.T) {
	tests := []struct {
		min  int
		want string
	}{
		{0, `counts below 10 trips are shown as "<10"`},
		{25, `counts below 25 trips are shown as "<25" and values computed from them as "n<25"`},
	}
	for _, tc := range tests {
		if got := strings.Join(Cautions(tc.min), " "); !strings.Contains(got, tc.want) {
			t.Errorf("Cautions(%d) = %q, want it to contain %q", tc.min, got, tc.want)
		}
	}
	for _, key := range []string{"not all traffic", "qualified", "suppressed"} {
		if !strings.Contains(Caution, key) {
			t.Errorf("Caution lacks %q", key)
		}
	}
}
