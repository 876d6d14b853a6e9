package regiongraph

import (
	"errors"
	"math"
	"strconv"
	"time"
	"unsafe"
)

var (
	errSyntax     = errors.New("syntax")
	errDSTGap     = errors.New("local time in a DST gap")
	errDSTOverlap = errors.New("local time in a DST overlap")
)

// bytesString views b as a string without copying; the string must not
// outlive b's contents.
func bytesString(b []byte) string {
	if len(b) == 0 {
		return ""
	}
	return unsafe.String(&b[0], len(b))
}

// exact powers of ten representable in float64
var pow10 = [...]float64{1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10,
	1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22}

// parseFloat parses a decimal number: an optional sign, digits with an
// optional fraction, and an optional exponent ("13.4", "-.5", "1e3",
// "2.5E-1"). Plain decimals with at most 15 significant digits take a fast
// path that is exact (one correctly rounded division of exact values, the
// same result as strconv); the rest go to strconv.ParseFloat once the
// syntax is checked, since strconv also reads Go literal forms (0x1p10,
// 1_000, Inf, NaN) that no table of measurements means. Values out of
// range are rejected.
func parseFloat(b []byte) (float64, error) {
	i, neg := 0, false
	if len(b) > 0 && (b[0] == '-' || b[0] == '+') {
		neg = b[0] == '-'
		i++
	}
	var mant uint64
	digits, frac := 0, 0
	start := i
	for ; i < len(b) && b[i] >= '0' && b[i] <= '9'; i++ {
		mant = mant*10 + uint64(b[i]-'0')
		if mant != 0 {
			digits++
		}
	}
	intDigits := i - start
	if i < len(b) && b[i] == '.' {
		i++
		fs := i
		for ; i < len(b) && b[i] >= '0' && b[i] <= '9'; i++ {
			mant = mant*10 + uint64(b[i]-'0')
			if mant != 0 {
				digits++
			}
		}
		frac = i - fs
	}
	if i == len(b) && intDigits+frac > 0 && digits <= 15 && frac < len(pow10) {
		f := float64(mant)
		if frac > 0 {
			f /= pow10[frac]
		}
		if neg {
			f = -f
		}
		return f, nil
	}
	if !plainNumber(b) {
		return 0, errSyntax
	}
	f, err := strconv.ParseFloat(bytesString(b), 64)
	if err != nil || math.IsInf(f, 0) || math.IsNaN(f) {
		return 0, errSyntax
	}
	return f, nil
}

// plainNumber reports whether b is [+-]digits[.digits][(e|E)[+-]digits],
// with digits on at least one side of the point.
func plainNumber(b []byte) bool {
	i := 0
	if i < len(b) && (b[i] == '+' || b[i] == '-') {
		i++
	}
	digits := func() int {
		n := 0
		for ; i < len(b) && b[i] >= '0' && b[i] <= '9'; i++ {
			n++
		}
		return n
	}
	n := digits()
	if i < len(b) && b[i] == '.' {
		i++
		n += digits()
	}
	if n == 0 {
		return false
	}
	if i < len(b) && (b[i] == 'e' || b[i] == 'E') {
		i++
		if i < len(b) && (b[i] == '+' || b[i] == '-') {
			i++
		}
		if digits() == 0 {
			return false
		}
	}
	return i == len(b)
}

// zoneCache converts between instants and local civil time in one zone,
// remembering the two zone periods (offset and validity) used last: trips
// that straddle a change, or unsorted rows on both sides of one, alternate
// between two periods. It is not safe for concurrent use; each reader
// goroutine has its own.
type zoneCache struct {
	loc     *time.Location
	periods [2]zonePeriod // most recently used first
	// offsetTimes counts the parsed times that carry a numeric UTC offset
	// (+HH:MM, -HHMM; not Z, which says only that the time is in UTC);
	// offsetMismatch those whose offset is not the zone's at that instant,
	// a sign that the study's time zone is not the data's.
	offsetTimes, offsetMismatch int64
}

type zonePeriod struct {
	start, end int64 // [start, end) in Unix seconds; empty when start > end
	offset     int64 // seconds east of UTC
}

func newZoneCache(loc *time.Location) *zoneCache {
	z := &zoneCache{loc: loc}
	z.periods[0] = zonePeriod{start: 1, end: 0}
	z.periods[1] = zonePeriod{start: 1, end: 0}
	return z
}

