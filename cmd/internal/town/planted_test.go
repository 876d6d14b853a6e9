package town

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"sort"
	"testing"

	"narrows/partition"
)

// shortPlan is the link scenario cut to one week before and one after.
func shortPlan(t *testing.T, kind string, trips int) (Plan, SimOptions) {
	t.Helper()
	p, err := Scenario(kind)
	if err != nil {
		t.Fatal(err)
	}
	mid := p.start.AddDate(0, 0, 7)
	p.days, p.Before.To, p.After.From, p.After.To = 14, mid, mid, mid.AddDate(0, 0, 7)
	if p.LinkOpens != nil {
		p.LinkOpens = &mid
	}
	p.tripsPerDay = trips
	return p, p.SimOptions(2)
}

// TestPlantedWeakness reads the simulated trips back from the CSV and
// checks the planted truth: before the link, trips between the housing and
// the jobs district detour far (mean ratio > 1.6) and are slower than the
// typical trip; after it the detour falls. The control scenario keeps it.
func TestPlantedWeakness(t *testing.T) {
	tw, err := Generate(defaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	for _, kind := range []string{"link", "control"} {
		t.Run(kind, func(t *testing.T) {
			p, o := shortPlan(t, kind, 3000)
			data, st := simulate(t, tw, o)
			trips := readTrips(t, bytes.NewReader(data))
			if len(trips) != st.Trips {
				t.Fatalf("read %d trips, Stats says %d", len(trips), st.Trips)
			}
			before := between(trips, tw.Housing.area, tw.Jobs.area, p.Before.From, p.Before.To)
			after := between(trips, tw.Housing.area, tw.Jobs.area, p.After.From, p.After.To)
			t.Logf("before: %d trips, detour %.2f, speed %.1f km/h (all trips: detour %.2f, speed %.1f)", before.n, before.meanDetour, before.meanSpeed, before.allMedianDetour, before.allMedianSpeed)
			t.Logf("after:  %d trips, detour %.2f, speed %.1f km/h (all trips: detour %.2f, speed %.1f)", after.n, after.meanDetour, after.meanSpeed, after.allMedianDetour, after.allMedianSpeed)
			if before.n < 100 || after.n < 100 {
				t.Fatalf("too few trips between the districts: %d before, %d after", before.n, after.n)
			}
			if before.meanDetour <= 1.6 {
				t.Errorf("before: mean detour %.2f, want > 1.6", before.meanDetour)
			}
			if before.meanSpeed >= 0.9*before.allMedianSpeed {
				t.Errorf("before: speed %.1f km/h, want below 0.9 x the median %.1f", before.meanSpeed, before.allMedianSpeed)
			}
			switch kind {
			case "link":
				if after.meanDetour > before.meanDetour-1 || after.meanDetour > 1.8 {
					t.Errorf("after the link: mean detour %.2f (before %.2f), want a fall by more than 1 to at most 1.8", after.meanDetour, before.meanDetour)
				}
				if len(st.assignments) != 2 || st.assignments[0].WithLink || !st.assignments[1].WithLink {
					t.Errorf("assignments %+v, want without then with the link", st.assignments)
				}
			case "control":
				if r := after.meanDetour / before.meanDetour; r < 0.9 || r > 1.1 {
					t.Errorf("control: detour %.2f after vs %.2f before", after.meanDetour, before.meanDetour)
				}
				if len(st.assignments) != 1 || st.assignments[0].WithLink {
					t.Errorf("assignments %+v, want one without the link", st.assignments)
				}
			}
		})
	}
}

// TestPlantedPairTopsRegions partitions the town and groups the before
// trips by region pair: the planted pair is among the three busiest pairs
// and has the longest median detour of all pairs with at least 50 trips.
func TestPlantedPairTopsRegions(t *testing.T) {
	tw, err := Generate(defaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(t.TempDir(), "town.osm")
	f, err := os.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	if err := tw.WriteOSM(f, false); err != nil {
		t.Fatal(err)
	}
	if err := f.Close(); err != nil {
		t.Fatal(err)
	}
	part, err := partition.ReadFile(context.Background(), path, studyOptions())
	if err != nil {
		t.Fatal(err)
	}
	h, j := regionOf(part, tw.Housing.Centre), regionOf(part, tw.Jobs.Centre)
	p, o := shortPlan(t, "control", 3000)
	o.Days = 7
	data, _ := simulate(t, tw, o)
	type key struct{ a, b int }
	detours := map[key][]float64{}
	for _, c := range readTrips(t, bytes.NewReader(data)) {
		if c.start.Before(p.Before.From) || !c.start.Before(p.Before.To) {
			continue
		}
		a, b := regionOf(part, c.o), regionOf(part, c.d)
		if a == 0 || b == 0 || a == b {
			continue
		}
		detours[key{a, b}] = append(detours[key{a, b}], c.detour())
	}
	type row struct {
		k      key
		n      int
		detour float64
	}
	var rows []row
	for k, d := range detours {
		rows = append(rows, row{k, len(d), median(d)})
	}
	sort.Slice(rows, func(x, y int) bool {
		if rows[x].n != rows[y].n {
			return rows[x].n > rows[y].n
		}
		return rows[x].k.a < rows[y].k.a || (rows[x].k.a == rows[y].k.a && rows[x].k.b < rows[y].k.b)
	})
	planted := func(k key) bool { return k == key{h, j} || k == key{j, h} }
	rank := -1
	for i, r := range rows {
		if planted(r.k) {
			rank = i
			break
		}
	}
	t.Logf("planted pair %d-%d: rank %d by trips among %d pairs; top: %+v", h, j, rank+1, len(rows), rows[:min(4, len(rows))])
	if rank < 0 || rank > 2 {
		t.Errorf("planted pair ranks %d by trips, want top 3", rank+1)
	}
	var bestOther float64
	var plantedDetour float64
	for _, r := range rows {
		if r.n < 50 {
			continue
		}
		if planted(r.k) {
			plantedDetour = max(plantedDetour, r.detour)
		} else {
			bestOther = max(bestOther, r.detour)
		}
	}
	if plantedDetour <= bestOther {
		t.Errorf("planted pair median detour %.2f, another pair has %.2f", plantedDetour, bestOther)
	}
}
