package regiongraph

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"slices"

	"github.com/parquet-go/parquet-go"

	"narrows/partition"
)

// The placed-trip file: one Parquet file per shard, a row per PlacedTrip
// in the order Place gave them, and the PlacedMeta as JSON under one
// metadata key. SCHEMA.md documents it.

// metaPlaced is the metadata key of the placed-trip file's PlacedMeta.
const metaPlaced = "narrows_placed"

// placedVersion is the version of the placed-trip file's layout.
const placedVersion = 1

// placedRow is a PlacedTrip as a row of the file.
type placedRow struct {
	Day      int32   `parquet:"day,date"`
	Windows  int64   `parquet:"windows"`
	From     int32   `parquet:"from_region"`
	To       int32   `parquet:"to_region"`
	Distance float32 `parquet:"distance_m"`
	Duration float32 `parquet:"duration_s"`
	Straight float32 `parquet:"straight_m"`
	Rows     int32   `parquet:"rows"`
	Outcome  string  `parquet:"outcome,dict"`
	Keyed    bool    `parquet:"keyed"`
	KeyID    int64   `parquet:"key_id"`
	KeyRow   int64   `parquet:"key_row"`
}

// placedColumns are the file's columns in order, with their kinds.
var placedColumns = []struct {
	name string
	kind parquet.Kind
}{
	{"day", parquet.Int32}, {"windows", parquet.Int64}, {"from_region", parquet.Int32}, {"to_region", parquet.Int32},
	{"distance_m", parquet.Float}, {"duration_s", parquet.Float}, {"straight_m", parquet.Float},
	{"rows", parquet.Int32}, {"outcome", parquet.ByteArray}, {"keyed", parquet.Boolean},
	{"key_id", parquet.Int64}, {"key_row", parquet.Int64},
}

// placedMetaJSON is the JSON form of PlacedMeta in the file.
type placedMetaJSON struct {
	Version       int          `json:"version"`
	RegionsSHA256 string       `json:"regions_sha256"`
	TimeZone      string       `json:"time_zone"`
	Windows       []windowJSON `json:"windows"`
	Settings      string       `json:"settings"`
	Quality       qualityJSON  `json:"quality"`
	Sources       []sourceJSON `json:"sources"`
}

// placedBatch is the number of rows handed to the Parquet writer at once.
const placedBatch = 4096

// PlaceTo is Place writing the placed trips to w as a placed-trip file
// (SCHEMA.md). The bytes depend only on the inputs, the options and the
// inputs' names: placing a shard again gives the same file. It returns the
// metadata and the number of placed trips written.
func PlaceTo(ctx context.Context, regions *partition.Partition, regionsSHA256 string, inputs []Input, opts Options, w io.Writer) (PlacedMeta, int64, error) {
	pw := parquet.NewGenericWriter[placedRow](w, parquet.Compression(&parquet.Zstd))
	batch := make([]placedRow, 0, placedBatch)
	var n int64
	flush := func() error {
		if _, err := pw.Write(batch); err != nil {
			return fmt.Errorf("regiongraph: write placed trips: %w", err)
		}
		batch = batch[:0]
		return nil
	}
	meta, err := Place(ctx, regions, regionsSHA256, inputs, opts, func(p *PlacedTrip) error {
		batch = append(batch, placedRow{Day: int32(p.Day), Windows: int64(p.Windows), From: p.From, To: p.To,
			Distance: p.Distance, Duration: p.Duration, Straight: p.Straight, Rows: p.Rows, Outcome: string(p.Outcome),
			Keyed: p.Keyed, KeyID: int64(p.KeyID), KeyRow: int64(p.KeyRow)})
		n++
		if len(batch) == placedBatch {
			return flush()
		}
		return nil
	})
	if err != nil {
		return PlacedMeta{}, 0, err
	}
	if err := flush(); err != nil {
		return PlacedMeta{}, 0, err
	}
	text, err := json.Marshal(placedMetaToJSON(meta))
	if err != nil {
		return PlacedMeta{}, 0, fmt.Errorf("regiongraph: write placed trips: %v", err)
	}
	pw.SetKeyValueMetadata(metaPlaced, string(text))
	if err := pw.Close(); err != nil {
		return PlacedMeta{}, 0, fmt.Errorf("regiongraph: write placed trips: %w", err)
	}
	return meta, n, nil
}

