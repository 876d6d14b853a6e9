package regiongraph

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"reflect"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/paulmach/orb"

	"narrows/partition/geodesy"
)

const (
	gNX, gNY     = 6, 6
	gLon0, gLat0 = 13.0, 52.0
	gStep        = 0.02
)

// genTrip is a random trip with its true values, written to CSV in one of
// the time formats.
type genTrip struct {
	start, end time.Time
	o, d       [2]float64
	distance   float64
	bad        string // "" or the kind of broken field
}

func genTrips(rng *rand.Rand, n int, day0 time.Time) []genTrip {
	trips := make([]genTrip, n)
	for i := range trips {
		tr := &trips[i]
		tr.o = [2]float64{gLon0 - 0.01 + rng.Float64()*(gNX*gStep+0.02), gLat0 - 0.01 + rng.Float64()*(gNY*gStep+0.02)}
		tr.d = [2]float64{gLon0 - 0.01 + rng.Float64()*(gNX*gStep+0.02), gLat0 - 0.01 + rng.Float64()*(gNY*gStep+0.02)}
		straight := geodesy.GreatCircleMetres(tr.o, tr.d)
		tr.distance = math.Round(straight*(0.9+rng.Float64()*1.5)*10) / 10
		tr.start = day0.Add(time.Duration(rng.Int64N(int64(72 * time.Hour)))).Truncate(time.Second)
		tr.end = tr.start.Add(time.Duration(rng.Int64N(int64(90*time.Minute))) - 2*time.Minute).Truncate(time.Second)
		switch rng.IntN(100) {
		case 0:
			tr.bad = "unparseable"
		case 1:
			tr.bad = "missing"
		}
	}
	return trips
}

func tripsCSV(trips []genTrip, loc *time.Location, rng *rand.Rand) string {
	var b strings.Builder
	b.WriteString(tripHeader)
	for i, tr := range trips {
		tm := func(t time.Time) string {
			switch rng.IntN(3) {
			case 0:
				return t.UTC().Format(time.RFC3339)
			case 1:
				return t.In(loc).Format("2006-01-02 15:04:05")
			}
			return strconv.FormatInt(t.Unix(), 10)
		}
		lon := strconv.FormatFloat(tr.o[0], 'f', 6, 64)
		endLat := strconv.FormatFloat(tr.d[1], 'f', 6, 64)
		switch tr.bad {
		case "unparseable":
			lon = "13,5x"
		case "missing":
			endLat = ""
		}
		fmt.Fprintf(&b, "t%d,%s,%s,%s,%.6f,%.6f,%s,%.1f\n", i, tm(tr.start), tm(tr.end), lon, tr.o[1], tr.d[0], endLat, tr.distance)
	}
	return b.String()
}

type oracleKey struct {
	day, window string
	from, to    int
}

type oracleEdge struct {
	speed, detour, distance, duration []float64
	distSum, straightSum, durSum      float64
}

