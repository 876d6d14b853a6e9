package regiongraph

import (
	"errors"
	"fmt"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// goodRow is a trip from region 1 to region 2 of gridPartition(2, 1, 13.0,
// 52.0, 0.02) that passes every check, with trip id i.
func goodRow(i int) string {
	return fmt.Sprintf("t%d,2024-05-01T08:00:00Z,2024-05-01T08:10:00Z,13.010,52.010,13.030,52.010,2000\n", i)
}

// strayQuoteCSV is a trip table whose row 2 (line 3) opens a quoted field
// that never closes, followed by n good rows.
func strayQuoteCSV(n int) string {
	var b strings.Builder
	b.WriteString(tripHeader)
	b.WriteString(goodRow(0))
	b.WriteString(`"t1,2024-05-01T08:00:00Z,2024-05-01T08:10:00Z,13.010,52.010,13.030,52.010,2000` + "\n")
	for i := 0; i < n; i++ {
		b.WriteString(goodRow(i + 2))
	}
	return b.String()
}

func TestStrayQuoteCostsOneRow(t *testing.T) {
	p := gridPartition(2, 1, 13.0, 52.0, 0.02)
	for _, n := range []int{5, 150000} {
		s, err := ingestString(t, p, FormatTrips, strayQuoteCSV(n), DefaultOptions())
		if err != nil {
			t.Fatal(err)
		}
		q := s.Meta.Quality
		checkQuality(t, q)
		if q.Read != int64(n+2) || q.Used != int64(n+1) || q.Rejected[string(ReasonUnbalancedQuote)] != 1 {
			t.Errorf("%d rows after the quote: %+v", n, q)
		}
	}
	// Strict: one line number, the quote's.
	opts := DefaultOptions()
	opts.Strict = true
	_, err := ingestString(t, p, FormatTrips, strayQuoteCSV(20), opts)
	var re *RowError
	if !errors.As(err, &re) || re.Line != 3 || re.Reason != ReasonUnbalancedQuote || strings.Count(err.Error(), ":3:") != 1 {
		t.Errorf("strict: %v", err)
	}
}

func TestQuotes(t *testing.T) {
	p := gridPartition(2, 1, 13.0, 52.0, 0.02)
	row := func(id string) string {
		return id + ",2024-05-01T08:00:00Z,2024-05-01T08:10:00Z,13.010,52.010,13.030,52.010,2000"
	}
	tests := []struct {
		name       string
		rows       string
		opts       func(*Options)
		used, read int64
		quote      int64
	}{
		{"inch mark inside a field is text", row(`pipe 12"`) + "\n" + row("b") + "\n", nil, 2, 2, 0},
		{"quoted field over two lines", row("\"a\nb\"") + "\n" + row("c") + "\n", nil, 2, 2, 0},
		{"escaped quotes", row(`"say ""hi"""`) + "\n", nil, 1, 1, 0},
		{"text after the closing quote", row(`"a"b`) + "\n" + row("c") + "\n", nil, 1, 2, 1},
		{"unclosed at the end of the file", row("a") + "\n" + `"b,1` + "\n", nil, 1, 2, 1},
		{"closing quote beyond the line limit", `"a` + "\n1\n2\n3\n\"," + row("x")[1:] + "\n" + row("y") + "\n",
			func(o *Options) { o.MaxQuotedLines = 3 }, 1, 6, 2}, // the closing quote opens a field of its own
		{"closing quote within the line limit", `"a` + "\n1\n2\n3\n\"," + row("x")[2:] + "\n" + row("y") + "\n",
			func(o *Options) { o.MaxQuotedLines = 5 }, 2, 2, 0},
		{"closing quote beyond the byte limit", `"` + strings.Repeat("x", 200) + `"` + row("")[0:] + "\n" + row("y") + "\n",
			func(o *Options) { o.MaxQuotedBytes = 100 }, 1, 2, 1},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			opts := DefaultOptions()
			opts.MinUsedShare = 0
			if tc.opts != nil {
				tc.opts(&opts)
			}
			s, err := ingestString(t, p, FormatTrips, tripHeader+tc.rows, opts)
			if err != nil {
				t.Fatal(err)
			}
			q := s.Meta.Quality
			checkQuality(t, q)
			if q.Used != tc.used || q.Read != tc.read || q.Rejected[string(ReasonUnbalancedQuote)] != tc.quote {
				t.Errorf("used %d of %d, %d unbalanced quote; want %d of %d, %d (%s)", q.Used, q.Read,
					q.Rejected[string(ReasonUnbalancedQuote)], tc.used, tc.read, tc.quote, nonZeroReasons(q))
			}
		})
	}
}

