package main

import (
	"bytes"
	"fmt"
	"io"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/xuri/excelize/v2"

	"narrows/cmd/internal/atomicfile"
	"narrows/regiongraph"
	"narrows/report"
)

// killChildEnv names, in a child process of TestKilledWritesLeaveWholeFiles,
// the folder the child writes into, over and over, until it is killed.
const killChildEnv = "NARROWS_KILL_TEST_DIR"

// killStore is generation gen of the store the child writes: gen+1 days
// of a few thousand edges, so that a write takes long enough to be killed
// in the middle, and the generation can be read back from the days.
func killStore(gen int) *regiongraph.Store {
	s := &regiongraph.Store{Meta: regiongraph.Meta{TimeZone: "UTC", Windows: []regiongraph.Window{{Name: "all", StartMinute: 0, EndMinute: 24 * 60}},
		Quality: regiongraph.Quality{Rejected: map[string]int64{}}}}
	day := time.Date(2026, 3, 2, 0, 0, 0, 0, time.UTC)
	for d := 0; d <= gen%5; d++ {
		for i := 0; i < 4000; i++ {
			s.Edges = append(s.Edges, regiongraph.Edge{Day: regiongraph.DayOf(day.AddDate(0, 0, d)), Window: 0, From: 1 + i/60, To: 2 + i/60 + i%60, Trips: 5 + i%7,
				SpeedP25: 4, SpeedMedian: 5, SpeedP75: 6, DetourP25: 1.2, DetourMedian: 1.3, DetourP75: 1.4, DistanceMedian: 2000, DurationMedian: 400,
				DistanceSum: 10000, StraightSum: 8000, DurationSum: 2000})
		}
	}
	return s
}

// killWorkbook is generation gen of the workbook: its title names gen.
func killWorkbook(gen int) report.Input {
	in := smallReport()
	in.Title = "generation " + strconv.Itoa(gen)
	return in
}

// writeGeneration writes the store and the report of generation gen
// into dir through the command line's writers.
func writeGeneration(files *runFiles, dir string, gen int) error {
	if err := files.write(filepath.Join(dir, "graphs.parquet"), kindStore, killStore(gen).WriteParquet); err != nil {
		return err
	}
	_, err := writeReportFiles(files, dir, "report", killWorkbook(gen))
	return err
}

// TestKilledWritesLeaveWholeFiles starts a child process (this test binary
// again) that writes the store and the report over and over, and kills it
// (SIGKILL, which nothing can catch) at a random moment, seed after seed.
// After each kill the final paths hold nothing (only before the first
// write), or a complete file of some generation that reads back: a store
// whose edges are one generation's, a workbook that opens with its title.
func TestKilledWritesLeaveWholeFiles(t *testing.T) {
	if dir := os.Getenv(killChildEnv); dir != "" {
		// The child: write generations until killed.
		for gen := 1; ; gen++ {
			files := newRunFiles(io.Discard)
			if err := writeGeneration(files, dir, gen); err != nil {
				fmt.Fprintln(os.Stderr, err)
				os.Exit(3)
			}
		}
	}
	seeds := 24
	if testing.Short() {
		seeds = 6
	}
	dir := t.TempDir()
	store, book := filepath.Join(dir, "graphs.parquet"), filepath.Join(dir, "report.xlsx")
	midWrite := 0
	for seed := 0; seed < seeds; seed++ {
		if seed == seeds/2 {
			// The second half starts from old files of generation 0.
			if err := writeGeneration(newRunFiles(nil), dir, 0); err != nil {
				t.Fatal(err)
			}
		}
		r := rand.New(rand.NewPCG(uint64(seed), 15))
		cmd := exec.Command(os.Args[0], "-test.run", "^TestKilledWritesLeaveWholeFiles$")
		cmd.Env = append(os.Environ(), killChildEnv+"="+dir)
		var stderr bytes.Buffer
		cmd.Stderr = &stderr
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		time.Sleep(time.Duration(r.IntN(400)) * time.Millisecond)
		if err := cmd.Process.Signal(syscall.SIGKILL); err != nil {
			t.Fatal(err)
		}
		err := cmd.Wait()
		if ws, ok := cmd.ProcessState.Sys().(syscall.WaitStatus); !ok || !ws.Signaled() {
			t.Fatalf("seed %d: child ended by itself (%v): %s", seed, err, stderr.String())
		}
		for _, p := range []string{store, book} {
			if stale, _ := atomicfile.Stale(p); len(stale) > 0 {
				midWrite++
			}
		}
		checkWhole(t, seed, store, book, seed >= seeds/2)
	}
	t.Logf("%d kills, %d of the store and workbook paths had a temporary file beside them (killed mid-write)", seeds, midWrite)
}

// checkWhole checks that the store and workbook paths hold nothing or a
// complete file; must says they must exist (an old file was there).
func checkWhole(t *testing.T, seed int, store, book string, must bool) {
	t.Helper()
	if _, err := os.Stat(store); err == nil {
		s, err := regiongraph.ReadFile(store)
		if err != nil {
			t.Fatalf("seed %d: store does not read back: %v", seed, err)
		}
		days := map[regiongraph.Day]bool{}
		for _, e := range s.Edges {
			days[e.Day] = true
		}
		if len(s.Edges) != 4000*len(days) {
			t.Errorf("seed %d: store has %d edges on %d days, want 4000 a day", seed, len(s.Edges), len(days))
		}
	} else if must || !os.IsNotExist(err) {
		t.Fatalf("seed %d: store: %v", seed, err)
	}
	if _, err := os.Stat(book); err == nil {
		f, err := excelize.OpenFile(book)
		if err != nil {
			t.Fatalf("seed %d: workbook does not open: %v", seed, err)
		}
		defer f.Close()
		rows, err := f.GetRows(report.SheetDaily)
		if err != nil || len(rows) < 2 {
			t.Errorf("seed %d: workbook's Daily sheet: %d rows, %v", seed, len(rows), err)
		}
		if p, err := f.GetDocProps(); err != nil || !strings.HasPrefix(p.Title, "generation ") {
			t.Errorf("seed %d: workbook properties %v, %v; want the title of a generation", seed, p, err)
		}
	} else if must || !os.IsNotExist(err) {
		t.Fatalf("seed %d: workbook: %v", seed, err)
	}
}