// oracle classifies and aggregates the generated trips directly from their
// true values (coordinates rounded as written), independent of the parsers.
func oracle(trips []genTrip, loc *time.Location, windows []Window, o Options) (map[oracleKey]*oracleEdge, map[Reason]int64, int64) {
	edges := make(map[oracleKey]*oracleEdge)
	reasons := make(map[Reason]int64)
	var used int64
	round := func(v float64) float64 { f, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'f', 6, 64), 64); return f }
	for _, tr := range trips {
		if tr.bad == "unparseable" {
			reasons[ReasonUnparseable]++
			continue
		}
		if tr.bad == "missing" {
			reasons[ReasonMissingField]++
			continue
		}
		org := [2]float64{round(tr.o[0]), round(tr.o[1])}
		dst := [2]float64{round(tr.d[0]), round(tr.d[1])}
		from := gridCell(gNX, gNY, gLon0, gLat0, gStep, org)
		to := gridCell(gNX, gNY, gLon0, gLat0, gStep, dst)
		// Spherical law of cosines as an independent straight-line distance.
		const rad = math.Pi / 180
		c := math.Sin(org[1]*rad)*math.Sin(dst[1]*rad) + math.Cos(org[1]*rad)*math.Cos(dst[1]*rad)*math.Cos((dst[0]-org[0])*rad)
		straight := geodesy.EarthRadiusMetres * math.Acos(math.Min(1, c))
		dur := tr.end.Sub(tr.start).Seconds()
		speedKMH := tr.distance / dur * 3.6
		var r Reason
		switch {
		case from == 0 || to == 0:
			r = ReasonOutside
		case from == to:
			r = ReasonIntraRegion
		case straight < o.MinStraightMetres:
			r = ReasonShortTrip
		case dur <= 0 || dur > o.MaxDuration.Seconds():
			r = ReasonBadDuration
		case speedKMH < o.MinSpeedKMH || speedKMH > o.MaxSpeedKMH:
			r = ReasonBadSpeed
		case tr.distance/straight < o.MinDetour:
			r = ReasonDetourFloor
		}
		if r != "" {
			reasons[r]++
			continue
		}
		ls := tr.start.In(loc)
		minute := ls.Hour()*60 + ls.Minute()
		in := false
		for _, w := range windows {
			ok := w.StartMinute <= minute && minute < w.EndMinute
			if w.StartMinute > w.EndMinute {
				ok = minute >= w.StartMinute || minute < w.EndMinute
			}
			if !ok {
				continue
			}
			in = true
			k := oracleKey{ls.Format("2006-01-02"), w.Name, from, to}
			e := edges[k]
			if e == nil {
				e = &oracleEdge{}
				edges[k] = e
			}
			e.speed = append(e.speed, tr.distance/dur)
			e.detour = append(e.detour, tr.distance/straight)
			e.distance = append(e.distance, tr.distance)
			e.duration = append(e.duration, dur)
			e.distSum += tr.distance
			e.straightSum += straight
			e.durSum += dur
		}
		if in {
			used++
		} else {
			reasons[ReasonOutsideTimes]++
		}
	}
	return edges, reasons, used
}

func TestAggregatesMatchBruteForce(t *testing.T) {
	n := 30000 // about 2.5 MB: several chunks for the parallel parsers
	if testing.Short() {
		n = 4000
	}
	rng := rand.New(rand.NewPCG(11, 12))
	loc, _ := time.LoadLocation("Europe/Berlin")
	day0 := time.Date(2024, 3, 30, 0, 0, 0, 0, loc) // spans the change to summer time
	trips := genTrips(rng, n, day0)
	csv := tripsCSV(trips, loc, rng)

	opts := DefaultOptions()
	opts.TimeZone = "Europe/Berlin"
	opts.Windows = []Window{{"all", 0, 1440}, {"am", 7 * 60, 10 * 60}, {"night", 22 * 60, 6 * 60}, {"pm", 16 * 60, 19 * 60}}
	s, err := ingestString(t, gridPartition(gNX, gNY, gLon0, gLat0, gStep), FormatTrips, csv, opts)
	if err != nil {
		t.Fatal(err)
	}
	want, reasons, used := oracle(trips, loc, opts.Windows, opts)
	checkQuality(t, s.Meta.Quality)
	if s.Meta.Quality.Read != int64(n) || s.Meta.Quality.Used != used {
		t.Errorf("read %d used %d, want %d and %d", s.Meta.Quality.Read, s.Meta.Quality.Used, n, used)
	}
	for _, r := range RejectReasons() {
		if s.Meta.Quality.Rejected[string(r)] != reasons[r] {
			t.Errorf("reason %q: %d rows, brute force %d", r, s.Meta.Quality.Rejected[string(r)], reasons[r])
		}
	}
	if used < int64(n)/5 || len(reasons) < 6 {
		t.Fatalf("test data too one-sided: used %d, reasons %v", used, reasons)
	}
	if len(s.Edges) != len(want) {
		t.Errorf("%d edges, brute force %d", len(s.Edges), len(want))
	}
	if !slices.IsSortedFunc(s.Edges, edgeOrderOf(s.Meta.Windows).compare) {
		t.Error("edges not sorted by day, window, from, to")
	}
	// float32 storage of per-trip values: quantiles within 1e-6 relative;
	// sums add the float32 values rounded to millimetres and milliseconds.
	const rel = 1e-6
	for _, e := range s.Edges {
		w := want[oracleKey{e.Day.String(), s.Meta.WindowName(e.Window), e.From, e.To}]
		if w == nil {
			t.Fatalf("edge %s %s %d->%d not in brute force", e.Day, s.Meta.WindowName(e.Window), e.From, e.To)
		}
		if e.Trips != len(w.speed) {
			t.Errorf("edge %s %s %d->%d: %d trips, want %d", e.Day, s.Meta.WindowName(e.Window), e.From, e.To, e.Trips, len(w.speed))
		}
		checks := []struct {
			name      string
			got, want float64
		}{
			{"speed p25", e.SpeedP25, type7(w.speed, 0.25)},
			{"speed median", e.SpeedMedian, type7(w.speed, 0.5)},
			{"speed p75", e.SpeedP75, type7(w.speed, 0.75)},
			{"detour p25", e.DetourP25, type7(w.detour, 0.25)},
			{"detour median", e.DetourMedian, type7(w.detour, 0.5)},
			{"detour p75", e.DetourP75, type7(w.detour, 0.75)},
			{"distance median", e.DistanceMedian, type7(w.distance, 0.5)},
			{"duration median", e.DurationMedian, type7(w.duration, 0.5)},
		}
		for _, c := range checks {
			if !near(c.got, c.want, rel) {
				t.Errorf("edge %s %s %d->%d %s: %v, brute force %v", e.Day, s.Meta.WindowName(e.Window), e.From, e.To, c.name, c.got, c.want)
			}
		}
		tol := 0.002*float64(e.Trips) + 1e-6*w.distSum
		if math.Abs(e.DistanceSum-w.distSum) > tol || math.Abs(e.DurationSum-w.durSum) > tol ||
			math.Abs(e.StraightSum-w.straightSum) > tol+1e-6*w.straightSum {
			t.Errorf("edge %s %s %d->%d sums: %v %v %v, brute force %v %v %v", e.Day, s.Meta.WindowName(e.Window), e.From, e.To,
				e.DistanceSum, e.StraightSum, e.DurationSum, w.distSum, w.straightSum, w.durSum)
		}
	}
}

