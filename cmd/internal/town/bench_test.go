package town

import (
	"context"
	"io"
	"testing"
)

func BenchmarkGenerateCity(b *testing.B) {
	for b.Loop() {
		if _, err := Generate(Options{Size: sizeCity, Seed: 1}); err != nil {
			b.Fatal(err)
		}
	}
}

// benchSimulate simulates one weekday on a town of the given size, with
// the network state built inside the timing (one assignment per day).
func benchSimulate(b *testing.B, size Size, trips int) {
	tw, err := Generate(Options{Size: size, Seed: 1})
	if err != nil {
		b.Fatal(err)
	}
	o := defaultSimOptions()
	o.Days, o.TripsPerDay = 1, trips
	var n int
	for b.Loop() {
		st, err := tw.Simulate(context.Background(), o, io.Discard)
		if err != nil {
			b.Fatal(err)
		}
		n += st.Trips
	}
	b.ReportMetric(float64(n)/b.Elapsed().Seconds(), "trips/s")
}

func BenchmarkSimulateTownDay(b *testing.B) { benchSimulate(b, SizeTown, 10000) }
func BenchmarkSimulateCityDay(b *testing.B) { benchSimulate(b, sizeCity, 300000) }

// BenchmarkSimulateTownDemo is the demo: eight weeks of the link scenario.
func BenchmarkSimulateTownDemo(b *testing.B) {
	tw, err := Generate(defaultOptions())
	if err != nil {
		b.Fatal(err)
	}
	p, _ := Scenario("link")
	o := p.SimOptions(1)
	var n int
	for b.Loop() {
		st, err := tw.Simulate(context.Background(), o, io.Discard)
		if err != nil {
			b.Fatal(err)
		}
		n += st.Trips
	}
	b.ReportMetric(float64(n)/b.Elapsed().Seconds(), "trips/s")
}
