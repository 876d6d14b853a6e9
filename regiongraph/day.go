package regiongraph

import (
	"fmt"
	"time"
)

// Day is a local calendar day: the days since 1970-01-01 of the proleptic
// Gregorian calendar (1970-01-02 is 1, 1969-12-31 is -1). It is the day of
// an Edge and of a PlacedTrip; a number rather than its text, so that an
// edge holds no pointer (the collector need not look into millions of
// edges) and days compare and index as integers. The store writes it as
// its text, YYYY-MM-DD (String).
type Day int32

// String returns the day as YYYY-MM-DD.
func (d Day) String() string { return dayString(int64(d)) }

// ParseDay parses a day written YYYY-MM-DD: four digits of year, two of
// month, two of day, a date of the Gregorian calendar (the layout
// time.DateOnly accepts).
func ParseDay(s string) (Day, error) {
	bad := func() (Day, error) { return 0, fmt.Errorf("day %q is not a date YYYY-MM-DD", s) }
	if len(s) != 10 || s[4] != '-' || s[7] != '-' {
		return bad()
	}
	num := func(i, j int) (int, bool) {
		n := 0
		for k := i; k < j; k++ {
			c := s[k]
			if c < '0' || c > '9' {
				return 0, false
			}
			n = n*10 + int(c-'0')
		}
		return n, true
	}
	y, ok1 := num(0, 4)
	m, ok2 := num(5, 7)
	d, ok3 := num(8, 10)
	if !ok1 || !ok2 || !ok3 || m < 1 || m > 12 || d < 1 || d > daysIn(y, m) {
		return bad()
	}
	return Day(daysFromCivil(y, m, d)), nil
}

// DayOf returns the calendar day of t in t's location.
func DayOf(t time.Time) Day {
	y, m, d := t.Date()
	return Day(daysFromCivil(y, int(m), d))
}

// Date returns the day's year, month and day of the month.
func (d Day) Date() (year int, month time.Month, day int) {
	y, m, dd := civilFromDays(int64(d))
	return y, time.Month(m), dd
}

// Time returns the day's midnight in loc (the first instant of the day
// where a time-zone change skips midnight).
func (d Day) Time(loc *time.Location) time.Time {
	y, m, dd := d.Date()
	return time.Date(y, m, dd, 0, 0, 0, 0, loc)
}

// Weekday returns the day of the week; 1970-01-01 was a Thursday.
func (d Day) Weekday() time.Weekday {
	return time.Weekday(((int64(d)+4)%7 + 7) % 7)
}

// AddDays returns the day n days after d (before d when n is negative).
func (d Day) AddDays(n int) Day { return d + Day(n) }