func TestIngestIsDeterministic(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 22))
	trips := genTrips(rng, 20000, time.Date(2024, 5, 1, 0, 0, 0, 0, time.UTC))
	csv := tripsCSV(trips, time.UTC, rng)
	p := gridPartition(gNX, gNY, gLon0, gLat0, gStep)
	path := writeTemp(t, "trips.csv", csv)
	var first *Store
	for i := 0; i < 3; i++ {
		s, err := Ingest(context.Background(), p, "x", []Input{{Path: path}}, DefaultOptions())
		if err != nil {
			t.Fatal(err)
		}
		if first == nil {
			first = s
		} else if !reflect.DeepEqual(first, s) {
			t.Fatal("two ingests of the same file differ")
		}
	}
	if first.Meta.Sources[0].Rows != 20000 || len(first.Meta.Sources[0].SHA256) != 64 {
		t.Errorf("source: %+v", first.Meta.Sources[0])
	}
}

// TestEveryReasonCountedOnce has one row per reason, checked in order.
func TestEveryReasonCountedOnce(t *testing.T) {
	// Region 1 is [13.00,13.02)x[52.00,52.02), region 2 east of it.
	rows := []struct {
		row    string
		reason Reason
	}{
		{"ok,2024-05-01T08:00:00Z,2024-05-01T08:10:00Z,13.010,52.010,13.030,52.010,2000", ""},
		{"u,2024-05-01T08:00:00Z,2024-05-01T08:10:00Z,east,52.010,13.030,52.010,2000", ReasonUnparseable},
		{"u2,2024-05-01T08:00:00Z,2024-05-01T08:10:00Z,13.010,52.010,13.030,52.010,-5", ReasonUnparseable},
		{"m,2024-05-01T08:00:00Z,,13.010,52.010,13.030,52.010,2000", ReasonMissingField},
		{"m2,2024-05-01T08:00:00Z,2024-05-01T08:10:00Z", ReasonMissingField},
		{"o,2024-05-01T08:00:00Z,2024-05-01T08:10:00Z,13.010,52.010,14.030,52.010,2000", ReasonOutside},
		{"i,2024-05-01T08:00:00Z,2024-05-01T08:10:00Z,13.010,52.010,13.015,52.015,2000", ReasonIntraRegion},
		{"s,2024-05-01T08:00:00Z,2024-05-01T08:10:00Z,13.0198,52.010,13.0202,52.010,2000", ReasonShortTrip},
		{"d,2024-05-01T08:10:00Z,2024-05-01T08:00:00Z,13.010,52.010,13.030,52.010,2000", ReasonBadDuration},
		{"d2,2024-05-01T08:00:00Z,2024-05-01T13:00:00Z,13.010,52.010,13.030,52.010,2000", ReasonBadDuration},
		{"v,2024-05-01T08:00:00Z,2024-05-01T08:00:10Z,13.010,52.010,13.030,52.010,2000", ReasonBadSpeed},
		{"f,2024-05-01T08:00:00Z,2024-05-01T08:10:00Z,13.010,52.010,13.030,52.010,1000", ReasonDetourFloor},
		{"w,2024-05-01T12:00:00Z,2024-05-01T12:10:00Z,13.010,52.010,13.030,52.010,2000", ReasonOutsideTimes},
	}
	var b strings.Builder
	b.WriteString(tripHeader)
	for _, r := range rows {
		b.WriteString(r.row + "\n")
	}
	b.WriteString("\n") // a blank line is not a row
	opts := DefaultOptions()
	opts.Windows = []Window{{"am", 6 * 60, 11 * 60}}
	p := gridPartition(2, 1, 13.0, 52.0, 0.02)
	s, err := ingestString(t, p, FormatTrips, b.String(), opts)
	if err != nil {
		t.Fatal(err)
	}
	checkQuality(t, s.Meta.Quality)
	want := map[Reason]int64{}
	for _, r := range rows {
		if r.reason != "" {
			want[r.reason]++
		}
	}
	for _, r := range RejectReasons() {
		if s.Meta.Quality.Rejected[string(r)] != want[r] {
			t.Errorf("%q: %d, want %d (%s)", r, s.Meta.Quality.Rejected[string(r)], want[r], nonZeroReasons(s.Meta.Quality))
		}
	}
	if s.Meta.Quality.Read != int64(len(rows)) || s.Meta.Quality.Used != 1 || len(s.Edges) != 1 {
		t.Fatalf("read %d used %d edges %d", s.Meta.Quality.Read, s.Meta.Quality.Used, len(s.Edges))
	}
	e := s.Edges[0]
	if e.From != 1 || e.To != 2 || e.Trips != 1 || e.Day.String() != "2024-05-01" || s.Meta.WindowName(e.Window) != "am" ||
		e.DurationMedian != 600 || e.DistanceSum != 2000 || math.Abs(e.SpeedMedian-2000.0/600) > 1e-6 {
		t.Errorf("edge %+v", e)
	}

	// Strict mode stops at the first rejected row, naming file and line.
	opts.Strict = true
	_, err = ingestString(t, p, FormatTrips, b.String(), opts)
	if err == nil || !strings.Contains(err.Error(), "trips.csv:3: unparseable start_lon \"east\"") {
		t.Errorf("strict: %v", err)
	}
}

