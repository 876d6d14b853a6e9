package stats_test

import (
	"fmt"

	"narrows/patterns/stats"
)

// Daily median speeds (km/h) of one district pair in the weeks before and
// after a new link opened.
func ExampleMannWhitneyU() {
	before := []float64{18.2, 17.5, 19.1, 16.8, 18.9, 17.7, 18.4}
	after := []float64{22.6, 21.9, 23.4, 20.8, 22.1, 24.0}
	r, err := stats.MannWhitneyU(after, before, stats.Auto)
	if err != nil {
		fmt.Println(err)
		return
	}
	shift := stats.HodgesLehmann(after, before)
	low, high := stats.HodgesLehmannCI(after, before, 0.95)
	fmt.Printf("U = %v, p = %.5f (%v)\n", r.U, r.P, r.Method)
	fmt.Printf("shift %+.2f km/h, 95 %% CI %+.2f to %+.2f\n", shift, low, high)
	// Output:
	// U = 42, p = 0.00117 (exact)
	// shift +4.40 km/h, 95 % CI +3.00 to +5.80
}

func ExampleFisherExact() {
	// Days on which a finding recurred, out of 30 analysed days per period.
	p, odds := stats.FisherExact([2][2]int{{18, 12}, {3, 27}})
	fmt.Printf("p = %.3g, odds ratio %.1f\n", p, odds)
	// Output:
	// p = 9.41e-05, odds ratio 13.5
}

func ExampleBenjaminiHochberg() {
	fmt.Printf("%.3f\n", stats.BenjaminiHochberg([]float64{0.01, 0.04, 0.03, 0.005}))
	// Output:
	// [0.020 0.040 0.040 0.020]
}

func ExampleMedian() {
	// Daily median speeds (km/h) of one pair over four mornings.
	fmt.Println(stats.Median([]float64{18.2, 17.5, 19.1, 16.8}))
	fmt.Println(stats.Median(nil))
	// Output:
	// 17.85
	// NaN
}