// lookup makes the period holding unix the first one.
func (z *zoneCache) lookup(unix int64) *zonePeriod {
	if p := &z.periods[0]; unix >= p.start && unix < p.end {
		return p
	}
	if p := z.periods[1]; unix >= p.start && unix < p.end {
		z.periods[0], z.periods[1] = p, z.periods[0]
		return &z.periods[0]
	}
	t := time.Unix(unix, 0).In(z.loc)
	_, off := t.Zone()
	p := zonePeriod{start: math.MinInt64, end: math.MaxInt64, offset: int64(off)}
	s, e := t.ZoneBounds()
	if !s.IsZero() {
		p.start = s.Unix()
	}
	if !e.IsZero() {
		p.end = e.Unix()
	}
	z.periods[1], z.periods[0] = z.periods[0], p
	return &z.periods[0]
}

// local returns the local civil seconds (seconds since 1970-01-01 00:00 of
// the local calendar) of a Unix time.
func (z *zoneCache) local(unix int64) int64 {
	return unix + z.lookup(unix).offset
}

// fromCivil returns the Unix time of a local civil time; in a gap or an
// overlap, the one time.Date gives (for Parquet timestamps without zone,
// which are checked elsewhere).
func (z *zoneCache) fromCivil(civil int64) int64 {
	if u, err := z.civilInstant(civil); err == nil {
		return u
	}
	days := floorDiv(civil, 86400)
	y, m, d := civilFromDays(days)
	sec := civil - days*86400
	u := time.Date(y, time.Month(m), d, int(sec/3600), int(sec/60%60), int(sec%60), 0, z.loc).Unix()
	z.lookup(u)
	return u
}

// civilInstant returns the Unix time of a local civil time. Near a zone
// transition it checks the offsets on both sides: a civil time that none
// gives back lies in a gap (the clocks skip it, errDSTGap), one that two
// give back in an overlap (the clocks show it twice, errDSTOverlap), and
// its instant is unknown in both cases.
func (z *zoneCache) civilInstant(civil int64) (int64, error) {
	const margin = 2 * 86400
	for i := range z.periods {
		p := &z.periods[i]
		if u := civil - p.offset; u-margin >= p.start && u+margin < p.end {
			return u, nil
		}
	}
	found, n := int64(0), 0
	var offsets [2]int64
	// One lookup at a time: lookup returns its cache's first slot.
	offsets[0] = z.lookup(civil - margin).offset
	offsets[1] = z.lookup(civil + margin).offset
	for i, off := range offsets {
		if i == 1 && off == offsets[0] {
			break
		}
		if u := civil - off; z.local(u) == civil {
			found = u
			n++
		}
	}
	switch n {
	case 0:
		return 0, errDSTGap
	case 2:
		return 0, errDSTOverlap
	}
	return found, nil
}

func floorDiv(a, b int64) int64 {
	q := a / b
	if (a%b != 0) && ((a < 0) != (b < 0)) {
		q--
	}
	return q
}

// daysFromCivil returns the days since 1970-01-01 of a proleptic Gregorian
// date (the well-known era-based conversion).
func daysFromCivil(y, m, d int) int64 {
	if m <= 2 {
		y--
	}
	era := y / 400
	if y < 0 && y%400 != 0 {
		era = (y - 399) / 400
	}
	yoe := y - era*400
	mp := (m + 9) % 12
	doy := (153*mp+2)/5 + d - 1
	doe := yoe*365 + yoe/4 - yoe/100 + doy
	return int64(era)*146097 + int64(doe) - 719468
}

func civilFromDays(z int64) (y, m, d int) {
	z += 719468
	era := z / 146097
	if z < 0 && z%146097 != 0 {
		era = (z - 146096) / 146097
	}
	doe := z - era*146097
	yoe := (doe - doe/1460 + doe/36524 - doe/146096) / 365
	yy := yoe + era*400
	doy := doe - (365*yoe + yoe/4 - yoe/100)
	mp := (5*doy + 2) / 153
	d = int(doy - (153*mp+2)/5 + 1)
	m = int(mp + 3)
	if m > 12 {
		m -= 12
	}
	if m <= 2 {
		yy++
	}
	return int(yy), m, d
}

func dayString(day int64) string {
	y, m, d := civilFromDays(day)
	var b [10]byte
	if y < 0 || y > 9999 {
		return time.Date(y, time.Month(m), d, 0, 0, 0, 0, time.UTC).Format("2006-01-02")
	}
	b[0], b[1], b[2], b[3] = byte('0'+y/1000), byte('0'+y/100%10), byte('0'+y/10%10), byte('0'+y%10)
	b[4] = '-'
	b[5], b[6] = byte('0'+m/10), byte('0'+m%10)
	b[7] = '-'
	b[8], b[9] = byte('0'+d/10), byte('0'+d%10)
	return string(b[:])
}

func daysIn(y, m int) int {
	switch m {
	case 2:
		if y%4 == 0 && (y%100 != 0 || y%400 == 0) {
			return 29
		}
		return 28
	case 4, 6, 9, 11:
		return 30
	}
	return 31
}

