package patterns

import "sort"

// findingKeys lists the edges of f, in its order (sorted by From, To).
func findingKeys(f Finding) []EdgeKey {
	keys := make([]EdgeKey, len(f.Edges))
	for i, e := range f.Edges {
		keys[i] = EdgeKey{From: e.From, To: e.To}
	}
	return keys
}

// recurrenceDays counts the analysed days of s on which at least one key
// was a candidate: the days the place was weak, as Finding.Days counts
// them. An empty key set recurs on no day.
func recurrenceDays(s *Scan, keys []EdgeKey) int {
	n := 0
	for _, cands := range s.DayCandidates {
		for _, k := range keys {
			if containsKey(cands, k) {
				n++
				break
			}
		}
	}
	return n
}

// containsKey reports whether k is in cands, which is sorted by From, To.
func containsKey(cands []EdgeKey, k EdgeKey) bool {
	i := sort.Search(len(cands), func(i int) bool {
		c := cands[i]
		return c.From > k.From || (c.From == k.From && c.To >= k.To)
	})
	return i < len(cands) && cands[i] == k
}
