package patterns

// networkChange compares the daily totals over every usable pair of the
// window: trips per day, travel time per trip (vehicle-hours over trips)
// and speed (vehicle-km over vehicle-hours).
func networkChange(pd *periodData) NetworkChange {
	var series [2][3][]float64
	for p := range 2 {
		for _, t := range pd.network[p] {
			if t.trips == 0 {
				continue
			}
			series[p][0] = append(series[p][0], t.trips)
			series[p][1] = append(series[p][1], t.durationSum/t.trips)
			series[p][2] = append(series[p][2], t.distanceSum/t.durationSum)
		}
	}
	return NetworkChange{
		Trips:      effect(series[0][0], series[1][0], nil, nil, false),
		TravelTime: effect(series[0][1], series[1][1], nil, nil, false),
		Speed:      effect(series[0][2], series[1][2], nil, nil, false),
	}
}
