package regiongraph

import (
	"fmt"
	"strings"
)

// storeText converts an edge's day and window to and from the text of the
// store's day and window columns (YYYY-MM-DD and the window's name). The
// edges of a file come by day and, within a day, by window, so the text
// repeats from row to row: the last conversion each way is kept. A
// storeText is used by one goroutine at a time.
type storeText struct {
	names     []string // window names by index
	nameBytes [][]byte

	// writing: the text of the last day written
	day     Day
	dayText []byte

	// reading: the last day and window text read and their values
	readDay      string
	readDayValue Day
	readDayOK    bool
	readWin      string
	readWinValue WindowIndex
	readWinOK    bool
}

// newStoreText returns the conversions of a store with the given windows.
func newStoreText(windows []Window) *storeText {
	t := &storeText{}
	t.setWindows(windows)
	return t
}

// setWindows sets the store's windows, clearing what was kept.
func (t *storeText) setWindows(windows []Window) {
	*t = storeText{names: make([]string, len(windows)), nameBytes: make([][]byte, len(windows))}
	for i, w := range windows {
		t.names[i], t.nameBytes[i] = w.Name, []byte(w.Name)
	}
}

// dayBytes returns the text of d. The bytes are not changed later: a
// Parquet row may hold them until it is written.
func (t *storeText) dayBytes(d Day) []byte {
	if t.dayText == nil || d != t.day {
		t.day, t.dayText = d, []byte(d.String())
	}
	return t.dayText
}

// windowBytes returns the name of window w, which must be one of the
// store's (checkWindow).
func (t *storeText) windowBytes(w WindowIndex) []byte { return t.nameBytes[w] }

// checkWindow reports a window index outside the store's windows.
func (t *storeText) checkWindow(w WindowIndex) error {
	if int(w) >= len(t.names) {
		return fmt.Errorf("window %d, but the store has %d windows", w, len(t.names))
	}
	return nil
}

// parseDay returns the day written s.
func (t *storeText) parseDay(s string) (Day, error) {
	if t.readDayOK && s == t.readDay {
		return t.readDayValue, nil
	}
	d, err := ParseDay(s)
	if err != nil {
		return 0, err
	}
	t.readDay, t.readDayValue, t.readDayOK = s, d, true
	return d, nil
}

// parseWindow returns the index of the window named s.
func (t *storeText) parseWindow(s string) (WindowIndex, error) {
	if t.readWinOK && s == t.readWin {
		return t.readWinValue, nil
	}
	for i, n := range t.names {
		if n == s && i < MaxWindows {
			t.readWin, t.readWinValue, t.readWinOK = s, WindowIndex(i), true
			return WindowIndex(i), nil
		}
	}
	return 0, fmt.Errorf("window %q not in the metadata (%s)", s, strings.Join(t.names, ", "))
}
