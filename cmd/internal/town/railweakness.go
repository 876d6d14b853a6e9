// The second planted weakness (Options.RailWeakness): a housing district
// across the railway from the jobs district, with no level crossing near.
// The jobs district then takes part in two separate weaknesses, one across
// the river and one across the railway, which share that one region but no
// region pair: the case that must give two findings, not one.

package town

// withRailWeakness moves the railway into the cell column east of the
// planted districts, takes away the level crossing of the arterial along
// the jobs district's southern edge (the next one is a cell further south)
// and puts a housing district in the part of that column east of the
// railway, south of the river.
func (l layout) withRailWeakness() layout {
	l.railCol = l.plantCol + 1
	l.bridgeCols = []int{3, 6}
	l.railGap = 2
	// Most of the share of the river crossing's housing district: a busy
	// pair, on a zone about half as large.
	l.railHousing = 0.8 * l.plantedHousing
	return l
}

// railGapRow reports whether grid row j is an arterial row without a level
// crossing: one of the railGap arterial rows south of the river.
func (l layout) railGapRow(j int) bool {
	top := l.riverRow * l.k
	return l.railGap > 0 && j%l.k == 0 && j <= top && j > top-l.railGap*l.k
}

// railDistrict records Town.RailHousing: the part of the railway's cell
// column east of the railway, between the jobs district's southern
// arterial and the river.
func (b *builder) railDistrict() {
	lay := b.lay
	if lay.railGap <= 0 {
		return
	}
	c := lay.cell()
	gap := lay.meander() + 0.15*lay.block
	inset := 0.1 * lay.block
	x0, x1 := lay.railX()+gap, float64(lay.railCol+1)*c-inset
	y0, y1 := lay.gyOf(lay.riverRow*lay.k)+inset, lay.riverY()-gap
	var ring []xy
	for _, q := range [][2]float64{{x0, y0}, {x1, y0}, {x1, y1}, {x0, y1}, {x0, y0}} {
		ring = append(ring, b.gridPos(q[0], q[1]))
	}
	d := District{Name: railHousingName, Centre: b.t.lonLat(b.gridPos((x0+x1)/2, (y0+y1)/2))}
	for _, p := range ring {
		d.area = append(d.area, b.t.lonLat(p))
	}
	b.t.RailHousing = d
}

// railHousingZone returns the index of the zone of Town.RailHousing, or -1
// when the town has no second weakness.
func (t *Town) railHousingZone(zones []zone) int {
	lay := t.lay
	if lay.railGap <= 0 {
		return -1
	}
	for zi := range zones {
		z := &zones[zi]
		if z.x0 == lay.railX() && z.y1 == lay.riverY() {
			return zi
		}
	}
	return -1
}

// plantRailHousing gives the rail housing district its residents (after
// the shares of the other zones are set, like the planted pair).
func (t *Town) plantRailHousing(zones []zone) {
	if r := t.railHousingZone(zones); r >= 0 {
		zones[r].population = t.lay.railHousing * t.lay.population
		zones[r].jobs *= 0.3
	}
}

// levelCrossingTags are the tags of a level crossing node: with the second
// weakness the railway is a busy main line whose crossings have full
// barriers (crossing:barrier=full, as mapped in OSM).
func (b *builder) levelCrossingTags() []tag {
	if b.lay.railGap > 0 {
		return []tag{{"crossing:barrier", "full"}, {"railway", "level_crossing"}}
	}
	return []tag{{"railway", "level_crossing"}}
}

// levelCrossingDelay is the mean delay at a level crossing node with the
// given tags: the full barriers of a busy main line are down for a large
// share of each hour, so the mean wait is long (90 s, an order of
// magnitude from memory); other crossings cost crossingDelay.
func levelCrossingDelay(tags []tag) float64 {
	if tagValue(tags, "crossing:barrier") == "full" {
		return 90
	}
	return crossingDelay
}

// railHousingName is the second planted district's name (invented).
const railHousingName = "Sidings housing"
