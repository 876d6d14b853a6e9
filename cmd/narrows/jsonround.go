package main

import "math"

// Decimals of findings.json's numbers, each rounded for its meaning so
// that no float noise (30.000000000000004) reaches the file: trips whole,
// speeds to 0.1 km/h, ratios and shares to two decimals, as the workbook
// shows them; costs to 0.1 vehicle-km and 0.01 vehicle-hours per day.
const (
	tripsDecimals = 0
	kmhDecimals   = 1
	ratioDecimals = 2
	kmDecimals    = 1
	hoursDecimals = 2
)

// roundFor rounds x to d decimals, half away from zero; NaN and the
// infinities pass unchanged, and -0 becomes 0.
func roundFor(x float64, d int) float64 {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return x
	}
	p := math.Pow(10, float64(d))
	r := math.Round(x*p) / p
	if r == 0 {
		return 0
	}
	return r
}