func TestDayBoundaryOnDaylightSavingChange(t *testing.T) {
	// Europe/Berlin: 2024-03-31 02:00 CET -> 03:00 CEST (a 23-hour day),
	// 2024-10-27 03:00 CEST -> 02:00 CET (a 25-hour day).
	rows := []struct {
		start, day, window string
	}{
		{"2024-03-30T22:59:59Z", "2024-03-30", "late"}, // 23:59:59 CET
		{"2024-03-30T23:00:00Z", "2024-03-31", "early"},
		{"2024-03-31T01:30:00Z", "2024-03-31", "dst"},  // 03:30 CEST, not 02:30
		{"2024-03-31 03:30:00", "2024-03-31", "dst"},   // the same, as local text
		{"2024-03-31T21:59:59Z", "2024-03-31", "late"}, // 23:59:59 CEST
		{"2024-03-31T22:00:00Z", "2024-04-01", "early"},
		{"2024-10-26T21:59:59Z", "2024-10-26", "late"},
		{"2024-10-26T22:00:00Z", "2024-10-27", "early"},
		{"2024-10-27T00:30:00Z", "2024-10-27", "dst"}, // 02:30 CEST, first pass
		{"2024-10-27T01:30:00Z", "2024-10-27", "dst"}, // 02:30 CET, second pass
		{"2024-10-27T22:59:59Z", "2024-10-27", "late"},
		{"2024-10-27T23:00:00Z", "2024-10-28", "early"},
		{"1711839600", "2024-03-31", "early"}, // 2024-03-30T23:00:00Z as Unix seconds
	}
	var b strings.Builder
	b.WriteString(tripHeader)
	for i, r := range rows {
		start := r.start
		var st time.Time
		if u, err := strconv.ParseInt(start, 10, 64); err == nil {
			st = time.Unix(u, 0)
		} else if tm, err := time.Parse(time.RFC3339, start); err == nil {
			st = tm
		} else {
			loc, _ := time.LoadLocation("Europe/Berlin")
			st, _ = time.ParseInLocation("2006-01-02 15:04:05", start, loc)
		}
		end := st.Add(10 * time.Minute).UTC().Format(time.RFC3339)
		// Each row goes to its own region pair, so each is its own edge.
		fmt.Fprintf(&b, "r%d,%s,%s,13.01,%.3f,13.03,%.3f,2000\n", i, start, end, 52.001+0.02*float64(i), 52.001+0.02*float64(i))
	}
	opts := DefaultOptions()
	opts.TimeZone = "Europe/Berlin"
	opts.Windows = []Window{{"early", 0, 60}, {"dst", 2 * 60, 4 * 60}, {"late", 23 * 60, 24 * 60}}
	p := gridPartition(2, len(rows), 13.0, 52.0, 0.02)
	s, err := ingestString(t, p, FormatTrips, b.String(), opts)
	if err != nil {
		t.Fatal(err)
	}
	checkQuality(t, s.Meta.Quality)
	if s.Meta.Quality.Used != int64(len(rows)) {
		t.Fatalf("used %d of %d: %s", s.Meta.Quality.Used, len(rows), nonZeroReasons(s.Meta.Quality))
	}
	got := map[int]Edge{}
	for _, e := range s.Edges {
		got[(e.From-1)/2] = e
	}
	for i, r := range rows {
		e, ok := got[i]
		if !ok || e.Day.String() != r.day || s.Meta.WindowName(e.Window) != r.window {
			t.Errorf("row %d (%s): day %s window %s, want %s %s", i, r.start, e.Day, s.Meta.WindowName(e.Window), r.day, r.window)
		}
	}
	if d := s.Days(testWindow(s, "early")); !slices.Equal(d, []Day{testDay("2024-03-31"), testDay("2024-04-01"), testDay("2024-10-27"), testDay("2024-10-28")}) {
		t.Errorf("Days(early) = %v", d)
	}
}

