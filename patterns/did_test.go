package patterns

import (
	"context"
	"math"
	"math/rand/v2"
	"sort"
	"testing"
)

// bruteMedian is the median by sorting a copy.
func bruteMedian(v []float64) float64 {
	s := append([]float64(nil), v...)
	sort.Float64s(s)
	n := len(s)
	if n%2 == 1 {
		return s[n/2]
	}
	return (s[n/2-1] + s[n/2]) / 2
}

// TestAdjustedCostAgainstDirectEnumeration recomputes each finding's
// adjusted cost change straight from the store's rows, independently of the
// comparison's code: per day the finding's extra vehicle-hours, the
// comparison group's vehicle-hours travelled, the group's index (over its
// before median), the adjusted value, and then the Hodges-Lehmann estimate
// by direct enumeration of all after-minus-before differences (the
// definition of the estimator; a brute-force oracle). It also checks the
// matching by brute force: no eligible pair in the group's distance band
// outside the group is nearer than the group's farthest member.
func TestAdjustedCostAgainstDirectEnumeration(t *testing.T) {
	r := rand.New(rand.NewPCG(2026, 1))
	dayList := append(days("2026-03-02", 28), days("2026-05-04", 28)...)
	store := syntheticStore(r, dayList, plantedChange(28), realistic)
	before, after := scanPeriod("2026-03-02", "2026-03-29", nil), scanPeriod("2026-05-04", "2026-05-31", nil)
	opts := DefaultCompareOptions()
	c, err := Compare(context.Background(), store, gridPartition(), before, after, opts)
	if err != nil {
		t.Fatal(err)
	}
	ref := c.Before.Options.ReferenceSpeed
	period := func(day string) int {
		switch {
		case day >= "2026-03-02" && day <= "2026-03-29":
			return 0
		case day >= "2026-05-04" && day <= "2026-05-31":
			return 1
		}
		return -1
	}
	inFinding := map[EdgeKey]bool{}
	for _, a := range c.Assessments {
		for _, e := range a.Finding.Edges {
			inFinding[EdgeKey{From: e.From, To: e.To}] = true
		}
	}
	for _, a := range c.Assessments {
		own, grp := map[EdgeKey]bool{}, map[EdgeKey]bool{}
		for _, e := range a.Finding.Edges {
			own[EdgeKey{From: e.From, To: e.To}] = true
		}
		for _, k := range a.Group.Edges {
			grp[k] = true
		}
		type dayValues struct{ cost, trips, groupHours float64 }
		byDay := map[string]*dayValues{}
		for _, e := range store.Edges {
			k := EdgeKey{From: e.From, To: e.To}
			if period(e.Day.String()) < 0 || e.Trips < before.Skyline.MinTrips || (!own[k] && !grp[k]) {
				continue
			}
			v := byDay[e.Day.String()]
			if v == nil {
				v = &dayValues{}
				byDay[e.Day.String()] = v
			}
			if own[k] {
				v.cost += math.Max(0, e.DurationSum-e.StraightSum/ref) / 3600
				v.trips += float64(e.Trips)
			} else {
				v.groupHours += e.DurationSum
			}
		}
		var cost, hours [2][]float64
		for _, d := range dayList {
			v := byDay[d]
			if v == nil || v.trips == 0 || v.groupHours == 0 {
				continue
			}
			p := period(d)
			cost[p] = append(cost[p], v.cost)
			hours[p] = append(hours[p], v.groupHours)
		}
		base := bruteMedian(hours[0])
		var adj [2][]float64
		for p := range adj {
			for i := range cost[p] {
				adj[p] = append(adj[p], cost[p][i]/(hours[p][i]/base))
			}
		}
		var diffs []float64
		for _, x := range adj[1] {
			for _, y := range adj[0] {
				diffs = append(diffs, x-y)
			}
		}
		want := bruteMedian(diffs)
		got := a.Effects[Cost].Adjusted.Shift
		if math.Abs(got-want) > 1e-9*math.Max(1, math.Abs(want)) {
			t.Errorf("%s: adjusted cost shift %v, direct enumeration %v", a.Finding.ID, got, want)
		}
		if b := bruteMedian(cost[0]); math.Abs(a.Effects[Cost].Before-b) > 1e-9 {
			t.Errorf("%s: cost before %v, direct %v", a.Finding.ID, a.Effects[Cost].Before, b)
		}
		t.Logf("%s: adjusted cost shift %.4f veh-h/day (enumeration of %d differences: %.4f), group of %d", a.Finding.ID, got, len(diffs), want, len(a.Group.Edges))
	}

	// The matching by brute force: pairs eligible by the definition
	// (outside every finding and the focus, trips on at least half of each
	// period's days), scored on the before period's sums.
	type sums struct {
		days                  [2]int
		trips, dist, str, dur float64
	}
	all := map[EdgeKey]*sums{}
	for _, e := range store.Edges {
		p := period(e.Day.String())
		if p < 0 || e.Trips < before.Skyline.MinTrips {
			continue
		}
		k := EdgeKey{From: e.From, To: e.To}
		s := all[k]
		if s == nil {
			s = &sums{}
			all[k] = s
		}
		s.days[p]++
		if p == 0 {
			s.trips += float64(e.Trips)
			s.dist += e.DistanceSum
			s.str += e.StraightSum
			s.dur += e.DurationSum
		}
	}
	var pool []EdgeKey
	for k, s := range all {
		if !inFinding[k] && s.days[0] >= 14 && s.days[1] >= 14 {
			pool = append(pool, k)
		}
	}
	if len(pool) != c.PoolSize {
		t.Errorf("pool of %d pairs, brute force %d", c.PoolSize, len(pool))
	}
	var detours, logSpeeds []float64
	for _, k := range pool {
		s := all[k]
		detours = append(detours, s.dist/s.str)
		logSpeeds = append(logSpeeds, math.Log(s.dist/s.dur))
	}
	madOf := func(v []float64) float64 {
		s := append([]float64(nil), v...)
		sort.Float64s(s)
		m := s[len(s)/2]
		for i := range s {
			s[i] = math.Abs(s[i] - m)
		}
		sort.Float64s(s)
		if s[len(s)/2] == 0 {
			return 1
		}
		return s[len(s)/2]
	}
	sd, sv := madOf(detours), madOf(logSpeeds)
	for _, a := range c.Assessments {
		var fs sums
		for _, e := range a.Finding.Edges {
			if s := all[EdgeKey{From: e.From, To: e.To}]; s != nil {
				fs.trips += s.trips
				fs.dist += s.dist
				fs.str += s.str
				fs.dur += s.dur
			}
		}
		if fs.trips == 0 {
			continue // an after-only finding is matched on its after period
		}
		score := func(s *sums) float64 {
			x := (s.dist/s.str - fs.dist/fs.str) / sd
			y := (math.Log(s.dist/s.dur) - math.Log(fs.dist/fs.dur)) / sv
			return x*x + y*y
		}
		inBand := func(s *sums) bool {
			ratio := (s.str / s.trips) / (fs.str / fs.trips)
			return ratio >= 1/a.Group.Band-1e-12 && ratio <= a.Group.Band+1e-12
		}
		worst := 0.0
		grp := map[EdgeKey]bool{}
		for _, k := range a.Group.Edges {
			grp[k] = true
			if !inBand(all[k]) {
				t.Errorf("%s: group pair %v outside the band %v", a.Finding.ID, k, a.Group.Band)
			}
			worst = math.Max(worst, score(all[k]))
		}
		for _, k := range pool {
			if !grp[k] && inBand(all[k]) && score(all[k]) < worst-1e-9 {
				t.Errorf("%s: pair %v (score %.4f) left out of a group whose farthest scores %.4f", a.Finding.ID, k, score(all[k]), worst)
			}
		}
	}
}
