package main

import (
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/hex"
	"encoding/xml"
	"image"
	"image/color"
	"image/png"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/paulmach/orb"

	"narrows/partition/geodesy"
)

// svgElement is an element of the map's SVG with its attributes and the
// ids of the groups around it.
type svgElement struct {
	name   string
	attr   map[string]string
	groups []string
	text   string
}

// demoMap runs the demo into a temporary folder and returns the folder,
// the HTML page and the elements of its map.
func demoMap(t *testing.T) (dir string, page []byte, els []svgElement) {
	t.Helper()
	dir = t.TempDir()
	mustRunCLI(t, "demo", "--dir", dir)
	page, els = pageMap(t, filepath.Join(dir, "out", "report.html"))
	return dir, page, els
}

// pageMap reads the HTML page at path and returns it with the elements of
// its map.
func pageMap(t *testing.T, path string) (page []byte, els []svgElement) {
	t.Helper()
	page, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	i, j := bytes.Index(page, []byte("<svg")), bytes.Index(page, []byte("</svg>"))
	if i < 0 || j < i {
		t.Fatal("the page holds no SVG map")
	}
	d := xml.NewDecoder(bytes.NewReader(page[i : j+len("</svg>")]))
	var stack []string
	for {
		tok, err := d.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("map SVG: %v", err)
		}
		switch el := tok.(type) {
		case xml.StartElement:
			e := svgElement{name: el.Name.Local, attr: map[string]string{}, groups: append([]string(nil), stack...)}
			for _, a := range el.Attr {
				e.attr[a.Name.Local] = a.Value
			}
			els = append(els, e)
			stack = append(stack, e.attr["id"])
		case xml.CharData:
			if n := len(els); n > 0 && len(stack) > 0 && stack[len(stack)-1] == els[n-1].attr["id"] {
				els[n-1].text += string(el)
			}
		case xml.EndElement:
			stack = stack[:len(stack)-1]
		}
	}
	return page, els
}

// drawnIn counts the elements drawn inside the group id: paths with
// data, lines and texts.
func drawnIn(els []svgElement, id string) int {
	n := 0
	for _, e := range els {
		if inGroup(e, id) && (e.name == "path" && len(e.attr["d"]) > 10 || e.name == "line" || e.name == "text") {
			n++
		}
	}
	return n
}

func inGroup(e svgElement, id string) bool {
	for _, g := range e.groups {
		if g == id {
			return true
		}
	}
	return false
}

type box struct{ x, y, w, h float64 }

func parseBox(t *testing.T, s string) box {
	t.Helper()
	f := strings.Fields(s)
	if len(f) != 4 {
		t.Fatalf("data-box %q: want four numbers", s)
	}
	var v [4]float64
	for i := range f {
		x, err := strconv.ParseFloat(f[i], 64)
		if err != nil {
			t.Fatalf("data-box %q: %v", s, err)
		}
		v[i] = x
	}
	return box{v[0], v[1], v[2], v[3]}
}

