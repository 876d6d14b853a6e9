package main

import (
	"context"
	"net/http"
	"net/http/httptest"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"narrows/cmd/internal/explore"
	"narrows/patterns"
	"narrows/regiongraph"
)

// cityYear reads the day graphs of a simulated city from the folder in
// $NARROWS_CITY (graphs.parquet and regions.geojson, as simulate --size city
// and ingest write them) and stretches them to $NARROWS_CITY_DAYS days
// (default 365) by repeating the simulated days, each copy shifted to the
// next free dates. $NARROWS_CITY_MIN_TRIPS (default 1: every edge) keeps
// only edges with at least that many trips, so a year fits in memory;
// $NARROWS_CITY_SCAN_MIN_TRIPS (default: the scan's default) sets the
// scan's minimum, since a simulated city sample may have no pair with the
// default's trips a day.
func cityYear(b *testing.B) *explore.Study {
	b.Helper()
	dir := os.Getenv("NARROWS_CITY")
	if dir == "" {
		b.Skip("set NARROWS_CITY to a folder with graphs.parquet and regions.geojson of a simulated city")
	}
	days, minTrips := 365, 1
	if v := os.Getenv("NARROWS_CITY_DAYS"); v != "" {
		days, _ = strconv.Atoi(v)
	}
	if v := os.Getenv("NARROWS_CITY_MIN_TRIPS"); v != "" {
		minTrips, _ = strconv.Atoi(v)
	}
	graphs := filepath.Join(dir, "graphs.parquet")
	src, err := regiongraph.ReadFileOptions(graphs, regiongraph.ReadOptions{MinTrips: minTrips})
	if err != nil {
		b.Fatal(err)
	}
	regions, err := regionsFor(src, filepath.Join(dir, "regions.geojson"), graphs, true, readRegions)
	if err != nil {
		b.Fatal(err)
	}
	// The simulated days, in order, then the year as copies of them.
	var srcDays []regiongraph.Day
	byDay := map[regiongraph.Day][]regiongraph.Edge{}
	for _, e := range src.Edges {
		if len(byDay[e.Day]) == 0 {
			srcDays = append(srcDays, e.Day)
		}
		byDay[e.Day] = append(byDay[e.Day], e)
	}
	first := srcDays[0]
	year := &regiongraph.Store{Meta: src.Meta}
	n := 0
	for d := range days {
		n += len(byDay[srcDays[d%len(srcDays)]])
	}
	year.Edges = make([]regiongraph.Edge, 0, n)
	for d := range days {
		day := first.AddDays(d)
		for _, e := range byDay[srcDays[d%len(srcDays)]] {
			e.Day = day
			year.Edges = append(year.Edges, e)
		}
	}
	at := map[int]int{}
	for _, e := range year.Edges {
		for _, k := range []int{2, 5, 10} {
			if e.Trips >= k {
				at[k]++
			}
		}
	}
	b.Logf("edges with at least 2, 5, 10 trips: %d, %d, %d", at[2], at[5], at[10])
	src, byDay = nil, nil
	b.Logf("%d regions, %d edges on %d days (from %d simulated days, edges of at least %d trips)", len(regions.Regions), len(year.Edges), days, len(srcDays), minTrips)
	opts := patterns.DefaultScanOptions()
	if v := os.Getenv("NARROWS_CITY_SCAN_MIN_TRIPS"); v != "" {
		opts.Skyline.MinTrips, _ = strconv.Atoi(v)
	}
	return &explore.Study{Title: "city year", Store: year, Regions: regions,
		Scan: opts, Compare: patterns.DefaultCompareOptions()}
}

// BenchmarkExploreCityYear is the server's answer to a change on a year
// of day graphs of a simulated city held in memory, at the default scan
// options otherwise: decoding, the analysis, the day strip, the map and
// the JSON of the state. "min-trips" alternates the minimum of trips
// between the study's and one more, "support" the support between 0.3 and
// 0.35, so that every request re-scans; "cached" is the server as it
// runs, "uncached" derives everything afresh on every request (the
// reference of the cache). heap-MiB is the heap in use after the study is
// loaded and analysed once.
func BenchmarkExploreCityYear(b *testing.B) {
	st := cityYear(b)
	for _, change := range []string{"min-trips", "support"} {
		for _, cached := range []bool{true, false} {
			name := change + "/cached"
			if !cached {
				name = change + "/uncached"
			}
			b.Run(name, func(b *testing.B) {
				study := *st
				study.NoCache = !cached
				benchmarkChange(b, &study, change)
			})
		}
	}
}

func benchmarkChange(b *testing.B, st *explore.Study, change string) {
	runtime.GC()
	srv, err := explore.New(context.Background(), st)
	if err != nil {
		b.Fatal(err)
	}
	runtime.GC()
	var ms runtime.MemStats
	runtime.ReadMemStats(&ms)
	heap := float64(ms.HeapInuse) / (1 << 20)
	h := srv.Handler()
	set := srv.State().Settings
	i := 0
	size := 0
	cpu0 := processCPU()
	for b.Loop() {
		switch change {
		case "min-trips":
			set.MinTrips = st.Scan.Skyline.MinTrips + i%2
		case "support":
			set.Support = 0.3 + 0.05*float64(i%2)
		}
		i++
		req := httptest.NewRequest("POST", "/api/settings", strings.NewReader(settingsJSON(set)))
		req.Header.Set("Content-Type", "application/json")
		req.Header.Set(explore.TokenHeader, srv.Token())
		rec := httptest.NewRecorder()
		h.ServeHTTP(rec, req)
		if rec.Code != http.StatusOK {
			b.Fatalf("settings: %d %s", rec.Code, rec.Body)
		}
		size = rec.Body.Len()
	}
	// CPU time of the process per request, garbage collection included:
	// a figure that a busy shared machine inflates less than the wall time.
	b.ReportMetric(float64((processCPU()-cpu0).Milliseconds())/float64(i), "cpu-ms/op")
	s := srv.State()
	b.ReportMetric(float64(size)/1024, "response-KiB")
	b.ReportMetric(float64(len(s.Findings)), "findings")
	b.ReportMetric(heap, "heap-MiB")
}

// processCPU returns the CPU time, user and system, the process has used.
func processCPU() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}