func TestScanRecordIsLinear(t *testing.T) {
	// Every line opens a quote that never closes: each line is looked at a
	// bounded number of times, so the scans' total work stays within
	// MaxQuotedLines times the file.
	line := `"x,1,2` + "\n"
	data := []byte(strings.Repeat(line, 10000))
	lim := quoteLimits{lines: 10, bytes: 64 << 10}
	rows := 0
	for pos := 0; pos < len(data); rows++ {
		n, outcome := scanRecord(data[pos:], true, lim)
		if outcome != recordBadQuote || n != len(line) {
			t.Fatalf("line %d: %d bytes, outcome %d", rows+1, n, outcome)
		}
		pos += n
	}
	if rows != 10000 {
		t.Fatalf("%d records", rows)
	}
}

func TestDuplicates(t *testing.T) {
	p := gridPartition(2, 1, 13.0, 52.0, 0.02)
	dir := t.TempDir()
	a := goodRow(1)
	changed := strings.Replace(goodRow(1), "2000\n", "2100\n", 1)
	first := tripHeader + a + goodRow(2) + a + changed + a
	second := tripHeader + goodRow(3) + a + goodRow(2)
	write := func(name, text string) string {
		path := filepath.Join(dir, name)
		if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
		return path
	}
	in := []Input{{Path: write("jan.csv", first)}, {Path: write("jan-again.csv", second)}}
	s, err := Ingest(t.Context(), p, "r", in, DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	q := s.Meta.Quality
	checkQuality(t, q)
	if q.Used != 3 || q.Rejected[string(ReasonDuplicateRow)] != 4 || q.Rejected[string(ReasonDuplicateTripID)] != 1 ||
		s.Edges[0].Trips != 3 || s.Edges[0].DistanceSum != 6000 {
		t.Errorf("%+v, edges %+v", q, s.Edges)
	}
	// Without a trip_id column, repeats are found by the row's text.
	noID := "start_time,end_time,start_lon,start_lat,end_lon,end_lat,distance_m\n"
	row := "2024-05-01T08:00:00Z,2024-05-01T08:10:00Z,13.010,52.010,13.030,52.010,2000\n"
	s, err = ingestString(t, p, FormatTrips, noID+row+row+strings.Replace(row, "08:10", "08:11", 1), DefaultOptions())
	if err != nil || s.Meta.Quality.Used != 2 || s.Meta.Quality.Rejected[string(ReasonDuplicateRow)] != 1 {
		t.Errorf("no id column: %v %+v", err, s)
	}
	// GPS points: the same fix twice.
	pts := "vehicle_id,time,lon,lat\n"
	for i := 0; i < 6; i++ {
		line := fmt.Sprintf("v,2024-05-01T08:%02d:00Z,%.3f,52.010\n", i, 13.005+0.006*float64(i))
		pts += line
		if i%2 == 0 {
			pts += line
		}
	}
	s, err = ingestString(t, p, FormatPoints, pts, DefaultOptions())
	if err != nil || s.Meta.Quality.Used != 6 || s.Meta.Quality.Rejected[string(ReasonDuplicatePoint)] != 3 {
		t.Errorf("points: %v %+v", err, s)
	}
}

func TestDuplicatesKeepTheFirstWhateverTheReaders(t *testing.T) {
	// The same trip id with two distances, far apart in a file of many
	// chunks: the first in the file is kept, whether one or four parsers
	// read the chunks.
	var b strings.Builder
	b.WriteString(tripHeader)
	b.WriteString(goodRow(0))
	for i := 1; i < 60000; i++ {
		b.WriteString(goodRow(i))
	}
	b.WriteString(strings.Replace(goodRow(0), "2000\n", "2400\n", 1))
	path := writeTemp(t, "trips.csv", b.String())
	st, err := DefaultOptions().settings()
	if err != nil {
		t.Fatal(err)
	}
	p := gridPartition(2, 1, 13.0, 52.0, 0.02)
	loc, err := newLocator(p)
	if err != nil {
		t.Fatal(err)
	}
	for _, parsers := range []int{1, 4} {
		st.seen = newRowSet(1<<30, nil)
		tallies := make([]*tally, parsers)
		for i := range tallies {
			tallies[i] = newTally(st, loc)
		}
		if _, err := ingestFiles(t.Context(), st, []inputFile{{path: path, format: FormatTrips}}, tallies, func(int64) {}); err != nil {
			t.Fatal(err)
		}
		edges, q, err := finishEdges(t.Context(), st, loc, tallies)
		if err != nil {
			t.Fatal(err)
		}
		if q.Rejected[string(ReasonDuplicateTripID)] != 1 || edges[0].DistanceSum != 60000*2000 {
			t.Errorf("%d parsers: %+v, distance %v", parsers, q, edges[0].DistanceSum)
		}
	}
}

func TestImplausibleAndDSTTimes(t *testing.T) {
	p := gridPartition(2, 1, 13.0, 52.0, 0.02)
	row := func(id, start, end string) string {
		return fmt.Sprintf("%s,%s,%s,13.010,52.010,13.030,52.010,2000\n", id, start, end)
	}
	csv := tripHeader + row("ok", "2024-05-01T08:00:00Z", "2024-05-01T08:10:00Z") +
		row("unix0", "0", "600") +
		row("year1", "0001-01-01T08:00:00Z", "0001-01-01T08:10:00Z") +
		row("year9000", "9000-01-01T08:00:00Z", "9000-01-01T08:10:00Z") +
		row("gap", "2024-03-31 02:20:00", "2024-03-31 03:40:00") +
		row("overlap", "2024-10-27 02:30:00", "2024-10-27 02:50:00") +
		row("gap end", "2024-03-31 01:40:00", "2024-03-31 02:10:00")
	opts := DefaultOptions()
	opts.TimeZone = "Europe/Berlin"
	s, err := ingestString(t, p, FormatTrips, csv, opts)
	if err != nil {
		t.Fatal(err)
	}
	q := s.Meta.Quality
	checkQuality(t, q)
	if q.Used != 1 || q.Rejected[string(ReasonImplausibleTime)] != 3 || q.Rejected[string(ReasonDSTGap)] != 2 ||
		q.Rejected[string(ReasonDSTOverlap)] != 1 || q.Rejected[string(ReasonBadDuration)] != 0 {
		t.Errorf("%s", nonZeroReasons(q))
	}
	if days := s.Days(testWindow(s, "all")); len(days) != 1 {
		t.Errorf("days %v", days)
	}
	// A settable span.
	opts.EarliestTime = time.Date(2024, 6, 1, 0, 0, 0, 0, time.UTC)
	opts.LatestTime = time.Date(2024, 7, 1, 0, 0, 0, 0, time.UTC)
	opts.MinUsedShare = 0
	if _, err := ingestString(t, p, FormatTrips, csv, opts); !errors.As(err, new(*YieldError)) {
		t.Errorf("May trip outside June: %v", err)
	}
	opts.Strict = true
	_, err = ingestString(t, p, FormatTrips, tripHeader+row("gap", "2024-03-31 02:20:00", "2024-03-31 03:40:00"), DefaultOptions())
	if err == nil {
		t.Log("UTC has no gap") // the default zone; the next call is the check
	}
	opts = DefaultOptions()
	opts.TimeZone, opts.Strict = "Europe/Berlin", true
	_, err = ingestString(t, p, FormatTrips, tripHeader+row("gap", "2024-03-31 02:20:00", "2024-03-31 03:40:00"), opts)
	var re *RowError
	if !errors.As(err, &re) || re.Reason != ReasonDSTGap || re.Line != 2 || re.Column != colStartTime {
		t.Errorf("strict gap: %v", err)
	}
}

func TestPlainNumbers(t *testing.T) {
	tests := []struct {
		in   string
		want float64
		ok   bool
	}{
		{"13.5", 13.5, true}, {"-0.5", -0.5, true}, {"+2", 2, true}, {".5", 0.5, true}, {"5.", 5, true},
		{"1e3", 1000, true}, {"2.5E-1", 0.25, true}, {"1234567890123456789", 1234567890123456789, true},
		{"0x1p10", 0, false}, {"1_000", 0, false}, {"Inf", 0, false}, {"-inf", 0, false}, {"NaN", 0, false},
		{"infinity", 0, false}, {"1e400", 0, false}, {"1e", 0, false}, {".", 0, false}, {"e5", 0, false},
		{"0X10", 0, false}, {"1.2.3", 0, false}, {" 1", 0, false},
	}
	for _, tc := range tests {
		got, err := parseFloat([]byte(tc.in))
		if (err == nil) != tc.ok || tc.ok && got != tc.want {
			t.Errorf("%q: %v, %v; want %v (ok %v)", tc.in, got, err, tc.want, tc.ok)
		}
	}
}

func TestTooFewRowsUsed(t *testing.T) {
	p := gridPartition(2, 1, 13.0, 52.0, 0.02)
	var rows strings.Builder
	for i := 0; i < 50; i++ {
		rows.WriteString(goodRow(i))
	}
	km := DefaultOptions()
	km.DistanceUnit = "km"
	mapped := DefaultOptions()
	mapped.Columns = map[string]string{colStartTime: "end_time"}
	tests := []struct {
		name string
		csv  string
		opts Options
		want string
	}{
		{"header only", tripHeader, DefaultOptions(), "no row of 0 used"},
		{"wrong distance unit", tripHeader + rows.String(), km, "bad speed 50. Check the distance unit"},
		{"two columns on one header", tripHeader + rows.String(), mapped, "bad duration 50. Check the time zone"},
	}
	for _, tc := range tests {
		_, err := ingestString(t, p, FormatTrips, tc.csv, tc.opts)
		var ye *YieldError
		if !errors.As(err, &ye) || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: %v, want %q", tc.name, err, tc.want)
		}
	}
	// Under the share: 1 of 50 rows used.
	var mixed strings.Builder
	mixed.WriteString(tripHeader + goodRow(0))
	for i := 1; i < 50; i++ {
		mixed.WriteString(strings.Replace(goodRow(i), "13.030", "13.015", 1)) // intra-region
	}
	opts := DefaultOptions()
	opts.MinUsedShare = 0.1
	if _, err := ingestString(t, p, FormatTrips, mixed.String(), opts); !errors.As(err, new(*YieldError)) ||
		!strings.Contains(err.Error(), "1 of 50 rows used") {
		t.Errorf("share: %v", err)
	}
	opts.MinUsedShare = 0.01
	if _, err := ingestString(t, p, FormatTrips, mixed.String(), opts); err != nil {
		t.Errorf("share 0.01: %v", err)
	}
}