// TestDemoMaps checks the demo's HTML map: the network layers under the
// findings, the scheme (the bridge that only the after extract holds),
// a scale bar that measures right, labels that do not overlap, and a page
// that says what was analysed and opens offline.
func TestDemoMaps(t *testing.T) {
	if testing.Short() {
		t.Skip("end-to-end demo")
	}
	dir, page, els := demoMap(t)

	t.Run("layers", func(t *testing.T) {
		// Each layer must hold drawn linework: a path with data.
		for _, id := range []string{"regions", "minor-roads", "rivers", "major-roads-primary", "major-roads-trunk", "railways", "scheme", "scale-bar", "north-arrow", "findings", "region-labels"} {
			drawn := 0
			for _, e := range els {
				if inGroup(e, id) && (e.name == "path" && len(e.attr["d"]) > 10 || e.name == "line" || e.name == "text") {
					drawn++
				}
			}
			if drawn == 0 {
				t.Errorf("layer %s: nothing drawn", id)
			}
		}
		// The network lies under the findings: its groups come first.
		order := map[string]int{}
		for i, e := range els {
			if e.name == "g" && e.attr["id"] != "" {
				if _, ok := order[e.attr["id"]]; !ok {
					order[e.attr["id"]] = i
				}
			}
		}
		for _, id := range []string{"minor-roads", "rivers", "railways", "scheme"} {
			if order[id] > order["findings"] {
				t.Errorf("layer %s is drawn over the findings", id)
			}
		}
		scheme := ""
		for _, e := range els {
			if e.name == "title" && len(e.groups) > 0 && e.groups[len(e.groups)-1] == "scheme" {
				scheme = e.text
			}
		}
		if !strings.Contains(string(page), "Lantern Bridge (scheme)") {
			t.Errorf("the scheme is not named on the page (title %q)", scheme)
		}
	})

	t.Run("scale bar", func(t *testing.T) {
		// Oracle: the study area's width on the ground (great circle along
		// its middle latitude) over its width in pixels on the map.
		regions, _ := studyOutputs(t, dir)
		b := regions.Bound
		mid := (b.Min[1] + b.Max[1]) / 2
		groundM := geodesy.GreatCircleMetres(orb.Point{b.Min[0], mid}, orb.Point{b.Max[0], mid})
		var clipW, barPx, barM float64
		for _, e := range els {
			if e.name == "rect" && inGroup(e, "map-clip") {
				clipW, _ = strconv.ParseFloat(e.attr["width"], 64)
			}
			if e.name == "g" && e.attr["id"] == "scale-bar" {
				barM, _ = strconv.ParseFloat(e.attr["data-metres"], 64)
			}
			if e.name == "path" && inGroup(e, "scale-bar") {
				// M x,y-4 L x,y L x+px,y L x+px,y-4
				f := strings.FieldsFunc(e.attr["d"], func(r rune) bool { return r == 'M' || r == 'L' || r == ',' })
				x0, _ := strconv.ParseFloat(f[2], 64)
				x1, _ := strconv.ParseFloat(f[4], 64)
				barPx = x1 - x0
			}
		}
		if clipW <= 0 || barPx <= 0 || barM <= 0 {
			t.Fatalf("map width %v px, bar %v px for %v m", clipW, barPx, barM)
		}
		want := groundM / clipW
		if got := barM / barPx; got < want*0.99 || got > want*1.01 {
			t.Errorf("scale bar: %.3f m per pixel, the study area gives %.3f", got, want)
		}
	})

	t.Run("labels do not overlap", func(t *testing.T) {
		regions, _ := studyOutputs(t, dir)
		var boxes []box
		var names []string
		labelled := map[string]bool{}
		for _, e := range els {
			if e.attr["data-box"] == "" {
				continue
			}
			bx := parseBox(t, e.attr["data-box"])
			if e.name == "text" && inGroup(e, "region-labels") {
				labelled[e.attr["data-region"]] = true
				// The box must hold the text at its font size: 0.55 em a
				// digit is wider than sans-serif digits (about 0.55 em in
				// common fonts, from memory), and the baseline inside.
				x, _ := strconv.ParseFloat(e.attr["x"], 64)
				y, _ := strconv.ParseFloat(e.attr["y"], 64)
				text := strings.TrimSpace(e.text)
				if w := float64(len(e.attr["data-region"])) * 9 * 0.55; bx.w < w || x < bx.x || y > bx.y+bx.h || y-9 < bx.y-1 {
					t.Errorf("region %s label %q at %v,%v does not fit its box %+v", e.attr["data-region"], text, x, y, bx)
				}
			}
			boxes = append(boxes, bx)
			names = append(names, e.name+" "+e.attr["data-region"]+e.attr["data-box"])
		}
		for i := range boxes {
			for j := i + 1; j < len(boxes); j++ {
				a, b := boxes[i], boxes[j]
				if a.x < b.x+b.w && b.x < a.x+a.w && a.y < b.y+b.h && b.y < a.y+a.h {
					t.Errorf("labels overlap: %s and %s", names[i], names[j])
				}
			}
		}
		if len(labelled) != len(regions.Regions) {
			t.Errorf("%d of %d regions labelled", len(labelled), len(regions.Regions))
		}
	})

	t.Run("what was analysed, offline", func(t *testing.T) {
		s := string(page)
		i := strings.Index(s, `<table id="analysed">`)
		if i < 0 {
			t.Fatal("the page has no table of what was analysed")
		}
		table := s[i : i+strings.Index(s[i:], "</table>")]
		for _, want := range []string{"quillhaven-before.osm", "regions bounded by motorway, trunk, primary, secondary", "Etc/GMT-1", "all=00:00-24:00",
			"days analysed, before", "2026-03-02 to 2026-03-27", "<th>days</th><td>weekdays</td>", "<th>excluded days</th>",
			"<th>min trips per pair and day</th><td>10</td>", "<th>support (share of days)</th><td>0.3</td>", "<th>focus</th><td>0.86049,0.64426@800</td>",
			"Lantern Bridge (scheme)"} {
			if !strings.Contains(table, want) {
				t.Errorf("what was analysed lacks %q:\n%s", want, table)
			}
		}
		// Input hashes: the SHA-256 of each input file, computed here.
		for _, f := range []string{"study.toml", "town/quillhaven-before.osm", "town/quillhaven-after.osm", "town/trips.csv"} {
			data, err := os.ReadFile(filepath.Join(dir, f))
			if err != nil {
				t.Fatal(err)
			}
			sum := sha256.Sum256(data)
			if !strings.Contains(s, hex.EncodeToString(sum[:])) {
				t.Errorf("the page lacks the SHA-256 of %s", f)
			}
		}
		// One file: nothing to fetch.
		for _, bad := range []string{"<script", "<link", "<img", "<iframe", "@import", "src=", "href=", "url(http", "url(//"} {
			if strings.Contains(s, bad) {
				t.Errorf("the page is not self-contained: it holds %q", bad)
			}
		}
		if n := strings.Count(s, "http"); n != strings.Count(s, `"http://www.w3.org/`) {
			t.Errorf("the page names %d addresses besides its XML namespaces", n-strings.Count(s, `"http://www.w3.org/`))
		}
	})

	t.Run("headless chromium", func(t *testing.T) {
		screenshotCheck(t, filepath.Join(dir, "out", "report.html"))
	})
}

