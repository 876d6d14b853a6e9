package regiongraph

import (
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"

	"github.com/parquet-go/parquet-go"
	"github.com/parquet-go/parquet-go/compress/zstd"
)

// WriteParquet writes the store to w as one Parquet file, the layout of
// SCHEMA.md. The bytes depend only on the store.
func (s *Store) WriteParquet(w io.Writer) error { return writeParquet(w, s, rowGroupRows) }

// rowGroupRows is the number of rows from which WriteParquet ends a row
// group at the next change of day. Row groups of about a million rows are
// common practice: other tools read them in parallel, and the writer holds
// one row group's compressed pages in memory.
const rowGroupRows = 1 << 20

// storeZstd compresses the pages of both layouts. zstd's fastest level
// wrote a simulated city's day in about half the time of the default
// level, and its file was 2 % smaller (64 KiB pages: the default level's
// larger tables pay off on larger inputs). Readers decode either level
// alike. The codec is shared, read only, for its pool of encoders.
var storeZstd = zstd.Codec{Level: zstd.SpeedFastest}

// writeParquet is WriteParquet with row groups of groupRows rows, each
// ended at a change of day unless the day alone has 2 groupRows rows.
// Further writer options (tests use small pages) come after the store's.
func writeParquet(w io.Writer, s *Store, groupRows int, extra ...parquet.WriterOption) error {
	if s == nil {
		return errors.New("regiongraph: write: nil store")
	}
	opts, err := storeMetadata(s)
	if err != nil {
		return fmt.Errorf("regiongraph: write: %v", err)
	}
	ew := newEdgeWriter(w, groupRows, append(opts, extra...), s.Meta.Windows)
	err = ew.add(s.Edges)
	if err == nil {
		// The file records the totals of the edges it holds, whatever a
		// store read with a minimum of trips recorded.
		err = ew.setTotals(totalsOf(s.Meta.Windows, s.Edges))
	}
	if err == nil {
		err = ew.close()
	}
	if err != nil {
		return fmt.Errorf("regiongraph: write: %w", err)
	}
	return nil
}

// storeMetadata returns the writer options of the store: compression and
// the file's key-value metadata.
func storeMetadata(s *Store) ([]parquet.WriterOption, error) {
	windows := make([]windowJSON, len(s.Meta.Windows))
	for i, w := range s.Meta.Windows {
		windows[i] = windowJSON{Name: w.Name, Start: clock(w.StartMinute), End: clock(w.EndMinute)}
	}
	rejected := make(map[string]int64)
	for _, r := range RejectReasons() {
		rejected[string(r)] = 0
	}
	for r, n := range s.Meta.Quality.Rejected {
		rejected[r] = n
	}
	sources := make([]sourceJSON, len(s.Meta.Sources))
	for i, src := range s.Meta.Sources {
		sources[i] = sourceJSON{Path: src.Path, SHA256: src.SHA256, Rows: src.Rows}
	}
	meta := []struct {
		key string
		v   any
	}{
		{metaWindows, windows},
		{metaQuality, qualityJSON{Read: s.Meta.Quality.Read, Used: s.Meta.Quality.Used, Rejected: rejected,
			OffsetTimes: s.Meta.Quality.OffsetTimes, OffsetMismatch: s.Meta.Quality.OffsetMismatch}},
		{metaSources, sources},
	}
	opts := []parquet.WriterOption{
		parquet.Compression(&storeZstd),
		parquet.KeyValueMetadata(metaSchemaVersion, strconv.Itoa(schemaVersion)),
		parquet.KeyValueMetadata(metaRegions, s.Meta.RegionsSHA256),
		parquet.KeyValueMetadata(metaTimeZone, s.Meta.TimeZone),
	}
	if len(s.regionsGeoJSON) > 0 {
		opts = append(opts, parquet.KeyValueMetadata(metaRegionsJSON, string(s.regionsGeoJSON)))
	}
	for _, m := range meta {
		b, err := json.Marshal(m.v)
		if err != nil {
			return nil, err
		}
		opts = append(opts, parquet.KeyValueMetadata(m.key, string(b)))
	}
	return opts, nil
}

func clock(m int) string { return fmt.Sprintf("%02d:%02d", m/60, m%60) }

// edgeWriter writes edges, given in store order a few at a time, as the
// rows of one Parquet file: the layout does not depend on how the edges
// are handed to it.
type edgeWriter struct {
	pw        *parquet.Writer
	groupRows int
	rows      []parquet.Row
	values    parquet.Row // of the rows
	inGroup   int
	lastDay   Day
	windows   []Window   // the store's
	text      *storeText // of the windows
	n         int        // edges written
	days      int        // distinct days written
}

// edgeBatch is the number of rows converted before they are handed to the
// Parquet writer.
const edgeBatch = 1 << 12

func newEdgeWriter(w io.Writer, groupRows int, opts []parquet.WriterOption, windows []Window) *edgeWriter {
	return &edgeWriter{
		windows:   windows,
		text:      newStoreText(windows),
		pw:        parquet.NewWriter(w, append([]parquet.WriterOption{storeSchema(nil)}, opts...)...),
		groupRows: groupRows,
		rows:      make([]parquet.Row, 0, edgeBatch),
		values:    make(parquet.Row, 0, edgeBatch*numStoreColumns),
	}
}

func (ew *edgeWriter) flush() error {
	_, err := ew.pw.WriteRows(ew.rows)
	ew.rows, ew.values = ew.rows[:0], ew.values[:0]
	return err
}

// add writes edges, which follow the edges written before in store order.
func (ew *edgeWriter) add(edges []Edge) error {
	for i := range edges {
		e := &edges[i]
		if e.From < math.MinInt32 || e.From > math.MaxInt32 || e.To < math.MinInt32 || e.To > math.MaxInt32 {
			return fmt.Errorf("region id out of int32 range in edge %d", ew.n)
		}
		if err := ew.text.checkWindow(e.Window); err != nil {
			return fmt.Errorf("edge %d: %v", ew.n, err)
		}
		newDay := ew.n == 0 || e.Day != ew.lastDay
		if ew.inGroup >= 2*ew.groupRows || ew.inGroup >= ew.groupRows && newDay {
			if err := ew.flush(); err != nil {
				return err
			}
			if err := ew.pw.Flush(); err != nil {
				return err
			}
			ew.inGroup = 0
		}
		if newDay {
			ew.days++
			ew.lastDay = e.Day
		}
		n := len(ew.values)
		ew.values = appendRow(ew.values, e, ew.text)
		ew.rows = append(ew.rows, ew.values[n:len(ew.values):len(ew.values)])
		ew.inGroup++
		ew.n++
		if len(ew.rows) == edgeBatch {
			if err := ew.flush(); err != nil {
				return err
			}
		}
	}
	return nil
}

// setTotals records the day totals of the edges in the file's key-value
// metadata, written with the footer: a single file's totals are known only
// once its edges have passed.
func (ew *edgeWriter) setTotals(totals []DayTotal) error {
	text, err := dayTotalsJSON(ew.windows, totals)
	if err != nil {
		return err
	}
	ew.pw.SetKeyValueMetadata(metaDayTotals, text)
	return nil
}

// close writes the rows left and the file's footer.
func (ew *edgeWriter) close() error {
	if err := ew.flush(); err != nil {
		return err
	}
	return ew.pw.Close()
}
