package patterns_test

import (
	"context"
	"fmt"

	"narrows/partition/geodesy"
	"narrows/patterns"
	"narrows/regiongraph"
)

func ExampleScanStore() {
	// Ten mornings in a fictional town. The pair 10>11>12 across the river
	// jams on eight of them; the other pairs are busy but quick or direct.
	store := &regiongraph.Store{Meta: regiongraph.Meta{
		Windows: []regiongraph.Window{{Name: "am", StartMinute: 420, EndMinute: 600}},
	}}
	edge := func(text string, from, to, trips int, speed, detour float64) regiongraph.Edge {
		straight := 2000 * float64(trips) // 2 km a trip
		day, _ := regiongraph.ParseDay(text)
		// Window 0: the store's first window, "am".
		return regiongraph.Edge{Day: day, Window: 0, From: from, To: to, Trips: trips,
			SpeedMedian: speed, DetourMedian: detour,
			StraightSum: straight, DistanceSum: straight * detour, DurationSum: straight * detour / speed}
	}
	for d := 1; d <= 10; d++ {
		day := fmt.Sprintf("2025-03-%02d", d)
		if d%5 != 0 {
			store.Edges = append(store.Edges, edge(day, 10, 11, 80, 3, 2.2), edge(day, 11, 12, 60, 2.8, 2.0))
		}
		store.Edges = append(store.Edges,
			edge(day, 12, 20, 150, 11, 1.2), edge(day, 20, 21, 90, 12, 1.4), edge(day, 21, 22, 40, 9, 1.1))
	}
	scan, err := patterns.ScanStore(context.Background(), store, patterns.DefaultScanOptions())
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, f := range scan.Findings {
		fmt.Printf("%d. %s on %d of %d days: %.0f extra veh-km, %.1f extra veh-h a day\n",
			f.Rank, f.ID, len(f.Days), len(scan.Days), f.ExtraKMPerDay, f.ExtraHoursPerDay)
	}
	// Output:
	// 1. 10>11+11>12 on 8 of 10 days: 250 extra veh-km, 37.7 extra veh-h a day
}

func ExampleCompare() {
	// Ten mornings before and ten after a new bridge in a fictional town.
	// Before, the pair 10>11 across the river jams on eight mornings of ten;
	// after, its traffic crosses the bridge, fast and direct.
	store := &regiongraph.Store{Meta: regiongraph.Meta{
		Windows: []regiongraph.Window{{Name: "am", StartMinute: 420, EndMinute: 600}},
	}}
	edge := func(text string, from, to, trips int, speed, detour float64) regiongraph.Edge {
		straight := 2000 * float64(trips) // 2 km a trip
		day, _ := regiongraph.ParseDay(text)
		// Window 0: the store's first window, "am".
		return regiongraph.Edge{Day: day, Window: 0, From: from, To: to, Trips: trips,
			SpeedMedian: speed, DetourMedian: detour,
			StraightSum: straight, DistanceSum: straight * detour, DurationSum: straight * detour / speed}
	}
	for _, month := range []string{"03", "05"} {
		for d := 1; d <= 10; d++ {
			day := fmt.Sprintf("2025-%s-%02d", month, d)
			wobble := 0.1 * float64(d%3) // day-to-day spread, m/s
			switch {
			case month == "05":
				store.Edges = append(store.Edges, edge(day, 10, 11, 80, 10+wobble, 1.15))
			case d%5 != 0:
				store.Edges = append(store.Edges, edge(day, 10, 11, 80, 3+wobble, 2.2))
			}
			store.Edges = append(store.Edges,
				edge(day, 12, 20, 150, 11+wobble, 1.2), edge(day, 20, 21, 90, 12, 1.4), edge(day, 21, 22, 40, 9, 1.1))
		}
	}
	before := patterns.DefaultScanOptions()
	before.From, before.To = "2025-03-01", "2025-03-10"
	after := patterns.DefaultScanOptions()
	after.From, after.To = "2025-05-01", "2025-05-10"

	// Without a focus point, the comparison needs no regions.
	c, err := patterns.Compare(context.Background(), store, nil, before, after, patterns.DefaultCompareOptions())
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, a := range c.Assessments {
		cost := a.Effects[patterns.Cost]
		fmt.Printf("%s %s on %s: cost %.1f -> %.1f veh-h/day, adjusted %+.1f (%+.0f %%)\n", a.Finding.ID, a.Verdict, a.Basis,
			cost.Before, cost.After, cost.Adjusted.Shift, 100*cost.Relative)
		fmt.Printf("  speed %+.1f km/h, detour %+.2f; comparison pairs %d; on the skyline %d of %d days, then %d of %d\n",
			geodesy.KMH(a.Effects[patterns.Speed].Raw), a.Effects[patterns.Detour].Raw, len(a.Group.Edges),
			a.DaysBefore, a.TotalBefore, a.DaysAfter, a.TotalAfter)
	}
	// Three other pairs are too few for a comparison group (default at
	// least 5), so the change is the finding's own. Before, 80 trips a
	// morning drive 4.4 km at about 3.1 m/s where 2 km at the reference
	// 30 km/h would take 4 minutes: 80 × (23.7 − 4.0) min ≈ 26 veh-h.
	// Output:
	// 10>11 cleared on cost: cost 26.2 -> 0.0 veh-h/day, adjusted -26.2 (-100 %)
	//   speed +25.2 km/h, detour -1.05; comparison pairs 0; on the skyline 8 of 10 days, then 0 of 10
}
