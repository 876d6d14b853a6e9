package geodesy_test

import (
	"fmt"

	"github.com/paulmach/orb"

	"narrows/partition/geodesy"
)

func ExampleGreatCircleMetres() {
	a, b := orb.Point{0, 0}, orb.Point{0, 1}
	fmt.Printf("%.1f km\n", geodesy.GreatCircleMetres(a, b)/1000)
	// Output: 111.2 km
}

func ExampleProjection() {
	p := geodesy.NewProjection(orb.Point{10, 60})
	x, y := p.Forward(orb.Point{10.01, 60.01})
	fmt.Printf("%.0f m east, %.0f m north\n", x, y)
	// Output: 556 m east, 1112 m north
}
