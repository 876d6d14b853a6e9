package regiongraph

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"

	"github.com/paulmach/orb"

	"narrows/partition"
	"narrows/partition/geodesy"
)

// pointsCSV writes GPS rows "vehicle,time,lon,lat[,occupied]".
func TestGPSPointsCutIntoTrips(t *testing.T) {
	p := gridPartition(4, 1, 13.0, 52.0, 0.02)
	t0 := time.Date(2024, 5, 1, 8, 0, 0, 0, time.UTC)
	at := func(sec int) string { return t0.Add(time.Duration(sec) * time.Second).Format(time.RFC3339) }

	t.Run("occupied flag", func(t *testing.T) {
		var rows []string
		// vacant 3 points, occupied run of 6 points from region 1 to 2, vacant 2.
		for i := 0; i < 11; i++ {
			occ := "0"
			if i >= 3 && i < 9 {
				occ = "1"
			}
			lon := 13.005 + 0.004*float64(i)
			rows = append(rows, fmt.Sprintf("taxi1,%s,%.4f,52.01,%s", at(60*i), lon, occ))
		}
		// Rows in reverse order: the reader sorts per vehicle.
		var b strings.Builder
		b.WriteString("vehicle_id,time,lon,lat,occupied\n")
		for i := len(rows) - 1; i >= 0; i-- {
			b.WriteString(rows[i] + "\n")
		}
		s, err := ingestString(t, p, FormatPoints, b.String(), DefaultOptions())
		if err != nil {
			t.Fatal(err)
		}
		checkQuality(t, s.Meta.Quality)
		q := s.Meta.Quality
		if q.Read != 11 || q.Used != 6 || q.Rejected[string(ReasonNotOccupied)] != 5 {
			t.Fatalf("quality %+v", q)
		}
		e := s.Edges[0]
		// trip from point 3 (13.017) to point 8 (13.037): five steps of 0.004°.
		want := 5 * geodesy.GreatCircleMetres(orb.Point{13.017, 52.01}, orb.Point{13.021, 52.01})
		if len(s.Edges) != 1 || e.From != 1 || e.To != 2 || e.Trips != 1 || math.Abs(e.DistanceSum-want) > 0.01 || e.DurationSum != 300 {
			t.Fatalf("edges %+v, want distance %v", s.Edges, want)
		}
	})

	t.Run("gaps and dwells", func(t *testing.T) {
		var b strings.Builder
		b.WriteString("vehicle_id,time,lon,lat\n")
		sec := 0
		add := func(v string, lon float64) {
			fmt.Fprintf(&b, "%s,%s,%.5f,52.01\n", v, at(sec), lon)
		}
		// Trip A: 1 -> 2 in 5 steps of a minute.
		for i := 0; i <= 5; i++ {
			add("van", 13.005+0.005*float64(i))
			sec += 60
		}
		// Dwell: 6 more points within a few metres over 5 minutes. The trip
		// ends at the first (the last point above is that first point).
		sec -= 60
		for i := 1; i <= 5; i++ {
			sec += 60
			add("van", 13.030+0.00001*float64(i))
		}
		// Trip B starts at the dwell's last point: on to region 3.
		for i := 1; i <= 4; i++ {
			sec += 60
			add("van", 13.030+0.006*float64(i))
		}
		// A gap of 10 minutes, then trip C: 3 -> 4.
		sec += 600
		for i := 0; i <= 3; i++ {
			add("van", 13.045+0.007*float64(i))
			sec += 60
		}
		// Another vehicle: a single point between gaps, and a jump.
		add("car", 13.01)
		sec += 3600
		add("car", 13.01)
		sec += 60
		add("car", 13.07) // 4 km in a minute: 240 km/h
		sec += 60
		add("car", 13.075)
		s, err := ingestString(t, p, FormatPoints, b.String(), DefaultOptions())
		if err != nil {
			t.Fatal(err)
		}
		checkQuality(t, s.Meta.Quality)
		q := s.Meta.Quality
		// van: A 6 points, dwell interior 4 stationary, B 5 points, C 4 points.
		// car: 1 point short trip, 3 points gps jump.
		if q.Read != 6+5+4+4+1+3 || q.Used != 6+5+4 || q.Rejected[string(ReasonStationary)] != 4 ||
			q.Rejected[string(ReasonShortTrip)] != 1 || q.Rejected[string(ReasonGPSJump)] != 3 {
			t.Fatalf("quality %+v", q)
		}
		var pairs []string
		for _, e := range s.Edges {
			pairs = append(pairs, fmt.Sprintf("%d->%d x%d", e.From, e.To, e.Trips))
		}
		if got := strings.Join(pairs, " "); got != "1->2 x1 2->3 x1 3->4 x1" {
			t.Errorf("edges %s", got)
		}
		opts := DefaultOptions()
		opts.Strict = true
		if _, err := ingestString(t, p, FormatPoints, b.String(), opts); err == nil || !strings.Contains(err.Error(), "trips.csv:") {
			t.Errorf("strict: %v", err)
		}
	})
}

