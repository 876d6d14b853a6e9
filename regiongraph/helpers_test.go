package regiongraph

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
	"time"

	"github.com/paulmach/orb"

	"narrows/partition"
)

// gridPartition tiles [lon0, lon0+nx*step] x [lat0, lat0+ny*step] with
// rectangles, ids 1..nx*ny row by row from the south-west.
func gridPartition(nx, ny int, lon0, lat0, step float64) *partition.Partition {
	p := &partition.Partition{Source: "grid",
		Bound: orb.Bound{Min: orb.Point{lon0, lat0}, Max: orb.Point{lon0 + float64(nx)*step, lat0 + float64(ny)*step}}}
	for j := 0; j < ny; j++ {
		for i := 0; i < nx; i++ {
			x0, y0 := lon0+float64(i)*step, lat0+float64(j)*step
			x1, y1 := lon0+float64(i+1)*step, lat0+float64(j+1)*step // shared exactly with the neighbour
			ring := orb.Ring{{x0, y0}, {x1, y0}, {x1, y1}, {x0, y1}, {x0, y0}}
			p.Regions = append(p.Regions, partition.Region{ID: j*nx + i + 1, Polygon: orb.Polygon{ring},
				Point: orb.Point{(x0 + x1) / 2, (y0 + y1) / 2}})
		}
	}
	return p
}

// gridCell is the brute-force region of a point on a gridPartition, with the
// same half-open rule ([x0, x1) x [y0, y1)).
func gridCell(nx, ny int, lon0, lat0, step float64, p [2]float64) int {
	// Compare with the very boundary values gridPartition computes, so that
	// points on grid lines are judged the same way.
	if p[0] < lon0 || p[1] < lat0 || p[0] >= lon0+float64(nx)*step || p[1] >= lat0+float64(ny)*step {
		return 0
	}
	i, j := 0, 0
	for i+1 < nx && p[0] >= lon0+float64(i+1)*step {
		i++
	}
	for j+1 < ny && p[1] >= lat0+float64(j+1)*step {
		j++
	}
	return j*nx + i + 1
}

// createFile writes a new file at path with write.
func createFile(path string, write func(w io.Writer) error) error {
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	if err := write(f); err != nil {
		f.Close()
		return err
	}
	return f.Close()
}

func writeTemp(t testing.TB, name, content string) string {
	t.Helper()
	path := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(path, []byte(content), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

const tripHeader = "trip_id,start_time,end_time,start_lon,start_lat,end_lon,end_lat,distance_m\n"

func ingestString(t testing.TB, p *partition.Partition, format Format, csv string, opts Options) (*Store, error) {
	t.Helper()
	name := "trips.csv"
	if format == FormatGPX {
		name = "track.gpx"
	}
	path := writeTemp(t, name, csv)
	return Ingest(context.Background(), p, "test", []Input{{Path: path, Format: format}}, opts)
}

// checkQuality asserts Read = Used + sum of Rejected and that every reason is
// reported.
func checkQuality(t testing.TB, q Quality) {
	t.Helper()
	sum := q.Used
	for _, r := range RejectReasons() {
		n, ok := q.Rejected[string(r)]
		if !ok {
			t.Errorf("reason %q missing from quality", r)
		}
		sum += n
	}
	if len(q.Rejected) != len(RejectReasons()) {
		t.Errorf("quality has %d reasons, want %d", len(q.Rejected), len(RejectReasons()))
	}
	if sum != q.Read {
		t.Errorf("read %d != used %d + rejected (sum %d)", q.Read, q.Used, sum-q.Used)
	}
}

func nonZeroReasons(q Quality) string {
	var parts []string
	for _, r := range RejectReasons() {
		if q.Rejected[string(r)] != 0 {
			parts = append(parts, fmt.Sprintf("%s=%d", r, q.Rejected[string(r)]))
		}
	}
	return strings.Join(parts, " ")
}

// type7 is the brute-force quantile: sort a copy, interpolate between ranks.
func type7(values []float64, p float64) float64 {
	s := slices.Clone(values)
	slices.Sort(s)
	h := float64(len(s)-1) * p
	lo := math.Floor(h)
	if int(lo)+1 >= len(s) {
		return s[len(s)-1]
	}
	return s[int(lo)] + (h-lo)*(s[int(lo)+1]-s[int(lo)])
}

func near(a, b, rel float64) bool {
	return math.Abs(a-b) <= rel*math.Max(math.Abs(a), math.Abs(b))+1e-9
}

func mustZone(t testing.TB, name string) *time.Location {
	t.Helper()
	loc, err := time.LoadLocation(name)
	if err != nil {
		t.Fatal(err)
	}
	return loc
}

// testDay returns the day written s (YYYY-MM-DD), which must be one.
func testDay(s string) Day {
	d, err := ParseDay(s)
	if err != nil {
		panic(err)
	}
	return d
}

// testWindow returns the index of the named window of s, which must have
// one.
func testWindow(s *Store, name string) WindowIndex {
	w, ok := s.Meta.WindowIndex(name)
	if !ok {
		panic("no window " + name)
	}
	return w
}

// withoutTotals checks the day totals that got, a store read back,
// records against those of want's edges, to the bit, and returns got
// without them, so that the rest compares with reflect.DeepEqual.
func withoutTotals(t testing.TB, want, got *Store) *Store {
	t.Helper()
	if got.totalsRecorded {
		if w := totalsOf(want.Meta.Windows, want.Edges); !slices.Equal(w, got.totals) {
			t.Errorf("the day totals read back differ from the edges':\nwant %+v\ngot  %+v", w, got.totals)
		}
	}
	out := *got
	out.totals, out.totalsRecorded = nil, false
	return &out
}

// stripTotals removes the day totals from the manifest of the dataset at
// dir, as a dataset written before them lists its days.
func stripTotals(t testing.TB, dir string) {
	t.Helper()
	editManifest(t, dir, func(m map[string]any) {
		for _, d := range m["days"].([]any) {
			delete(d.(map[string]any), "totals")
		}
	})
}

// editManifest has edit change the manifest of the dataset at dir, as
// decoded JSON.
func editManifest(t testing.TB, dir string, edit func(m map[string]any)) {
	t.Helper()
	path := filepath.Join(dir, ManifestName)
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var m map[string]any
	if err := json.Unmarshal(data, &m); err != nil {
		t.Fatal(err)
	}
	edit(m)
	if data, err = json.MarshalIndent(m, "", "  "); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, data, 0o644); err != nil {
		t.Fatal(err)
	}
}
