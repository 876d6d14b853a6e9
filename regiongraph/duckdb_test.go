package regiongraph

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"
)

// duckDB returns node and the folder of the @duckdb/node-api package, or
// skips the test: NARROWS_DUCKDB names a folder holding
// node_modules/@duckdb/node-api (default ~/.cache/narrows-duckdb, where
// .ci/run installs it with npm install --prefix).
func duckDB(t *testing.T) (node, module string) {
	t.Helper()
	node, err := exec.LookPath("node")
	if err != nil {
		t.Skip("node not found; DuckDB cross-check skipped")
	}
	dir := os.Getenv("NARROWS_DUCKDB")
	if dir == "" {
		home, _ := os.UserHomeDir()
		dir = filepath.Join(home, ".cache", "narrows-duckdb")
	}
	module = filepath.Join(dir, "node_modules", "@duckdb", "node-api")
	if _, err := os.Stat(filepath.Join(module, "package.json")); err != nil {
		t.Skipf("no @duckdb/node-api under %s (npm install --prefix %s @duckdb/node-api); DuckDB cross-check skipped", dir, dir)
	}
	return node, module
}

// runDuckDB runs the SQL queries in DuckDB and returns each one's rows as
// JSON objects (DuckDB's JSON: BIGINT as strings, DOUBLE as numbers).
func runDuckDB(t *testing.T, queries ...string) [][]map[string]any {
	t.Helper()
	node, module := duckDB(t)
	script := filepath.Join(t.TempDir(), "query.cjs")
	src := `const { DuckDBInstance } = require(process.argv[2]);
(async () => {
  const db = await DuckDBInstance.create(':memory:');
  const con = await db.connect();
  const out = [];
  for (const q of JSON.parse(process.argv[3])) {
    out.push((await con.runAndReadAll(q)).getRowObjectsJson());
  }
  process.stdout.write(JSON.stringify(out));
})().catch(e => { console.error(String(e)); process.exit(1); });
`
	if err := os.WriteFile(script, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	qs, _ := json.Marshal(queries)
	cmd := exec.Command(node, script, module, string(qs))
	var stderr strings.Builder
	cmd.Stderr = &stderr
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("DuckDB: %v: %s", err, stderr.String())
	}
	var rows [][]map[string]any
	if err := json.Unmarshal(out, &rows); err != nil {
		t.Fatalf("DuckDB output: %v", err)
	}
	return rows
}

// number reads a DuckDB JSON value (a number, or an integer as a string).
func number(t *testing.T, v any) float64 {
	t.Helper()
	switch x := v.(type) {
	case float64:
		return x
	case string:
		f, err := strconv.ParseFloat(x, 64)
		if err != nil {
			t.Fatalf("DuckDB value %q", x)
		}
		return f
	}
	t.Fatalf("DuckDB value %v (%T)", v, v)
	return 0
}

func closeTo(a, b float64) bool { return math.Abs(a-b) <= 1e-9*math.Max(1, math.Abs(b)) }

