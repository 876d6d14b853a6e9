package explore

import (
	"cmp"
	"context"
	"encoding/json"
	"fmt"
	"net/http"
	"net/http/httptest"
	"slices"
	"strings"
	"testing"
	"time"

	"github.com/paulmach/orb"

	"narrows/partition"
	"narrows/patterns"
	"narrows/regiongraph"
)

// gridStudy is a 4 x 4 grid of regions with 21 days of edges between
// neighbours; the pair 6-7 is slow and circuitous every day.
func gridStudy(t testing.TB) *Study {
	t.Helper()
	const side, cell = 4, 0.01
	p := &partition.Partition{Source: "grid"}
	for row := range side {
		for col := range side {
			x0, y0 := 10+float64(col)*cell, 50+float64(row)*cell
			p.Regions = append(p.Regions, partition.Region{
				ID:      row*side + col + 1,
				Name:    fmt.Sprintf("cell %d", row*side+col+1),
				Polygon: orb.Polygon{orb.Ring{{x0, y0}, {x0 + cell, y0}, {x0 + cell, y0 + cell}, {x0, y0 + cell}, {x0, y0}}},
				Point:   orb.Point{x0 + cell/2, y0 + cell/2},
			})
		}
	}
	p.Bound = orb.Bound{Min: orb.Point{10, 50}, Max: orb.Point{10 + side*cell, 50 + side*cell}}
	store := &regiongraph.Store{Meta: regiongraph.Meta{TimeZone: "UTC", Windows: []regiongraph.Window{{Name: "all", StartMinute: 0, EndMinute: 1440}}}}
	first := time.Date(2026, 3, 2, 0, 0, 0, 0, time.UTC)
	for d := range 21 {
		day := regiongraph.DayOf(first.AddDate(0, 0, d))
		for a := 1; a <= side*side; a++ {
			for _, b := range []int{a + 1, a + side} {
				if b > side*side || (b == a+1 && a%side == 0) {
					continue
				}
				for _, e := range [][2]int{{a, b}, {b, a}} {
					trips, speed, detour := 20+(a*7+d)%9, 9.0+float64((a+b+d)%5), 1.2+0.01*float64((a*b+d)%7)
					if (e[0] == 6 && e[1] == 7) || (e[0] == 7 && e[1] == 6) {
						trips, speed, detour = 40, 3, 2.4
					}
					straight := 1000.0
					dist := straight * detour
					store.Edges = append(store.Edges, regiongraph.Edge{Day: day, Window: 0, From: e[0], To: e[1], Trips: trips,
						SpeedMedian: speed, SpeedP25: speed, SpeedP75: speed, DetourMedian: detour, DetourP25: detour, DetourP75: detour,
						DistanceMedian: dist, DurationMedian: dist / speed,
						DistanceSum: dist * float64(trips), StraightSum: straight * float64(trips), DurationSum: dist / speed * float64(trips)})
				}
			}
		}
	}
	slices.SortFunc(store.Edges, func(a, b regiongraph.Edge) int {
		return cmp.Or(cmp.Compare(a.Day, b.Day), a.From-b.From, a.To-b.To)
	})
	return &Study{Title: "grid", Store: store, Regions: p, Scan: patterns.DefaultScanOptions(), Compare: patterns.DefaultCompareOptions()}
}

// FuzzRequests sends arbitrary bodies to the state-changing endpoints:
// the server answers every one with a JSON answer and a status below 500,
// never panics, and a refused request leaves the state as it was.
func FuzzRequests(f *testing.F) {
	for _, seed := range []struct{ path, body string }{
		{"/api/settings", `{"min_trips":5,"support":0.3,"k":1,"detour_floor":1.3,"speed_gate":true,"days":"all"}`},
		{"/api/settings", `{"min_trips":-3,"support":2}`},
		{"/api/settings", `{"before":"2026-03-02..2026-03-08","after":"2026-03-09..2026-03-22","min_trips":10,"support":0.3,"k":1,"detour_floor":1.3,"days":"all"}`},
		{"/api/settings", `{"from":"2026-02-30","support":0.3,"k":1,"days":"all"}`},
		{"/api/exclusions", `{"days":[{"from":"2026-03-03","to":"2026-03-04","reason":"works"}],"pairs":[{"a":6,"b":7,"reason":"ferry"}]}`},
		{"/api/exclusions", `{"pairs":[{"a":0,"b":-1,"reason":""}]}`},
		{"/api/exclusions", `{"days":[{"from":"0001-01-01","to":"9999-12-31","reason":"x"}]}`},
		{"/api/save", `{}`},
		{"/api/report", `{}`},
		{"/api/settings", `[`},
	} {
		f.Add(seed.path, seed.body)
	}
	srv, err := New(context.Background(), gridStudy(f))
	if err != nil {
		f.Fatal(err)
	}
	h := srv.Handler()
	f.Fuzz(func(t *testing.T, path, body string) {
		if !strings.HasPrefix(path, "/") {
			path = "/" + path
		}
		before := srv.Choices()
		req := httptest.NewRequest("POST", "/", strings.NewReader(body))
		req.URL.Path = path
		req.Header.Set("Content-Type", "application/json")
		req.Header.Set(TokenHeader, srv.Token())
		rec := httptest.NewRecorder()
		h.ServeHTTP(rec, req)
		if rec.Code >= 500 {
			t.Fatalf("POST %s %q: status %d %s", path, body, rec.Code, rec.Body)
		}
		// The API answers in JSON; other paths get the mux's own answers
		// (404, 405, a redirect to the clean path).
		api := path == "/api/settings" || path == "/api/exclusions" || path == "/api/save" || path == "/api/report"
		if api && !json.Valid(rec.Body.Bytes()) {
			t.Fatalf("POST %s %q: status %d, answer not JSON: %s", path, body, rec.Code, rec.Body)
		}
		if rec.Code != http.StatusOK && fmt.Sprint(srv.Choices()) != fmt.Sprint(before) {
			t.Fatalf("POST %s %q: refused with %d but changed the choices", path, body, rec.Code)
		}
	})
}

// TestGridStudy checks the fixture finds its planted pair, so that the
// fuzz test exercises a study with findings.
func TestGridStudy(t *testing.T) {
	srv, err := New(context.Background(), gridStudy(t))
	if err != nil {
		t.Fatal(err)
	}
	s := srv.State()
	found := false
	for _, f := range s.Findings {
		for _, e := range f.Edges {
			found = found || (e.From == 6 && e.To == 7) || (e.From == 7 && e.To == 6)
		}
	}
	if !found || len(s.Days) != 21 {
		t.Errorf("grid study: %d findings %v, %d days; want the pair 6-7 found on 21 days", len(s.Findings), s.Findings, len(s.Days))
	}
}