// parseTime parses a time as Unix milliseconds. Accepted: RFC 3339
// ("2024-03-31T08:15:00+02:00", "...Z", fractional seconds allowed),
// "YYYY-MM-DD HH:MM:SS" (or with "T", optionally with fractional seconds)
// in the study zone, and Unix seconds (digits, optionally with a fraction).
func parseTime(b []byte, z *zoneCache) (int64, error) {
	if len(b) >= 19 && b[4] == '-' {
		return parseDateTime(b, z)
	}
	return parseUnix(b)
}

func parseUnix(b []byte) (int64, error) {
	i, neg := 0, false
	if len(b) > 0 && b[0] == '-' {
		neg = true
		i++
	}
	var sec int64
	n := 0
	for ; i < len(b) && b[i] >= '0' && b[i] <= '9'; i++ {
		if n >= 12 { // beyond year 33000
			return 0, errSyntax
		}
		sec = sec*10 + int64(b[i]-'0')
		n++
	}
	if n == 0 {
		return 0, errSyntax
	}
	ms := sec * 1000
	if i < len(b) && b[i] == '.' {
		i++
		scale := int64(100)
		for ; i < len(b) && b[i] >= '0' && b[i] <= '9'; i++ {
			ms += int64(b[i]-'0') * scale
			scale /= 10
		}
	}
	if i != len(b) {
		return 0, errSyntax
	}
	if neg {
		ms = -ms
	}
	return ms, nil
}

func digits2(b []byte) (int, bool) {
	d0, d1 := b[0]-'0', b[1]-'0'
	if d0 > 9 || d1 > 9 {
		return 0, false
	}
	return int(d0)*10 + int(d1), true
}

func parseDateTime(b []byte, z *zoneCache) (int64, error) {
	c, ok1 := digits2(b[0:2])
	yy, ok2 := digits2(b[2:4])
	mo, ok3 := digits2(b[5:7])
	d, ok4 := digits2(b[8:10])
	h, ok5 := digits2(b[11:13])
	mi, ok6 := digits2(b[14:16])
	s, ok7 := digits2(b[17:19])
	if !(ok1 && ok2 && ok3 && ok4 && ok5 && ok6 && ok7) || b[7] != '-' ||
		(b[10] != ' ' && b[10] != 'T' && b[10] != 't') || b[13] != ':' || b[16] != ':' {
		return 0, errSyntax
	}
	y := c*100 + yy
	if mo < 1 || mo > 12 || d < 1 || d > daysIn(y, mo) || h > 23 || mi > 59 || s > 59 {
		return 0, errSyntax
	}
	i := 19
	var ms int64
	if i < len(b) && b[i] == '.' {
		i++
		scale := int64(100)
		n := 0
		for ; i < len(b) && b[i] >= '0' && b[i] <= '9'; i++ {
			ms += int64(b[i]-'0') * scale
			scale /= 10
			n++
		}
		if n == 0 {
			return 0, errSyntax
		}
	}
	civil := daysFromCivil(y, mo, d)*86400 + int64(h*3600+mi*60+s)
	if i == len(b) {
		u, err := z.civilInstant(civil)
		return u*1000 + ms, err
	}
	switch b[i] {
	case 'Z', 'z':
		if i+1 != len(b) {
			return 0, errSyntax
		}
		return civil*1000 + ms, nil
	case '+', '-':
		rest := b[i+1:]
		var oh, om int
		var ok bool
		switch len(rest) {
		case 5: // HH:MM
			if rest[2] != ':' {
				return 0, errSyntax
			}
			oh, ok = digits2(rest[0:2])
			if ok {
				om, ok = digits2(rest[3:5])
			}
		case 4: // HHMM
			oh, ok = digits2(rest[0:2])
			if ok {
				om, ok = digits2(rest[2:4])
			}
		default:
			return 0, errSyntax
		}
		if !ok || oh > 23 || om > 59 {
			return 0, errSyntax
		}
		off := int64(oh*3600 + om*60)
		if b[i] == '-' {
			off = -off
		}
		z.offsetTimes++
		if z.lookup(civil-off).offset != off {
			z.offsetMismatch++
		}
		return (civil-off)*1000 + ms, nil
	}
	return 0, errSyntax
}

// parseBool parses an occupied flag.
func parseBool(b []byte) (bool, error) {
	switch bytesString(b) {
	case "1", "t", "T", "true", "TRUE", "True", "y", "Y", "yes", "YES", "Yes":
		return true, nil
	case "0", "f", "F", "false", "FALSE", "False", "n", "N", "no", "NO", "No":
		return false, nil
	}
	return false, errSyntax
}