// chromium is where .ci/run installs Debian's chromium.
const chromium = "/usr/bin/chromium"

// screenshotCheck renders the page in headless Chromium and checks the
// picture: not blank, and the map's layers in their colours (the river,
// the major roads, the scheme's yellow and the railway).
func screenshotCheck(t *testing.T, page string) {
	if _, err := os.Stat(chromium); err != nil {
		t.Skipf("no %s: the rendering check needs Debian's chromium (apt-get install chromium)", chromium)
	}
	shot := filepath.Join(t.TempDir(), "page.png")
	abs, err := filepath.Abs(page)
	if err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithTimeout(context.Background(), 90*time.Second)
	defer cancel()
	cmd := exec.CommandContext(ctx, chromium, "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
		"--disable-background-networking", "--disable-component-update", "--disable-sync", "--user-data-dir="+t.TempDir(),
		"--screenshot="+shot, "--window-size=1400,3000", "file://"+abs)
	out, err := cmd.CombinedOutput()
	if err != nil {
		t.Fatalf("chromium: %v\n%s", err, out)
	}
	if dst := os.Getenv("NARROWS_SCREENSHOT"); dst != "" {
		if data, err := os.ReadFile(shot); err == nil {
			_ = os.WriteFile(dst, data, 0o644)
		}
	}
	f, err := os.Open(shot)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	img, err := png.Decode(f)
	if err != nil {
		t.Fatalf("screenshot: %v", err)
	}
	counts := colourCounts(img)
	if len(counts) < 20 {
		t.Fatalf("screenshot has %d colours: blank", len(counts))
	}
	// The map sits below the fold in a 1400 x 1000 window only when the
	// page above it is long; the colours are counted over the picture
	// taken, so the page must show the map in its first screen or the
	// check says so.
	for _, c := range []struct{ name, hex string }{{"river", "#8FBCE0"}, {"major road", "#8E8478"}, {"scheme", "#F0E442"}, {"railway", "#4D4D4D"}} {
		if n := near(counts, c.hex, 10); n < 20 {
			t.Errorf("screenshot: %d pixels of the %s colour %s, want the layer visible", n, c.name, c.hex)
		}
	}
}

func colourCounts(img image.Image) map[color.RGBA]int {
	counts := map[color.RGBA]int{}
	b := img.Bounds()
	for y := b.Min.Y; y < b.Max.Y; y++ {
		for x := b.Min.X; x < b.Max.X; x++ {
			counts[color.RGBAModel.Convert(img.At(x, y)).(color.RGBA)]++
		}
	}
	return counts
}

// near counts the pixels within tol of hex in each channel (anti-aliased
// edges blend, the middles of lines keep the colour).
func near(counts map[color.RGBA]int, hex string, tol int) int {
	v, _ := strconv.ParseUint(strings.TrimPrefix(hex, "#"), 16, 32)
	want := [3]int{int(v >> 16 & 255), int(v >> 8 & 255), int(v & 255)}
	n := 0
	for c, k := range counts {
		if abs(int(c.R)-want[0]) <= tol && abs(int(c.G)-want[1]) <= tol && abs(int(c.B)-want[2]) <= tol {
			n += k
		}
	}
	return n
}

func abs(x int) int {
	if x < 0 {
		return -x
	}
	return x
}
