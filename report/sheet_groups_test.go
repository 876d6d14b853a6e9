package report

import (
	"strings"
	"testing"
)

// The Comparison groups sheet lists every pair each finding was judged
// against, nearest first, and says so when a finding had no group.
func TestComparisonGroupsSheet(t *testing.T) {
	in := fxInput()
	f, _ := writeBook(t, in)
	rows, err := f.GetRows(SheetComparisonGroups)
	if err != nil {
		t.Fatal(err)
	}
	head := rows[0]
	col := func(name string) int {
		for i, h := range head {
			if h == name {
				return i
			}
		}
		t.Fatalf("no column %q in %v", name, head)
		return -1
	}
	link, pair, match := col("Weak link"), col("Pair"), col("Match")
	pairs := map[string][]string{}
	for _, r := range rows[1:] {
		if r[match] == "" && strings.HasPrefix(r[pair], "no comparison group") {
			pairs[r[link]] = append(pairs[r[link]], "none")
		} else {
			pairs[r[link]] = append(pairs[r[link]], r[match]+":"+r[pair])
		}
	}
	// Every assessment of the fixture has the group 1>3, 3>1 but one,
	// which has none.
	var without int
	for _, a := range in.Comparison.Assessments {
		got := strings.Join(pairs[a.Finding.ID], " ")
		want := "1:1>3 2:3>1"
		if len(a.Group.Edges) == 0 {
			want = "none"
			without++
		}
		if got != want {
			t.Errorf("finding %s: pairs %q, want %q", a.Finding.ID, got, want)
		}
	}
	if without != 1 {
		t.Fatalf("fixture has %d findings without a group, want 1", without)
	}
}