func TestColumnsUnitsAndQuotes(t *testing.T) {
	csv := "Pickup,Dropoff,id,a_lon,a_lat,b_lon,b_lat,km,extra\r\n" +
		"2024-05-01T08:00:00Z,2024-05-01T08:10:00Z,\"x,1\",13.010,52.010,13.030,52.010,2.0,\"multi\nline\"\r\n" +
		"2024-05-01T08:00:00Z,2024-05-01T08:12:00Z,x2,13.010,52.010,13.030,52.010,2.4,plain\r\n"
	opts := DefaultOptions()
	opts.Columns = map[string]string{colStartTime: "pickup", colEndTime: "Dropoff", colTripID: "id",
		colStartLon: "a_lon", colStartLat: "a_lat", colEndLon: "b_lon", colEndLat: "b_lat", colDistance: "km"}
	opts.DistanceUnit = "km"
	opts.Strict = true
	s, err := ingestString(t, gridPartition(2, 1, 13.0, 52.0, 0.02), FormatTrips, csv, opts)
	if err != nil {
		t.Fatal(err)
	}
	if s.Meta.Quality.Used != 2 || len(s.Edges) != 1 || s.Edges[0].DistanceSum != 4400 || s.Edges[0].DurationSum != 1320 {
		t.Fatalf("quality %+v edges %+v", s.Meta.Quality, s.Edges)
	}
}