func placedMetaToJSON(m PlacedMeta) placedMetaJSON {
	j := placedMetaJSON{Version: placedVersion, RegionsSHA256: m.RegionsSHA256, TimeZone: m.TimeZone, Settings: m.Settings,
		Windows: []windowJSON{}, Sources: []sourceJSON{}}
	for _, w := range m.Windows {
		j.Windows = append(j.Windows, windowJSON{Name: w.Name, Start: clock(w.StartMinute), End: clock(w.EndMinute)})
	}
	rejected := make(map[string]int64)
	for _, r := range RejectReasons() {
		rejected[string(r)] = m.Quality.Rejected[string(r)]
	}
	j.Quality = qualityJSON{Read: m.Quality.Read, Used: m.Quality.Used, Rejected: rejected,
		OffsetTimes: m.Quality.OffsetTimes, OffsetMismatch: m.Quality.OffsetMismatch}
	for _, s := range m.Sources {
		j.Sources = append(j.Sources, sourceJSON{Path: s.Path, SHA256: s.SHA256, Rows: s.Rows})
	}
	return j
}

// parsePlacedMeta reads the metadata text of a placed-trip file.
func parsePlacedMeta(text string) (PlacedMeta, error) {
	var j placedMetaJSON
	if err := json.Unmarshal([]byte(text), &j); err != nil {
		return PlacedMeta{}, err
	}
	if j.Version != placedVersion {
		return PlacedMeta{}, fmt.Errorf("layout version %d; this narrows reads version %d", j.Version, placedVersion)
	}
	m := PlacedMeta{RegionsSHA256: j.RegionsSHA256, TimeZone: j.TimeZone, Settings: j.Settings,
		Quality: Quality{Read: j.Quality.Read, Used: j.Quality.Used, Rejected: make(map[string]int64),
			OffsetTimes: j.Quality.OffsetTimes, OffsetMismatch: j.Quality.OffsetMismatch}}
	if len(j.Windows) == 0 || len(j.Windows) > MaxPlacedWindows {
		return PlacedMeta{}, fmt.Errorf("%d windows; want 1 to %d", len(j.Windows), MaxPlacedWindows)
	}
	for _, w := range j.Windows {
		pw, err := ParseWindow(w.Name + "=" + w.Start + "-" + w.End)
		if err != nil {
			return PlacedMeta{}, err
		}
		m.Windows = append(m.Windows, pw)
	}
	counts := []int64{m.Quality.Read, m.Quality.Used, m.Quality.OffsetTimes, m.Quality.OffsetMismatch}
	for r, n := range j.Quality.Rejected {
		if !slices.Contains(RejectReasons(), Reason(r)) {
			return PlacedMeta{}, fmt.Errorf("quality: unknown reason %q", r)
		}
		m.Quality.Rejected[r] = n
		counts = append(counts, n)
	}
	for _, n := range counts {
		if n < 0 {
			return PlacedMeta{}, errors.New("quality: a negative count")
		}
	}
	for _, s := range j.Sources {
		m.Sources = append(m.Sources, Source{Path: s.Path, SHA256: s.SHA256, Rows: s.Rows})
	}
	return m, nil
}

// ReadPlaced reads a placed-trip file: it hands its metadata to head (when
// not nil), then its trips to each in file order (each must not keep the
// pointer), a row group at a time, and returns the metadata. A file that
// is not a placed-trip file, or a row that Place cannot have written, is
// an error naming the file (and the row).
func ReadPlaced(path string, head func(PlacedMeta) error, each func(*PlacedTrip) error) (meta PlacedMeta, err error) {
	f, err := os.Open(path)
	if err != nil {
		return PlacedMeta{}, fmt.Errorf("regiongraph: %w", err)
	}
	defer f.Close()
	fi, err := f.Stat()
	if err != nil {
		return PlacedMeta{}, fmt.Errorf("regiongraph: %w", err)
	}
	return readPlaced(f, fi.Size(), path, head, each)
}

