package regiongraph

import (
	"math/rand/v2"
	"testing"
)

// The row set, held to a tiny budget so that days go to the spill file and
// come back, judges every row as a map of all rows seen does (the
// brute-force oracle): first sight used, an exact repeat a duplicate row,
// a repeated id with other content a duplicate trip id; repeats are looked
// for within a day.
func TestRowSetSpillsAndAgreesWithAMap(t *testing.T) {
	cases := []struct {
		name  string
		order func(i int, rng *rand.Rand) int32 // the day of row i
	}{
		{"sorted", func(i int, _ *rand.Rand) int32 { return int32(i / 2000) }},
		{"overlapping exports", func(i int, _ *rand.Rand) int32 {
			if i < 20000 {
				return int32(i / 2000) // days 0-9
			}
			return int32(6 + (i-20000)/2000) // days 6-15
		}},
		{"shuffled", func(_ int, rng *rand.Rand) int32 { return int32(rng.IntN(12)) }},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			spill := newSpillFile(t.TempDir())
			defer spill.close()
			s := newRowSet(16<<10, spill)
			s.cold = 500
			rng := rand.New(rand.NewPCG(3, 4))
			type dayID struct {
				day int32
				id  uint64
			}
			firstContent := map[dayID]uint64{}
			counts := map[Reason]int{}
			for i := 0; i < 40000; i++ {
				day := c.order(i, rng)
				id := uint64(rng.IntN(1500))*2 + 1   // ids repeat within a day
				content := uint64(rng.IntN(2)) << 48 // two variants of each row
				k := rowKey{day: Day(day), id: id, content: content | id}
				want := reasonUsed
				if fc, ok := firstContent[dayID{day, id}]; !ok {
					firstContent[dayID{day, id}] = k.content
				} else if uint16(fc>>48) == uint16(k.content>>48) {
					want = ReasonDuplicateRow
				} else {
					want = ReasonDuplicateTripID
				}
				if got := s.check(k); got != want {
					t.Fatalf("row %d (day %d, id %d): %q, want %q", i, day, id, got, want)
				}
				counts[want]++
			}
			if s.err != nil {
				t.Fatal(s.err)
			}
			if c.name != "shuffled" && spill.written() == 0 {
				t.Error("nothing spilled: the budget did not bite")
			}
			if counts[reasonUsed] == 0 || counts[ReasonDuplicateRow] == 0 || counts[ReasonDuplicateTripID] == 0 {
				t.Errorf("verdicts %v: a kind never came up", counts)
			}
		})
	}
}

// rowHash has no seed: the same bytes give the same hash on every call,
// and bytes differing in their last byte, at every tail length, differ in
// hash.
func TestRowHashIsFixed(t *testing.T) {
	a, b := rowHash([]byte("7,2024-03-01 08:00:00,2024-03-01 08:20:00,13.4,52.5,13.5,52.6,9000")), rowHash([]byte("7"))
	if a == b || a == 0 || b == 0 {
		t.Fatalf("hashes %x %x", a, b)
	}
	if again := rowHash([]byte("7")); again != b {
		t.Errorf("rowHash changed between calls: %x, %x", b, again)
	}
	for n := 0; n < 24; n++ { // every tail length gives a distinct hash
		seen := map[uint64]int{}
		buf := make([]byte, n)
		for v := 0; v < 256; v++ {
			if n > 0 {
				buf[n-1] = byte(v)
			}
			h := rowHash(buf)
			if j, dup := seen[h]; dup && n > 0 {
				t.Fatalf("length %d: bytes %d and %d share hash %x", n, j, v, h)
			}
			seen[h] = v
		}
	}
}