func TestBadInputs(t *testing.T) {
	p := gridPartition(2, 1, 13.0, 52.0, 0.02)
	row := "t,2024-05-01T08:00:00Z,2024-05-01T08:10:00Z,13.010,52.010,13.030,52.010,2000\n"
	strict := DefaultOptions()
	strict.Strict = true
	tests := []struct {
		name    string
		format  Format
		content string
		opts    func(*Options)
		want    string
	}{
		{"missing column", FormatTrips, "trip_id,start_time,end_time,start_lon,start_lat,end_lon,end_lat\n" + row, nil,
			`trips.csv:1: missing column "distance_m"`},
		{"missing renamed column", FormatTrips, tripHeader + row, func(o *Options) { o.Columns = map[string]string{colStartTime: "pickup"} },
			`missing column "pickup" (the start_time column)`},
		{"unknown time zone", FormatTrips, tripHeader + row, func(o *Options) { o.TimeZone = "Europe/Atlantis" },
			`unknown time zone "Europe/Atlantis"`},
		{"malformed time", FormatTrips, tripHeader + row + "t,2024-05-01 8:00,2024-05-01T08:10:00Z,13.010,52.010,13.030,52.010,2000\n",
			func(o *Options) { *o = strict }, `trips.csv:3: unparseable start_time "2024-05-01 8:00"`},
		{"binary file", FormatTrips, "\x1f\x8b\x08\x00\x00\x00\x00\x00\x00\x03trip_id", nil, "binary data"},
		{"parquet magic as csv", FormatPoints, "PAR1\x00\x00", nil, "Parquet"},
		{"control bytes", FormatTrips, "trip_id,start_time\x01\x02\x03\n", nil, "binary data (3 control bytes"},
		{"empty file", FormatTrips, "", nil, "empty file"},
		{"unknown unit", FormatTrips, tripHeader + row, func(o *Options) { o.DistanceUnit = "furlong" }, `distance unit "furlong"`},
		{"bad window", FormatTrips, tripHeader + row, func(o *Options) { o.Windows = []Window{{"a b", 0, 60}} }, "window name"},
		{"points missing column", FormatPoints, "vehicle_id,time,lon\nv,1,2\n", nil, `missing column "lat"`},
		{"gpx not xml", FormatGPX, "just text", nil, "not a GPX file"},
		{"gpx broken xml", FormatGPX, "<gpx>\n<trk>\n<trkseg><trkpt lat=\"1\" lon=\"2\"></trkseg></trk></gpx>", nil, "line 3"},
		{"gpx wrong root", FormatGPX, "<?xml version=\"1.0\"?>\n<kml></kml>", nil, "root element <kml>"},
		{"gpx binary", FormatGPX, "\x00\x01\x02", nil, "binary"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			opts := DefaultOptions()
			if tc.opts != nil {
				tc.opts(&opts)
			}
			_, err := ingestString(t, p, tc.format, tc.content, opts)
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %v, want it to contain %q", err, tc.want)
			}
		})
	}
	if _, err := Ingest(context.Background(), p, "", []Input{{Path: "/nonexistent/trips.csv"}}, DefaultOptions()); err == nil ||
		!strings.Contains(err.Error(), "/nonexistent/trips.csv") {
		t.Errorf("missing file: %v", err)
	}
}

func TestLatin1TextIsRead(t *testing.T) {
	csv := tripHeader + "M\xfcller,2024-05-01T08:00:00Z,2024-05-01T08:10:00Z,13.010,52.010,13.030,52.010,2000\n"
	s, err := ingestString(t, gridPartition(2, 1, 13.0, 52.0, 0.02), FormatTrips, csv, DefaultOptions())
	if err != nil || s.Meta.Quality.Used != 1 {
		t.Fatalf("Latin-1 trip id: %v", err)
	}
}