// TestDatasetInDuckDB reads a dataset with DuckDB, an independent Parquet
// reader: the query SCHEMA.md documents must give the per-day sums of
// narrows' own reading with the same minimum and period, and every row of
// every day file must be an edge of the store with equal values.
func TestDatasetInDuckDB(t *testing.T) {
	duckDB(t)
	doc, err := os.ReadFile("SCHEMA.md")
	if err != nil {
		t.Fatal(err)
	}
	m := regexp.MustCompile("(?s)```sql\n(.*?)```").FindSubmatch(doc)
	if m == nil {
		t.Fatal("SCHEMA.md has no SQL block")
	}
	query := string(m[1])
	loc, _ := time.LoadLocation("Europe/Berlin")
	s := sampleStore(t, 5, time.Date(2024, 1, 10, 0, 0, 0, 0, loc), 20000)
	ds := filepath.Join(t.TempDir(), "graphs")
	if err := s.WriteDataset(ds); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(query, "'graphs/*/*.parquet'") {
		t.Fatalf("the documented query does not read graphs/*/*.parquet:\n%s", query)
	}
	query = strings.ReplaceAll(query, "'graphs/*/*.parquet'", "'"+ds+"/*/*.parquet'")
	all := "SELECT CAST(day AS VARCHAR) AS day, * EXCLUDE (day) FROM read_parquet('" + ds + "/*/*.parquet', hive_partitioning = true) ORDER BY day, \"window\", from_region, to_region"
	// Each day's and window's sums over every row, to check the day
	// totals the manifest records.
	totalsQuery := "SELECT CAST(day AS VARCHAR) AS day, \"window\", count(*) AS edges, sum(trips) AS trips, sum(distance_sum_m) AS distance, " +
		"sum(straight_sum_m) AS straight, sum(duration_sum_s) AS duration FROM read_parquet('" + ds + "/*/*.parquet', hive_partitioning = true) " +
		"GROUP BY ALL ORDER BY day, \"window\""
	got := runDuckDB(t, query, all, totalsQuery)

	// narrows' reading with the query's minimum and period.
	mine, err := ReadFileOptions(ds, ReadOptions{MinTrips: 3, From: "2024-01-11", To: "2024-01-13"})
	if err != nil {
		t.Fatal(err)
	}
	type sums struct{ edges, trips, dist, dur float64 }
	want := map[string]*sums{}
	var keys []string
	for _, e := range mine.Edges {
		k := e.Day.String() + " " + mine.Meta.WindowName(e.Window)
		if want[k] == nil {
			want[k] = &sums{}
			keys = append(keys, k)
		}
		w := want[k]
		w.edges++
		w.trips += float64(e.Trips)
		w.dist += e.DistanceSum
		w.dur += e.DurationSum
	}
	if len(keys) < 3 || len(got[0]) != len(keys) {
		t.Fatalf("DuckDB gives %d (day, window) rows, narrows %d", len(got[0]), len(keys))
	}
	for i, row := range got[0] {
		k := fmt.Sprint(row["day"], " ", row["window"])
		w := want[k]
		if k != keys[i] || w == nil {
			t.Fatalf("row %d: DuckDB %s, narrows %s", i, k, keys[i])
		}
		if number(t, row["edges"]) != w.edges || number(t, row["trips"]) != w.trips ||
			!closeTo(number(t, row["distance_m"]), w.dist) || !closeTo(number(t, row["duration_s"]), w.dur) {
			t.Errorf("%s: DuckDB %v, narrows %+v", k, row, *w)
		}
	}

	// The day totals a read with a minimum of trips takes from the
	// manifest are DuckDB's sums over every row.
	partial, err := ReadFileOptions(ds, ReadOptions{MinTrips: 3})
	if err != nil {
		t.Fatal(err)
	}
	totals, ok := partial.DayTotals()
	if !ok || len(totals) != len(got[2]) || len(totals) < 4 {
		t.Fatalf("day totals known %t: %d, DuckDB %d (day, window) rows", ok, len(totals), len(got[2]))
	}
	for i, row := range got[2] {
		tt := totals[i]
		if row["day"] != tt.Day.String() || row["window"] != mine.Meta.WindowName(tt.Window) || number(t, row["edges"]) != float64(tt.Edges) ||
			number(t, row["trips"]) != float64(tt.Trips) || !closeTo(number(t, row["distance"]), tt.DistanceSum) ||
			!closeTo(number(t, row["straight"]), tt.StraightSum) || !closeTo(number(t, row["duration"]), tt.DurationSum) {
			t.Errorf("day total %d: DuckDB %v, narrows %+v", i, row, tt)
		}
	}
	var every int64
	for _, tt := range totals {
		every += tt.Edges
	}
	if every <= int64(len(partial.Edges)) {
		t.Fatalf("the read with a minimum kept %d edges of %d: the test shows nothing", len(partial.Edges), every)
	}

	// Every row, every column.
	if len(got[1]) != len(s.Edges) {
		t.Fatalf("DuckDB reads %d rows, the store has %d edges", len(got[1]), len(s.Edges))
	}
	for i, row := range got[1] {
		e := &s.Edges[i]
		if row["day"] != e.Day.String() || row["window"] != s.Meta.WindowName(e.Window) {
			t.Fatalf("row %d: %v %v, edge %s %s", i, row["day"], row["window"], e.Day, s.Meta.WindowName(e.Window))
		}
		for c := range storeColumns {
			col := &storeColumns[c]
			var v float64
			switch {
			case col.int != nil:
				v = float64(*col.int(e))
			case col.double != nil:
				v = *col.double(e)
			default:
				continue
			}
			if got := number(t, row[col.name]); got != v {
				t.Fatalf("row %d, %s: DuckDB %v, narrows %v", i, col.name, got, v)
			}
		}
	}
}

// TestDayTotalsInDuckDB reads a single file's day_totals metadata and its
// rows with DuckDB: the totals the file records are DuckDB's count and
// sums of every row, by day and window.
func TestDayTotalsInDuckDB(t *testing.T) {
	duckDB(t)
	loc, _ := time.LoadLocation("Europe/Berlin")
	s := sampleStore(t, 6, time.Date(2024, 2, 10, 0, 0, 0, 0, loc), 8000)
	file := filepath.Join(t.TempDir(), "graphs.parquet")
	if err := createFile(file, s.WriteParquet); err != nil {
		t.Fatal(err)
	}
	got := runDuckDB(t,
		"SELECT decode(value) AS totals FROM parquet_kv_metadata('"+file+"') WHERE decode(key) = 'day_totals'",
		"SELECT day, \"window\", count(*) AS edges, sum(trips) AS trips, sum(distance_sum_m) AS distance, sum(straight_sum_m) AS straight, "+
			"sum(duration_sum_s) AS duration FROM read_parquet('"+file+"') GROUP BY ALL ORDER BY day, \"window\"")
	if len(got[0]) != 1 {
		t.Fatalf("DuckDB finds %d day_totals keys", len(got[0]))
	}
	var recorded []totalJSON
	if err := json.Unmarshal([]byte(got[0][0]["totals"].(string)), &recorded); err != nil {
		t.Fatal(err)
	}
	if len(recorded) != len(got[1]) || len(recorded) < 4 {
		t.Fatalf("%d day totals recorded, DuckDB groups the rows into %d", len(recorded), len(got[1]))
	}
	for i, row := range got[1] {
		r := recorded[i]
		if row["day"] != r.Day || row["window"] != r.Window || number(t, row["edges"]) != float64(r.Edges) || number(t, row["trips"]) != float64(r.Trips) ||
			!closeTo(number(t, row["distance"]), r.DistanceSum) || !closeTo(number(t, row["straight"]), r.StraightSum) || !closeTo(number(t, row["duration"]), r.DurationSum) {
			t.Errorf("day total %d: DuckDB %v, recorded %+v", i, row, r)
		}
	}
}
