package regiongraph

import (
	"math/rand/v2"
	"strconv"
	"testing"
	"time"
)

func TestParseFloatMatchesStrconv(t *testing.T) {
	cases := []string{"0", "-0", "1", "13.404954", "-73.98765432", "52.5200066", "+3.5", "0.000001",
		"123456789012345", "1234567890123456789", "1e3", "2.5E-3", ".5", "5.", "180", "-90.0000000"}
	rng := rand.New(rand.NewPCG(5, 6))
	for i := 0; i < 5000; i++ {
		f := (rng.Float64() - 0.5) * 400
		cases = append(cases, strconv.FormatFloat(f, 'f', rng.IntN(12), 64))
	}
	for _, s := range cases {
		want, err := strconv.ParseFloat(s, 64)
		got, gerr := parseFloat([]byte(s))
		if err != nil {
			if gerr == nil {
				t.Errorf("%q: got %v, strconv rejects", s, got)
			}
			continue
		}
		if gerr != nil || got != want {
			t.Errorf("%q: got %v (%v), strconv %v", s, got, gerr, want)
		}
	}
	for _, bad := range []string{"", "-", ".", "abc", "1.2.3", "1,5", "NaN", "inf", "-Inf", "1e400"} {
		if v, err := parseFloat([]byte(bad)); err == nil {
			t.Errorf("%q: accepted as %v", bad, v)
		}
	}
}

func TestParseTime(t *testing.T) {
	berlin, err := time.LoadLocation("Europe/Berlin")
	if err != nil {
		t.Fatal(err)
	}
	ms := func(tm time.Time) int64 { return tm.UnixMilli() }
	tests := []struct {
		in   string
		want int64
	}{
		{"2024-03-31T08:15:00Z", ms(time.Date(2024, 3, 31, 8, 15, 0, 0, time.UTC))},
		{"2024-03-31T08:15:00.250+02:00", ms(time.Date(2024, 3, 31, 6, 15, 0, 250e6, time.UTC))},
		{"2024-03-31T08:15:00-0330", ms(time.Date(2024, 3, 31, 11, 45, 0, 0, time.UTC))},
		{"2024-01-15 12:00:00", ms(time.Date(2024, 1, 15, 12, 0, 0, 0, berlin))},
		{"2024-07-15 12:00:00", ms(time.Date(2024, 7, 15, 12, 0, 0, 0, berlin))},
		{"2024-07-15T12:00:00.5", ms(time.Date(2024, 7, 15, 12, 0, 0, 5e8, berlin))},
		{"2024-03-31 03:30:00", ms(time.Date(2024, 3, 31, 3, 30, 0, 0, berlin))}, // first hour of summer time
		{"2024-03-31 01:59:59", ms(time.Date(2024, 3, 31, 1, 59, 59, 0, berlin))},
		{"2024-10-27 03:00:00", ms(time.Date(2024, 10, 27, 3, 0, 0, 0, berlin))},
		{"2024-02-29 00:00:00", ms(time.Date(2024, 2, 29, 0, 0, 0, 0, berlin))},
		{"1711872000", 1711872000 * 1000},
		{"1711872000.75", 1711872000*1000 + 750},
	}
	z := newZoneCache(berlin)
	for _, tc := range tests {
		got, err := parseTime([]byte(tc.in), z)
		if err != nil || got != tc.want {
			t.Errorf("%q: %d (%v), want %d", tc.in, got, err, tc.want)
		}
	}
	for _, bad := range []string{"", "yesterday", "2024-13-01 00:00:00", "2023-02-29 10:00:00", "2024-03-31 24:00:00",
		"2024-03-31T08:15:00+25:00", "2024-03-31T08:15:00ZZ", "2024/03/31 08:15:00", "17118720x0", "2024-03-31 8:15:00"} {
		if v, err := parseTime([]byte(bad), z); err == nil {
			t.Errorf("%q accepted as %d", bad, v)
		}
	}
}

func TestZoneCacheAgainstTimePackage(t *testing.T) {
	// Walk two years in odd steps through two zones with transitions and
	// compare the cached conversion both ways with the time package.
	for _, name := range []string{"Europe/Berlin", "America/Sao_Paulo", "Australia/Lord_Howe", "UTC"} {
		loc, err := time.LoadLocation(name)
		if err != nil {
			t.Fatal(err)
		}
		z := newZoneCache(loc)
		start := time.Date(2023, 1, 1, 0, 0, 0, 0, time.UTC).Unix()
		for u := start; u < start+2*365*86400; u += 3607 {
			tm := time.Unix(u, 0).In(loc)
			_, off := tm.Zone()
			if got := z.local(u); got != u+int64(off) {
				t.Fatalf("%s: local(%d) = %d, want %d", name, u, got, u+int64(off))
			}
			civil := u + int64(off)
			want := time.Date(tm.Year(), tm.Month(), tm.Day(), tm.Hour(), tm.Minute(), tm.Second(), 0, loc).Unix()
			if got := z.fromCivil(civil); got != want {
				t.Fatalf("%s: fromCivil(%s) = %d, want %d", name, tm, got, want)
			}
		}
	}
}