func TestCancelledContext(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	path := writeTemp(t, "trips.csv", tripsCSV(genTrips(rng, 30000, time.Date(2024, 5, 1, 0, 0, 0, 0, time.UTC)), time.UTC, rng))
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	_, err := Ingest(ctx, gridPartition(gNX, gNY, gLon0, gLat0, gStep), "", []Input{{Path: path}}, DefaultOptions())
	if err == nil {
		t.Fatal("cancelled ingest succeeded")
	}
}

func TestProgressReportsAllBytes(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 3))
	csv := tripsCSV(genTrips(rng, 25000, time.Date(2024, 5, 1, 0, 0, 0, 0, time.UTC)), time.UTC, rng)
	opts := DefaultOptions()
	var calls int
	var last, total int64
	opts.Progress = func(done, tot int64) {
		if done < last {
			t.Errorf("progress went back: %d after %d", done, last)
		}
		calls++
		last, total = done, tot
	}
	if _, err := ingestString(t, gridPartition(gNX, gNY, gLon0, gLat0, gStep), "", csv, opts); err != nil {
		t.Fatal(err)
	}
	if total != int64(len(csv)) || last != total || calls < 3 {
		t.Errorf("progress: %d calls, last %d of %d, file %d bytes", calls, last, total, len(csv))
	}
}

func TestGridPartitionHelper(t *testing.T) {
	p := gridPartition(3, 2, 0, 0, 1)
	if len(p.Regions) != 6 || p.Regions[4].ID != 5 || !p.Regions[4].Polygon.Bound().Contains(orb.Point{1.5, 1.5}) {
		t.Fatalf("grid: %+v", p.Regions[4])
	}
}

func TestQuotedFieldsAcrossChunks(t *testing.T) {
	// The same trips with plain ids, and with quoted ids holding commas and
	// newlines, in a file several chunks long: same edges and counts.
	rng := rand.New(rand.NewPCG(91, 92))
	trips := genTrips(rng, 30000, time.Date(2024, 5, 1, 0, 0, 0, 0, time.UTC))
	plain := tripsCSV(trips, time.UTC, rand.New(rand.NewPCG(1, 1)))
	quoted := tripsCSV(trips, time.UTC, rand.New(rand.NewPCG(1, 1)))
	lines := strings.Split(quoted, "\n")
	for i := 1; i < len(lines); i += 7 {
		if id, rest, ok := strings.Cut(lines[i], ","); ok {
			lines[i] = `"` + id + `, line one` + "\n" + `line ""two"""` + "," + rest
		}
	}
	quoted = strings.Join(lines, "\n")
	if len(quoted) < 2*chunkSize {
		t.Fatalf("file of %d bytes is not several chunks", len(quoted))
	}
	p := gridPartition(gNX, gNY, gLon0, gLat0, gStep)
	a, err := ingestString(t, p, FormatTrips, plain, DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	b, err := ingestString(t, p, FormatTrips, quoted, DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(a.Edges, b.Edges) || !reflect.DeepEqual(a.Meta.Quality, b.Meta.Quality) {
		t.Fatalf("quoted ids changed the result: %+v vs %+v", a.Meta.Quality, b.Meta.Quality)
	}

	// Strict mode names the first bad row even when later chunks, parsed in
	// parallel, also have one.
	lines = []string{strings.TrimSuffix(tripHeader, "\n")}
	for i := 0; i < 30000; i++ {
		lines = append(lines, "t,2024-05-01T08:00:00Z,2024-05-01T08:10:00Z,13.01,52.01,13.03,52.01,2000")
	}
	lines[20001] = "bad,2024-05-01T08:00:00Z,soon,13.01,52.01,13.03,52.01,2000"
	lines[29001] = "bad,never,2024-05-01T08:00:00Z,13.01,52.01,13.03,52.01,2000"
	opts := DefaultOptions()
	opts.Strict = true
	_, err = ingestString(t, p, FormatTrips, strings.Join(lines, "\n"), opts)
	if err == nil || !strings.Contains(err.Error(), `trips.csv:20002: unparseable end_time "soon"`) {
		t.Errorf("strict: %v", err)
	}
}
