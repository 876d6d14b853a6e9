package regiongraph

import (
	"fmt"
	"strings"
	"testing"
	"time"
)

// offsetTrips writes one trip a row, starting at the given RFC 3339 times
// (each row its own region pair), ending ten minutes later in UTC.
func offsetTrips(starts []string) string {
	var b strings.Builder
	b.WriteString(tripHeader)
	for i, s := range starts {
		st, _ := time.Parse(time.RFC3339, s)
		end := st.Add(10 * time.Minute).UTC().Format(time.RFC3339)
		fmt.Fprintf(&b, "r%d,%s,%s,13.01,%.3f,13.03,%.3f,2000\n", i, s, end, 52.001+0.02*float64(i), 52.001+0.02*float64(i))
	}
	return b.String()
}

func TestOffsetsAgainstTimeZone(t *testing.T) {
	// Berlin is +01:00 in winter and +02:00 in summer (CET/CEST, the IANA
	// database); Z says only that a time is in UTC and is never counted.
	starts := []string{
		"2024-01-15T08:00:00+01:00", // Berlin's offset in January
		"2024-07-15T08:00:00+02:00", // Berlin's offset in July
		"2024-07-15T08:00:00+01:00", // not Berlin's in July
		"2024-07-15T06:00:00Z",
		"2024-07-15T08:00:00-05:00",
	}
	for _, tc := range []struct {
		zone              string
		offsets, mismatch int64
	}{
		{"Europe/Berlin", 4, 2},
		{"UTC", 4, 4},
		{"America/New_York", 4, 4}, // New York is -04:00 in July (EDT), -05:00 only in winter
	} {
		t.Run(tc.zone, func(t *testing.T) {
			opts := DefaultOptions()
			opts.TimeZone = tc.zone
			p := gridPartition(2, len(starts), 13.0, 52.0, 0.02)
			s, err := ingestString(t, p, FormatTrips, offsetTrips(starts), opts)
			if err != nil {
				t.Fatal(err)
			}
			q := s.Meta.Quality
			// The ends are written with Z and are not counted.
			if q.OffsetTimes != tc.offsets || q.OffsetMismatch != tc.mismatch {
				t.Errorf("offset times %d, mismatched %d; want %d and %d", q.OffsetTimes, q.OffsetMismatch, tc.offsets, tc.mismatch)
			}
			opts.Strict = true
			_, err = ingestString(t, p, FormatTrips, offsetTrips(starts), opts)
			if err == nil || !strings.Contains(err.Error(), "time zone "+tc.zone) {
				t.Errorf("strict: error %v, want the offset mismatch naming %s", err, tc.zone)
			}
		})
	}
}