func TestCivilDays(t *testing.T) {
	for d := int64(-800000); d < 800000; d += 997 {
		y, m, dd := civilFromDays(d)
		want := time.Unix(d*86400, 0).UTC()
		if y != want.Year() || m != int(want.Month()) || dd != want.Day() {
			t.Fatalf("day %d: %d-%d-%d, want %s", d, y, m, dd, want)
		}
		if back := daysFromCivil(y, m, dd); back != d {
			t.Fatalf("round trip of day %d gave %d", d, back)
		}
		if d >= 0 && d < 2932896 && dayString(d) != want.Format("2006-01-02") {
			t.Fatalf("dayString(%d) = %s, want %s", d, dayString(d), want.Format("2006-01-02"))
		}
	}
}

func TestParseWindowAndColumns(t *testing.T) {
	good := []struct {
		in   string
		want Window
	}{
		{"am=07:00-10:00", Window{"am", 420, 600}},
		{"all=00:00-24:00", Window{"all", 0, 1440}},
		{"night=22:00-06:00", Window{"night", 1320, 360}},
		{" pm = 16:30 - 19:00 ", Window{"pm", 990, 1140}},
	}
	for _, tc := range good {
		got, err := ParseWindow(tc.in)
		if err != nil || got != tc.want {
			t.Errorf("ParseWindow(%q) = %v, %v; want %v", tc.in, got, err, tc.want)
		}
	}
	for _, bad := range []string{"", "am", "=07:00-10:00", "am=07:00", "am=7-10", "am=10:00-10:00", "am=25:00-26:00", "a m=07:00-08:00", "am=24:00-01:00"} {
		if w, err := ParseWindow(bad); err == nil {
			t.Errorf("ParseWindow(%q) accepted: %v", bad, w)
		}
	}
	w := Window{"night", 1320, 360}
	for m, want := range map[int]bool{1320: true, 1439: true, 0: true, 359: true, 360: false, 700: false} {
		if w.contains(m) != want {
			t.Errorf("%v contains %d: %v", w, m, !want)
		}
	}
	cols, err := ParseColumns("start_time=pickup, end_time = dropoff")
	if err != nil || len(cols) != 2 || cols["start_time"] != "pickup" || cols["end_time"] != "dropoff" {
		t.Errorf("ParseColumns: %v, %v", cols, err)
	}
	for _, bad := range []string{"pickup", "start_time=", "bogus=x", "start_time=a,start_time=b"} {
		if _, err := ParseColumns(bad); err == nil {
			t.Errorf("ParseColumns(%q) accepted", bad)
		}
	}
}

func TestQuantileType7(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	for n := 1; n < 40; n++ {
		vals := make([]float64, n)
		f32 := make([]float32, n)
		for i := range vals {
			f32[i] = float32(rng.Float64() * 30)
			vals[i] = float64(f32[i])
		}
		sorted := append([]float32(nil), f32...)
		sortFloat32(sorted)
		for _, p := range []float64{0, 0.25, 0.5, 0.75, 1} {
			if got, want := quantile(sorted, p), type7(vals, p); !near(got, want, 1e-12) {
				t.Fatalf("n=%d p=%v: %v, want %v", n, p, got, want)
			}
		}
	}
	// Known values (NumPy's default method, from memory of its definition):
	// [1 2 3 4] -> P25 1.75, median 2.5, P75 3.25.
	s := []float32{1, 2, 3, 4}
	if quantile(s, 0.25) != 1.75 || quantile(s, 0.5) != 2.5 || quantile(s, 0.75) != 3.25 {
		t.Errorf("quartiles of 1..4: %v %v %v", quantile(s, 0.25), quantile(s, 0.5), quantile(s, 0.75))
	}
}

func sortFloat32(s []float32) {
	for i := 1; i < len(s); i++ {
		for j := i; j > 0 && s[j] < s[j-1]; j-- {
			s[j], s[j-1] = s[j-1], s[j]
		}
	}
}
