package regiongraph

import (
	"context"
	"math/rand/v2"
	"strings"
	"testing"

	"github.com/paulmach/orb"

	"narrows/partition"
)

func TestLocatorGridAgainstBruteForce(t *testing.T) {
	const nx, ny, lon0, lat0, step = 7, 5, 2.0, 40.0, 0.01
	loc, _ := newLocator(gridPartition(nx, ny, lon0, lat0, step))
	rng := rand.New(rand.NewPCG(3, 4))
	for i := 0; i < 20000; i++ {
		var p orb.Point
		if i%2 == 0 {
			p = orb.Point{lon0 - 0.005 + rng.Float64()*(nx*step+0.01), lat0 - 0.005 + rng.Float64()*(ny*step+0.01)}
		} else {
			// on grid lines and corners: the half-open rule must pick exactly one
			p = orb.Point{lon0 + float64(rng.IntN(nx+1))*step, lat0 + float64(rng.IntN(ny+1))*step}
			if rng.IntN(2) == 0 {
				p[1] = lat0 + rng.Float64()*ny*step
			}
		}
		want := gridCell(nx, ny, lon0, lat0, step, p)
		if got := loc.id(loc.locate(p)); got != want {
			t.Fatalf("point %v: region %d, want %d", p, got, want)
		}
	}
}

func TestLocatorBordersAndHoles(t *testing.T) {
	// Region 2 is a square with a hole; region 1 fills the hole; region 3 is
	// a triangle sharing a slanted edge with region 4.
	outer := orb.Ring{{0, 0}, {4, 0}, {4, 4}, {0, 4}, {0, 0}}
	hole := orb.Ring{{1, 1}, {1, 3}, {3, 3}, {3, 1}, {1, 1}}
	inner := orb.Ring{{1, 1}, {3, 1}, {3, 3}, {1, 3}, {1, 1}}
	tri1 := orb.Ring{{10, 0}, {13, 0}, {10, 3.3}, {10, 0}}
	tri2 := orb.Ring{{13, 0}, {13, 3.3}, {10, 3.3}, {13, 0}}
	p := &partition.Partition{Regions: []partition.Region{
		{ID: 1, Polygon: orb.Polygon{inner}},
		{ID: 2, Polygon: orb.Polygon{outer, hole}},
		{ID: 3, Polygon: orb.Polygon{tri1}},
		{ID: 4, Polygon: orb.Polygon{tri2}},
	}}
	loc, _ := newLocator(p)
	tests := []struct {
		pt   orb.Point
		want int
	}{
		{orb.Point{0.5, 0.5}, 2},
		{orb.Point{2, 2}, 1}, // in the hole: the inner region, not the holed one
		{orb.Point{1, 2}, 1}, // hole's left border: half-open, goes inside
		{orb.Point{3, 2}, 2}, // hole's right border: belongs to the ring around
		{orb.Point{5, 2}, 0},
		{orb.Point{10.5, 0.5}, 3},
		{orb.Point{12.5, 2.5}, 4},
	}
	for _, tc := range tests {
		if got := loc.id(loc.locate(tc.pt)); got != tc.want {
			t.Errorf("locate(%v) = %d, want %d", tc.pt, got, tc.want)
		}
	}
	// Points on the slanted shared edge go to exactly one triangle.
	for i := 1; i < 100; i++ {
		f := float64(i) / 100
		pt := orb.Point{13 - 3*f, 3.3 * f}
		in3 := loc.regions[2].contains(pt)
		in4 := loc.regions[3].contains(pt)
		if in3 == in4 || in3 != polygonContains(orb.Polygon{tri1}, pt) {
			t.Fatalf("point %v on shared edge: in 3 %v, in 4 %v", pt, in3, in4)
		}
	}
}

func TestLocatorRejectsBadPartitions(t *testing.T) {
	p := gridPartition(2, 1, 0, 0, 1)
	p.Regions[1].ID = p.Regions[0].ID
	if _, err := newLocator(p); err == nil || !strings.Contains(err.Error(), "used twice") {
		t.Errorf("duplicate id: %v", err)
	}
	if _, err := Ingest(context.Background(), &partition.Partition{}, "", []Input{{Path: "x.csv"}}, DefaultOptions()); err == nil {
		t.Error("ingest without regions succeeded")
	}
}

// ringContains is the plain crossing-number test of one ring with the same
// half-open rule, the oracle for the banded test.
func ringContains(ring orb.Ring, p orb.Point) bool {
	in := false
	for i := 1; i < len(ring); i++ {
		a, b := ring[i-1], ring[i]
		if a[1] > b[1] {
			a, b = b, a
		}
		if a[1] <= p[1] && p[1] < b[1] && p[0] < (b[0]-a[0])*(p[1]-a[1])/(b[1]-a[1])+a[0] {
			in = !in
		}
	}
	return in
}

// polygonContains is the oracle: in the exterior ring and in no hole.
func polygonContains(poly orb.Polygon, p orb.Point) bool {
	if !ringContains(poly[0], p) {
		return false
	}
	for _, h := range poly[1:] {
		if ringContains(h, p) {
			return false
		}
	}
	return true
}
