package town

import (
	"bytes"
	"context"
	"encoding/csv"
	"io"
	"sort"
	"strconv"
	"testing"
	"time"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geo"
	"github.com/paulmach/orb/planar"

	"narrows/partition/geodesy"
)

// csvTrip is a trip read back from the CSV output, independently of the
// simulator's internals.
type csvTrip struct {
	start, end time.Time
	o, d       orb.Point
	distance   float64
}

func (c csvTrip) detour() float64 { return c.distance / geo.Distance(c.o, c.d) }
func (c csvTrip) speedKMH() float64 {
	return geodesy.KMH(c.distance / c.end.Sub(c.start).Seconds())
}

func readTrips(t testing.TB, r io.Reader) []csvTrip {
	t.Helper()
	cr := csv.NewReader(r)
	head, err := cr.Read()
	if err != nil {
		t.Fatalf("reading header: %v", err)
	}
	if got := joinComma(head); got != tripHeader {
		t.Fatalf("header %q, want %q", got, tripHeader)
	}
	var out []csvTrip
	for line := 2; ; line++ {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("line %d: %v", line, err)
		}
		var c csvTrip
		if c.start, err = time.Parse(time.RFC3339, rec[1]); err != nil {
			t.Fatalf("line %d: start: %v", line, err)
		}
		if c.end, err = time.Parse(time.RFC3339, rec[2]); err != nil {
			t.Fatalf("line %d: end: %v", line, err)
		}
		var f [5]float64
		for i := range f {
			if f[i], err = strconv.ParseFloat(rec[3+i], 64); err != nil {
				t.Fatalf("line %d field %d: %v", line, 4+i, err)
			}
		}
		c.o, c.d, c.distance = orb.Point{f[0], f[1]}, orb.Point{f[2], f[3]}, f[4]
		out = append(out, c)
	}
	return out
}

func joinComma(s []string) string {
	var b bytes.Buffer
	for i, x := range s {
		if i > 0 {
			b.WriteByte(',')
		}
		b.WriteString(x)
	}
	return b.String()
}

// pairStats summarises the trips from district a to district b (either
// direction) and all trips, in a period.
type pairStats struct {
	n                     int
	meanDetour, meanSpeed float64
	allMedianSpeed        float64
	allMedianDetour       float64
}

func between(trips []csvTrip, a, b orb.Ring, from, to time.Time) pairStats {
	var ps pairStats
	var speeds, detours []float64
	for _, c := range trips {
		if c.start.Before(from) || !c.start.Before(to) {
			continue
		}
		speeds = append(speeds, c.speedKMH())
		detours = append(detours, c.detour())
		ab := planar.RingContains(a, c.o) && planar.RingContains(b, c.d)
		ba := planar.RingContains(b, c.o) && planar.RingContains(a, c.d)
		if ab || ba {
			ps.n++
			ps.meanDetour += c.detour()
			ps.meanSpeed += c.speedKMH()
		}
	}
	if ps.n > 0 {
		ps.meanDetour /= float64(ps.n)
		ps.meanSpeed /= float64(ps.n)
	}
	ps.allMedianSpeed = median(speeds)
	ps.allMedianDetour = median(detours)
	return ps
}

func median(xs []float64) float64 {
	if len(xs) == 0 {
		return 0
	}
	s := append([]float64(nil), xs...)
	sort.Float64s(s)
	return s[len(s)/2]
}

// simulate runs a plan on a town and returns the CSV bytes.
func simulate(t testing.TB, tw *Town, o SimOptions) ([]byte, Stats) {
	t.Helper()
	var buf bytes.Buffer
	st, err := tw.Simulate(context.Background(), o, &buf)
	if err != nil {
		t.Fatalf("Simulate: %v", err)
	}
	return buf.Bytes(), st
}
