package stats

import (
	"math/rand/v2"
	"testing"
)

func BenchmarkMannWhitneyUExact8x365(b *testing.B) {
	r := rand.New(rand.NewPCG(1, 1))
	x, y := distinctSample(r, 8, 0.3), distinctSample(r, 365, 0)
	for b.Loop() {
		if _, err := MannWhitneyU(x, y, Exact); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkMannWhitneyUAsymptotic365x365(b *testing.B) {
	r := rand.New(rand.NewPCG(1, 1))
	x, y := distinctSample(r, 365, 0.1), distinctSample(r, 365, 0)
	for b.Loop() {
		if _, err := MannWhitneyU(x, y, Asymptotic); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkHodgesLehmannCI60x60(b *testing.B) {
	r := rand.New(rand.NewPCG(1, 1))
	x, y := distinctSample(r, 60, 0.3), distinctSample(r, 60, 0)
	for b.Loop() {
		HodgesLehmannCI(x, y, 0.95)
	}
}

func BenchmarkHodgesLehmannCI365x365(b *testing.B) {
	r := rand.New(rand.NewPCG(1, 1))
	x, y := distinctSample(r, 365, 0.3), distinctSample(r, 365, 0)
	for b.Loop() {
		HodgesLehmannCI(x, y, 0.95)
	}
}
