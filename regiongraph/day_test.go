package regiongraph

import (
	"testing"
	"time"
)

// TestDayAgainstTime checks Day against the standard library's calendar
// (the oracle: package time, proleptic Gregorian): for every day of a
// range of years around 1970 and of the leap-year rules' edges (1600,
// 1900, 2000, 2100), the day number is the days since 1970-01-01, and
// String, ParseDay, Date, Weekday, Time and AddDays agree with time.
func TestDayAgainstTime(t *testing.T) {
	ranges := []struct{ from, to time.Time }{
		{time.Date(1599, 12, 1, 0, 0, 0, 0, time.UTC), time.Date(1601, 3, 31, 0, 0, 0, 0, time.UTC)},
		{time.Date(1899, 12, 1, 0, 0, 0, 0, time.UTC), time.Date(1901, 3, 31, 0, 0, 0, 0, time.UTC)},
		{time.Date(1968, 1, 1, 0, 0, 0, 0, time.UTC), time.Date(2030, 12, 31, 0, 0, 0, 0, time.UTC)},
		{time.Date(2099, 12, 1, 0, 0, 0, 0, time.UTC), time.Date(2101, 3, 31, 0, 0, 0, 0, time.UTC)},
		{time.Date(0, 1, 1, 0, 0, 0, 0, time.UTC), time.Date(0, 3, 31, 0, 0, 0, 0, time.UTC)},
		{time.Date(9999, 10, 1, 0, 0, 0, 0, time.UTC), time.Date(9999, 12, 31, 0, 0, 0, 0, time.UTC)},
	}
	berlin, err := time.LoadLocation("Europe/Berlin")
	if err != nil {
		t.Skip("no time zone database:", err)
	}
	n := 0
	for _, r := range ranges {
		for tm := r.from; !tm.After(r.to); tm = tm.AddDate(0, 0, 1) {
			n++
			// A UTC midnight is a whole number of days of Unix time.
			want := Day(tm.Unix() / 86400)
			text := tm.Format(time.DateOnly)
			if d := DayOf(tm); d != want {
				t.Fatalf("DayOf(%s) = %d, want %d", text, d, want)
			}
			if s := want.String(); s != text {
				t.Fatalf("Day(%d).String() = %s, want %s", want, s, text)
			}
			if d, err := ParseDay(text); err != nil || d != want {
				t.Fatalf("ParseDay(%s) = %d, %v; want %d", text, d, err, want)
			}
			if y, m, dd := want.Date(); y != tm.Year() || m != tm.Month() || dd != tm.Day() {
				t.Fatalf("Day(%d).Date() = %d-%d-%d, want %s", want, y, m, dd, text)
			}
			if w := want.Weekday(); w != tm.Weekday() {
				t.Fatalf("%s: weekday %v, want %v", text, w, tm.Weekday())
			}
			if got := want.Time(time.UTC); !got.Equal(tm) {
				t.Fatalf("%s: Time = %v", text, got)
			}
			// The local day of an instant is its date where it is.
			local := time.Date(tm.Year(), tm.Month(), tm.Day(), 23, 30, 0, 0, berlin)
			if d := DayOf(local); d != want {
				t.Fatalf("DayOf(%v) = %s, want %s", local, d, text)
			}
			if next := want.AddDays(1).String(); next != tm.AddDate(0, 0, 1).Format(time.DateOnly) && tm.Year() < 9999 {
				t.Fatalf("%s + 1 day = %s", text, next)
			}
		}
	}
	if n < 20000 {
		t.Fatalf("only %d days checked", n)
	}
	// Days outside the four-digit years still print as time does.
	for _, d := range []Day{-719529, 2932897, -1 << 31, 1<<31 - 1} {
		y, m, dd := d.Date()
		if s, want := d.String(), time.Date(y, m, dd, 0, 0, 0, 0, time.UTC).Format(time.DateOnly); s != want {
			t.Errorf("Day(%d).String() = %s, time says %s", d, s, want)
		}
	}
}

func TestParseDayRefuses(t *testing.T) {
	for _, s := range []string{"", "2024-1-05", "2024-01-5", "24-01-05", "2023-02-29", "2100-02-29", "2024-13-01",
		"2024-00-10", "2024-04-31", "2024-04-00", "2024/04/01", " 2024-04-01", "2024-04-01 ", "+024-04-01", "2024-04-01T00"} {
		if d, err := ParseDay(s); err == nil {
			t.Errorf("ParseDay(%q) = %s, want an error", s, d)
		}
	}
	for _, s := range []string{"2024-02-29", "2000-02-29", "1600-02-29", "0000-01-01", "9999-12-31"} {
		if d, err := ParseDay(s); err != nil || d.String() != s {
			t.Errorf("ParseDay(%q) = %s, %v", s, d, err)
		}
	}
}

// FuzzParseDay holds ParseDay to time.Parse with time.DateOnly: the same
// texts are days, and the same day comes out.
func FuzzParseDay(f *testing.F) {
	for _, s := range []string{"2024-02-29", "2023-02-29", "1970-01-01", "0000-12-31", "9999-12-31", "2024-1-1", "abcd-ef-gh", "2024-06-31"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		d, err := ParseDay(s)
		tm, terr := time.Parse(time.DateOnly, s)
		if (err == nil) != (terr == nil) {
			t.Fatalf("ParseDay(%q): error %v, time.Parse: error %v", s, err, terr)
		}
		if err != nil {
			return
		}
		if d != DayOf(tm) || d.String() != s {
			t.Fatalf("ParseDay(%q) = %d (%s), time.Parse gives %s", s, d, d, tm.Format(time.DateOnly))
		}
	})
}