func readPlaced(f *os.File, size int64, path string, head func(PlacedMeta) error, each func(*PlacedTrip) error) (meta PlacedMeta, err error) {
	pf, err := openParquetChecked(f, size)
	if err != nil {
		return PlacedMeta{}, fmt.Errorf("regiongraph: %s: not a readable placed-trip file: %v", path, err)
	}
	text, ok := pf.Lookup(metaPlaced)
	if !ok {
		return PlacedMeta{}, fmt.Errorf("regiongraph: %s: not a placed-trip file (no %s metadata; write one with 'narrows place')", path, metaPlaced)
	}
	if meta, err = parsePlacedMeta(text); err != nil {
		return PlacedMeta{}, fmt.Errorf("regiongraph: %s: placed-trip metadata: %v", path, err)
	}
	var leaf [12]int
	schema := pf.Schema()
	for i, c := range placedColumns {
		l, ok := schema.Lookup(c.name)
		if !ok {
			return PlacedMeta{}, fmt.Errorf("regiongraph: %s: no column %q", path, c.name)
		}
		if l.Node.Type().Kind() != c.kind || l.Node.Optional() || l.Node.Repeated() {
			return PlacedMeta{}, fmt.Errorf("regiongraph: %s: column %q has type %v; want a required %v", path, c.name, l.Node.Type(), c.kind)
		}
		leaf[i] = l.ColumnIndex
	}
	if head != nil {
		if err := head(meta); err != nil {
			return PlacedMeta{}, err
		}
	}
	// A page the library cannot decode may make it panic: an error
	// naming the file instead.
	defer func() {
		if r := recover(); r != nil {
			meta, err = PlacedMeta{}, fmt.Errorf("regiongraph: %s: damaged Parquet data: %v", path, r)
		}
	}()
	buf := make([]parquet.Row, 512)
	var p PlacedTrip
	var rowNo int64
	for _, rg := range pf.RowGroups() {
		rows := rg.Rows()
		for {
			n, rerr := rows.ReadRows(buf)
			for _, row := range buf[:n] {
				rowNo++
				if err := placedFromRow(row, &leaf, len(meta.Windows), &p); err != nil {
					rows.Close()
					return PlacedMeta{}, fmt.Errorf("regiongraph: %s:row %d: %v", path, rowNo, err)
				}
				if err := each(&p); err != nil {
					rows.Close()
					return PlacedMeta{}, err
				}
			}
			if errors.Is(rerr, io.EOF) || rerr == nil && n == 0 {
				break
			}
			if rerr != nil {
				rows.Close()
				return PlacedMeta{}, fmt.Errorf("regiongraph: %s:row %d: %v", path, rowNo+1, rerr)
			}
		}
		rows.Close()
	}
	return meta, nil
}

// placedFromRow fills p from a row and checks it is one Place writes.
func placedFromRow(row parquet.Row, leaf *[12]int, windows int, p *PlacedTrip) error {
	if len(row) != len(placedColumns) {
		return fmt.Errorf("%d values; want %d", len(row), len(placedColumns))
	}
	var v [12]parquet.Value
	for _, x := range row {
		c := x.Column()
		for i, l := range leaf {
			if l == c {
				v[i] = x
			}
		}
	}
	for i, x := range v {
		if x.IsNull() || x.Kind() != placedColumns[i].kind {
			return fmt.Errorf("column %s: missing or of another type", placedColumns[i].name)
		}
	}
	*p = PlacedTrip{Day: Day(v[0].Int32()), Windows: uint64(v[1].Int64()), From: v[2].Int32(), To: v[3].Int32(),
		Distance: v[4].Float(), Duration: v[5].Float(), Straight: v[6].Float(), Rows: v[7].Int32(),
		Outcome: Reason(v[8].ByteArray()), Keyed: v[9].Boolean(), KeyID: uint64(v[10].Int64()), KeyRow: uint64(v[11].Int64())}
	return p.check(windows)
}

// check says what is wrong with a placed trip that Place cannot have made
// with that many windows, or nil.
func (p *PlacedTrip) check(windows int) error {
	if p.Rows < 1 {
		return fmt.Errorf("rows %d; want at least 1", p.Rows)
	}
	if p.Outcome != reasonUsed {
		if !slices.Contains(RejectReasons(), p.Outcome) {
			return fmt.Errorf("unknown outcome %q", p.Outcome)
		}
		if !p.Keyed {
			return fmt.Errorf("a rejected trip (%s) without a duplicate-check key", p.Outcome)
		}
		return nil
	}
	if p.Windows == 0 || windows < 64 && p.Windows>>windows != 0 {
		return fmt.Errorf("windows %#x; want bits of the %d windows", p.Windows, windows)
	}
	if p.From == p.To {
		return fmt.Errorf("from and to region %d are the same", p.From)
	}
	for i, x := range [3]float32{p.Duration, p.Distance, p.Straight} {
		if !(x > 0 || i > 0 && x == 0) || math.IsInf(float64(x), 0) {
			return fmt.Errorf("distance %g, duration %g, straight %g: want finite values, a duration > 0", p.Distance, p.Duration, p.Straight)
		}
	}
	return nil
}