func TestGPXSegmentsAreTrips(t *testing.T) {
	gpx := `<?xml version="1.0" encoding="UTF-8"?>
<gpx version="1.1" creator="test" xmlns="http://www.topografix.com/GPX/1/1">
 <metadata><time>2024-05-01T00:00:00Z</time></metadata>
 <trk><name>a</name>
  <trkseg>
   <trkpt lat="52.010" lon="13.005"><ele>40</ele><time>2024-05-01T08:00:00Z</time></trkpt>
   <trkpt lat="52.010" lon="13.015"><time>2024-05-01T08:01:00Z</time></trkpt>
   <trkpt lat="52.010" lon="13.025"><time>2024-05-01T08:02:00Z</time></trkpt>
   <trkpt lat="52.010" lon="13.030"></trkpt>
  </trkseg>
  <trkseg>
   <trkpt lat="52.010" lon="13.045"><time>2024-05-01T09:00:00Z</time></trkpt>
   <trkpt lat="52.010" lon="13.055"><time>2024-05-01T09:01:00Z</time></trkpt>
   <trkpt lat="north" lon="13.065"><time>2024-05-01T09:02:00Z</time></trkpt>
   <trkpt lat="52.010" lon="13.075"><time>2024-05-01T09:03:00Z</time></trkpt>
  </trkseg>
 </trk>
</gpx>`
	p := gridPartition(4, 1, 13.0, 52.0, 0.02)
	s, err := ingestString(t, p, FormatGPX, gpx, DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	checkQuality(t, s.Meta.Quality)
	q := s.Meta.Quality
	if q.Read != 8 || q.Used != 6 || q.Rejected[string(ReasonMissingField)] != 1 || q.Rejected[string(ReasonUnparseable)] != 1 {
		t.Fatalf("quality %+v", q)
	}
	if len(s.Edges) != 2 || s.Edges[0].From != 1 || s.Edges[0].To != 2 || s.Edges[1].From != 3 || s.Edges[1].To != 4 {
		t.Fatalf("edges %+v", s.Edges)
	}
	opts := DefaultOptions()
	opts.Strict = true
	if _, err := ingestString(t, p, FormatGPX, gpx, opts); err == nil || !strings.Contains(err.Error(), "track.gpx:9: missing field") {
		t.Errorf("strict: %v", err)
	}
	// A folder of GPX files is read in name order.
	dir := t.TempDir()
	for _, name := range []string{"b.gpx", "a.GPX", "notes.txt"} {
		if err := os.WriteFile(filepath.Join(dir, name), []byte(gpx), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	s, err = Ingest(context.Background(), p, "", []Input{{Path: dir}}, DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	if len(s.Meta.Sources) != 2 || filepath.Base(s.Meta.Sources[0].Path) != "a.GPX" || s.Meta.Quality.Read != 16 || s.Edges[0].Trips != 2 {
		t.Errorf("folder: sources %+v, quality %+v", s.Meta.Sources, s.Meta.Quality)
	}
}

// vincentyMetres is the ellipsoidal (WGS84) inverse distance by Vincenty's
// iteration, an independent formula for the GPX track length.
func vincentyMetres(a, b orb.Point) float64 {
	const (
		semiMajor = 6378137.0
		flat      = 1 / 298.257223563
		rad       = math.Pi / 180
	)
	semiMinor := semiMajor * (1 - flat)
	L := (b[0] - a[0]) * rad
	U1 := math.Atan((1 - flat) * math.Tan(a[1]*rad))
	U2 := math.Atan((1 - flat) * math.Tan(b[1]*rad))
	sinU1, cosU1 := math.Sincos(U1)
	sinU2, cosU2 := math.Sincos(U2)
	lambda := L
	var sinSigma, cosSigma, sigma, cos2Alpha, cos2SigmaM float64
	for i := 0; i < 200; i++ {
		sinLambda, cosLambda := math.Sincos(lambda)
		sinSigma = math.Hypot(cosU2*sinLambda, cosU1*sinU2-sinU1*cosU2*cosLambda)
		if sinSigma == 0 {
			return 0
		}
		cosSigma = sinU1*sinU2 + cosU1*cosU2*cosLambda
		sigma = math.Atan2(sinSigma, cosSigma)
		sinAlpha := cosU1 * cosU2 * sinLambda / sinSigma
		cos2Alpha = 1 - sinAlpha*sinAlpha
		cos2SigmaM = cosSigma - 2*sinU1*sinU2/cos2Alpha
		C := flat / 16 * cos2Alpha * (4 + flat*(4-3*cos2Alpha))
		prev := lambda
		lambda = L + (1-C)*flat*sinAlpha*(sigma+C*sinSigma*(cos2SigmaM+C*cosSigma*(-1+2*cos2SigmaM*cos2SigmaM)))
		if math.Abs(lambda-prev) < 1e-12 {
			break
		}
	}
	u2 := cos2Alpha * (semiMajor*semiMajor - semiMinor*semiMinor) / (semiMinor * semiMinor)
	A := 1 + u2/16384*(4096+u2*(-768+u2*(320-175*u2)))
	B := u2 / 1024 * (256 + u2*(-128+u2*(74-47*u2)))
	dSigma := B * sinSigma * (cos2SigmaM + B/4*(cosSigma*(-1+2*cos2SigmaM*cos2SigmaM)-
		B/6*cos2SigmaM*(-3+4*sinSigma*sinSigma)*(-3+4*cos2SigmaM*cos2SigmaM)))
	return semiMinor * A * (sigma - dSigma)
}

func TestVincentyAgainstGeographicLib(t *testing.T) {
	// Reference: GeographicLib 2.1.2 GeodSolve, ../../shared/reference/geodesic.json
	// (pair 3, in Andorra). Vincenty's method agrees to well under a millimetre.
	got := vincentyMetres(orb.Point{1.4221, 42.4351}, orb.Point{1.7804, 42.6572})
	if math.Abs(got-38403.493) > 0.01 {
		t.Errorf("Vincenty %.4f m, GeographicLib 38403.493 m", got)
	}
}

func TestAndorraDriveGPX(t *testing.T) {
	gpxPath := filepath.Join("..", "..", "shared", "data", "gpx", "andorra-drive.gpx")
	data, err := os.ReadFile(gpxPath)
	if err != nil {
		t.Skipf("GPX missing: %v", err)
	}
	segs, err := readGPX(strings.NewReader(string(data)))
	if err != nil {
		t.Fatal(err)
	}
	if len(segs) != 1 || len(segs[0].points) < 2 {
		t.Fatalf("want one track segment, got %d", len(segs))
	}
	// The file has no times; give the points one every 15 s, in a copy.
	n := 0
	timed := regexp.MustCompile(`</trkpt>`).ReplaceAllStringFunc(string(data), func(string) string {
		tm := time.Date(2024, 6, 1, 9, 0, 0, 0, time.UTC).Add(time.Duration(15*n) * time.Second)
		n++
		return "<time>" + tm.Format(time.RFC3339) + "</time></trkpt>"
	})
	var pts []orb.Point
	for _, p := range segs[0].points {
		var lat, lon float64
		if _, err := fmt.Sscan(p.lat, &lat); err != nil {
			t.Fatal(err)
		}
		if _, err := fmt.Sscan(p.lon, &lon); err != nil {
			t.Fatal(err)
		}
		pts = append(pts, orb.Point{lon, lat})
	}
	// Independent sums: spherical law of cosines on the same sphere (equal
	// up to rounding), Vincenty on the WGS84 ellipsoid (within 0.5 %).
	var cosines, vincenty float64
	const rad = math.Pi / 180
	for i := 1; i < len(pts); i++ {
		a, b := pts[i-1], pts[i]
		c := math.Sin(a[1]*rad)*math.Sin(b[1]*rad) + math.Cos(a[1]*rad)*math.Cos(b[1]*rad)*math.Cos((b[0]-a[0])*rad)
		cosines += geodesy.EarthRadiusMetres * math.Acos(math.Min(1, c))
		vincenty += vincentyMetres(a, b)
	}

	regions, err := partition.ReadFile(context.Background(), filepath.Join("..", "..", "shared", "data", "osm", "andorra.osm.pbf"), partition.DefaultOptions())
	if err != nil {
		t.Fatalf("regions of andorra.osm.pbf: %v", err)
	}
	loc, err := newLocator(regions)
	if err != nil {
		t.Fatal(err)
	}
	from, to := loc.id(loc.locate(pts[0])), loc.id(loc.locate(pts[len(pts)-1]))
	if from == 0 || to == 0 {
		t.Fatalf("origin region %d, destination region %d: not found", from, to)
	}
	// Brute force: the region whose polygon holds the point, by scanning all.
	for _, end := range []struct {
		pt orb.Point
		id int
	}{{pts[0], from}, {pts[len(pts)-1], to}} {
		var holders []int
		for i := range loc.regions {
			if polygonContains(orb.Polygon(loc.regions[i].rings), end.pt) {
				holders = append(holders, loc.regions[i].id)
			}
		}
		if len(holders) != 1 || holders[0] != end.id {
			t.Errorf("point %v: located in %d, held by %v", end.pt, end.id, holders)
		}
	}

	// The grid- and band-accelerated lookup against a plain crossing test
	// of every region, on random points and on region vertices (border
	// points).
	rng := rand.New(rand.NewPCG(61, 62))
	b := regions.Bound
	var probes []orb.Point
	for i := 0; i < 3000; i++ {
		probes = append(probes, orb.Point{b.Min[0] + rng.Float64()*(b.Max[0]-b.Min[0]), b.Min[1] + rng.Float64()*(b.Max[1]-b.Min[1])})
	}
	for _, r := range regions.Regions {
		for _, v := range r.Polygon[0] {
			probes = append(probes, v)
		}
	}
	for _, pt := range probes {
		want := 0
		for i := range loc.regions {
			if polygonContains(orb.Polygon(loc.regions[i].rings), pt) {
				want = i + 1
				break
			}
		}
		if got := loc.locate(pt); got != want {
			t.Fatalf("point %v: located %d, scan %d", pt, got, want)
		}
	}

	path := writeTemp(t, "andorra-drive-timed.gpx", timed)
	opts := DefaultOptions()
	opts.TimeZone = "Europe/Andorra"
	s, err := Ingest(context.Background(), regions, "andorra", []Input{{Path: path}}, opts)
	var few *YieldError
	if errors.As(err, &few) {
		// A drive that starts and ends in one region uses no row: the
		// ingest fails, with the accounting in the error.
		if from != to || few.Quality.Rejected[string(ReasonIntraRegion)] != int64(len(pts)) {
			t.Fatalf("%v", err)
		}
		return
	}
	if err != nil {
		t.Fatal(err)
	}
	checkQuality(t, s.Meta.Quality)
	t.Logf("track: %d points, law of cosines %.2f m, Vincenty %.2f m, region %d -> %d of %d; rejected: %s",
		len(pts), cosines, vincenty, from, to, len(regions.Regions), nonZeroReasons(s.Meta.Quality))
	if s.Meta.Quality.Read != int64(len(pts)) {
		t.Errorf("read %d points, file has %d", s.Meta.Quality.Read, len(pts))
	}
	// One trip: all its points end the same way, as an edge from -> to, or
	// (the drive starts and ends in one region) as one intra-region trip.
	if from == to {
		if s.Meta.Quality.Rejected[string(ReasonIntraRegion)] != int64(len(pts)) || len(s.Edges) != 0 {
			t.Errorf("want one intra-region trip of %d points: %+v", len(pts), s.Meta.Quality)
		}
	} else if len(s.Edges) != 1 || s.Edges[0].Trips != 1 || s.Edges[0].From != from || s.Edges[0].To != to {
		t.Errorf("want one trip %d -> %d, got %+v (%s)", from, to, s.Edges, nonZeroReasons(s.Meta.Quality))
	}

	// The trip's length, read back from a store: two regions split between
	// the track's ends, so that it becomes an edge.
	mid := (pts[0][0] + pts[len(pts)-1][0]) / 2
	west := orb.Ring{{mid - 1, 42}, {mid, 42}, {mid, 43}, {mid - 1, 43}, {mid - 1, 42}}
	east := orb.Ring{{mid, 42}, {mid + 1, 42}, {mid + 1, 43}, {mid, 43}, {mid, 42}}
	if pts[0][0] > mid {
		west, east = east, west
	}
	split := &partition.Partition{Regions: []partition.Region{{ID: 1, Polygon: orb.Polygon{west}}, {ID: 2, Polygon: orb.Polygon{east}}}}
	s, err = Ingest(context.Background(), split, "split", []Input{{Path: path}}, opts)
	if err != nil {
		t.Fatal(err)
	}
	if len(s.Edges) != 1 || s.Edges[0].Trips != 1 || s.Edges[0].From != 1 || s.Edges[0].To != 2 {
		t.Fatalf("want one trip 1 -> 2, got %+v (%s)", s.Edges, nonZeroReasons(s.Meta.Quality))
	}
	d := s.Edges[0].DistanceSum // integer millimetres
	if math.Abs(d-cosines) > 0.001+1e-6*cosines {
		t.Errorf("length %.4f m, law-of-cosines sum %.4f m", d, cosines)
	}
	if math.Abs(d-vincenty) > 0.005*vincenty {
		t.Errorf("length %.4f m, Vincenty sum %.4f m: over 0.5 %%", d, vincenty)
	}
	if want := float64(15 * (len(pts) - 1)); s.Edges[0].DurationSum != want {
		t.Errorf("duration %v s, want %v", s.Edges[0].DurationSum, want)
	}
}