// TestEveryLineCounted corrupts a trip table at random (stray quotes,
// deleted and inserted bytes, repeated lines, Go number literals, cut
// lines) and checks the accounting: with quoted fields held to one line,
// every line after the header is one row read, and every row read is used
// or rejected once.
func TestEveryLineCounted(t *testing.T) {
	p := gridPartition(2, 1, 13.0, 52.0, 0.02)
	rng := rand.New(rand.NewPCG(14, 14))
	for trial := 0; trial < 300; trial++ {
		lines := []string{strings.TrimSuffix(tripHeader, "\n")}
		for i := 0; i < 40; i++ {
			lines = append(lines, strings.TrimSuffix(goodRow(i), "\n"))
		}
		for k := 0; k < 1+rng.IntN(8); k++ {
			i := 1 + rng.IntN(len(lines)-1)
			l := lines[i]
			at := rng.IntN(len(l) + 1)
			switch rng.IntN(7) {
			case 0:
				lines[i] = l[:at] + `"` + l[at:]
			case 1:
				if len(l) > 1 {
					lines[i] = l[:min(at, len(l)-1)] + l[min(at, len(l)-1)+1:]
				}
			case 2:
				lines = append(lines[:i+1], lines[i:]...) // a repeated line
			case 3:
				lines[i] = strings.Replace(l, "2000", []string{"0x1p11", "2_000", "Inf", "1e400"}[rng.IntN(4)], 1)
			case 4:
				lines[i] = `"` + l // a quote opening the line's first field
			case 5:
				lines[i] = l[:at] + `""` + l[at:]
			case 6:
				lines[i] = l[:at] + "," + l[at:]
			}
		}
		text := strings.Join(lines, "\n")
		if rng.IntN(2) == 0 {
			text += "\n"
		}
		want := int64(0)
		for _, l := range lines[1:] {
			if strings.TrimSpace(l) != "" {
				want++
			}
		}
		for _, maxLines := range []int{1, 10} {
			opts := DefaultOptions()
			opts.MaxQuotedLines = maxLines
			opts.MinUsedShare = 0
			s, err := ingestString(t, p, FormatTrips, text, opts)
			var q Quality
			var ye *YieldError
			switch {
			case errors.As(err, &ye):
				q = ye.Quality
			case err != nil:
				t.Fatalf("trial %d: %v\n%s", trial, err, text)
			default:
				q = s.Meta.Quality
			}
			checkQuality(t, q)
			if maxLines == 1 && q.Read != want || q.Read > want {
				t.Fatalf("trial %d, quoted lines %d: %d rows read, %d lines after the header\n%s", trial, maxLines, q.Read, want, text)
			}
		}
	}
}

// BenchmarkStrayQuote reads a trip table with a quote that never closes
// on line 3 and 150,000 rows after it, beside the same file without the
// quote: the two take about the same time, and every row but the quote's
// is used.
func BenchmarkStrayQuote(b *testing.B) {
	p := gridPartition(2, 1, 13.0, 52.0, 0.02)
	stray := strayQuoteCSV(150000)
	plain := strings.Replace(stray, "\n\"t1,", "\nt1,", 1)
	for _, bc := range []struct{ name, text string }{{"plain", plain}, {"stray-quote", stray}} {
		b.Run(bc.name, func(b *testing.B) {
			path := writeTemp(b, "trips.csv", bc.text)
			for b.Loop() {
				s, err := Ingest(b.Context(), p, "r", []Input{{Path: path}}, DefaultOptions())
				if err != nil {
					b.Fatal(err)
				}
				if q := s.Meta.Quality; q.Used < 150001 || q.Read != 150002 {
					b.Fatalf("%+v", q)
				}
			}
			b.ReportMetric(float64(150002)*float64(b.N)/b.Elapsed().Seconds(), "rows/s")
		})
	}
}
