package town

import (
	"bytes"
	"context"
	"math"
	"testing"
)

// FuzzSimOptions feeds odd options to Generate and Simulate: they must
// return an error or a well-formed result, never panic. (The package reads
// no files; its inputs are its options.)
func FuzzSimOptions(f *testing.F) {
	f.Add("town", int64(1), int64(1), 1, 50, 1, 0.1, 0.08, 0)
	f.Add("city", int64(2), int64(3), 0, 0, 0, 0.0, 0.0, 1)
	f.Add("", int64(-5), int64(-7), -1, -1, -1, -1.0, 2.0, -3)
	f.Add("village", int64(0), int64(0), 2, 10, 200, math.NaN(), math.Inf(1), 5)
	f.Fuzz(func(t *testing.T, size string, seed, simSeed int64, days, trips, rounds int, incidents, variation float64, zoneNodes int) {
		tw, err := Generate(Options{Size: Size(size), Seed: seed})
		if err != nil {
			return
		}
		if tw.size == sizeCity {
			return // a city assignment takes seconds; Generate was the point
		}
		o := defaultSimOptions()
		o.Seed = simSeed
		o.Days = min(days, 2)
		o.TripsPerDay = min(trips, 200)
		o.MSARounds = min(rounds, 2)
		o.IncidentRate, o.DayVariation, o.ZoneNodes = incidents, variation, min(zoneNodes, 3)
		var buf bytes.Buffer
		st, err := tw.Simulate(context.Background(), o, &buf)
		if err != nil {
			return
		}
		if got := bytes.Count(buf.Bytes(), []byte("\n")) - 1; got != st.Trips {
			t.Fatalf("%d rows, Stats.Trips %d", got, st.Trips)
		}
	})
}
