package regiongraph

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"os"

	"github.com/parquet-go/parquet-go"
	"github.com/parquet-go/parquet-go/format"
)

// parquetTimeKind says how a Parquet time column is encoded.
type parquetTimeKind struct {
	unitMS  float64 // multiply by this to get milliseconds; 0 for text
	civil   bool    // a local (not UTC-adjusted) timestamp
	isText  bool
	isFloat bool
}

// ingestTripParquet reads a Parquet trip table: the same logical columns as
// the CSV trip table, with times as TIMESTAMP, integer or floating Unix
// seconds, or text; coordinates and distance as any numeric type.
func ingestTripParquet(ctx context.Context, st *settings, path string, t *tally, progress func(int64)) (sum string, err error) {
	// The footer is checked before the library reads it (see
	// openParquetChecked); a page the library cannot decode may still
	// make it panic, which becomes an error naming the file.
	defer func() {
		if r := recover(); r != nil {
			sum, err = "", fmt.Errorf("regiongraph: %s: damaged Parquet data: %v", path, r)
		}
	}()
	f, err := os.Open(path)
	if err != nil {
		return "", fmt.Errorf("regiongraph: %w", err)
	}
	defer f.Close()
	fi, err := f.Stat()
	if err != nil {
		return "", fmt.Errorf("regiongraph: %w", err)
	}
	h := newHash()
	if _, err := io.Copy(h, f); err != nil {
		return "", fmt.Errorf("regiongraph: %s: %w", path, err)
	}
	pf, err := openParquetChecked(f, fi.Size())
	if err != nil {
		return "", fmt.Errorf("regiongraph: %s: not a readable Parquet file: %v", path, err)
	}
	cols, err := parquetTripColumns(st, path, pf.Schema())
	if err != nil {
		return "", err
	}
	done, err := readParquetTrips(ctx, st, path, pf, cols, t, progress)
	if err != nil {
		return "", err
	}
	if progress != nil && fi.Size() > done {
		progress(fi.Size() - done)
	}
	return hexSum(h), nil
}

// parquetColumns are the trip columns of a Parquet trip table.
type parquetColumns struct {
	idx       [7]int // column index of each of tripRequired
	timeKinds [2]parquetTimeKind
}

// parquetTripColumns finds the trip columns in a Parquet schema and checks
// their types.
func parquetTripColumns(st *settings, path string, schema *parquet.Schema) (*parquetColumns, error) {
	var cols parquetColumns
	var names []string
	for _, c := range schema.Fields() {
		names = append(names, c.Name())
	}
	for i, logical := range tripRequired {
		header := st.column(logical)
		leaf, ok := schema.Lookup(header)
		if !ok {
			return nil, fmt.Errorf("regiongraph: %s: missing column %q (the %s column); file has: %s",
				path, header, logical, listExcerpt(names))
		}
		cols.idx[i] = leaf.ColumnIndex
		typ := leaf.Node.Type()
		kind := typ.Kind()
		if i < 2 {
			tk, err := timeKindOf(typ)
			if err != nil {
				return nil, fmt.Errorf("regiongraph: %s: column %q: %v", path, header, err)
			}
			cols.timeKinds[i] = tk
			continue
		}
		switch kind {
		case parquet.Int32, parquet.Int64, parquet.Float, parquet.Double:
		default:
			return nil, fmt.Errorf("regiongraph: %s: column %q has type %v; want a number", path, header, typ)
		}
	}
	return &cols, nil
}

// readParquetTrips reads and tallies the rows of a Parquet trip table,
// reporting progress in proportion to the rows read. It returns the bytes
// reported.
func readParquetTrips(ctx context.Context, st *settings, path string, pf *parquet.File, cols *parquetColumns, t *tally, progress func(int64)) (int64, error) {
	rowBuf := make([]parquet.Row, 512)
	var done int64
	var tr trip
	var rowNo int64
	perRow := float64(pf.Size()) / math.Max(1, float64(pf.NumRows()))
	for _, rg := range pf.RowGroups() {
		rows := rg.Rows()
		for {
			if err := ctx.Err(); err != nil {
				rows.Close()
				return done, err
			}
			n, err := rows.ReadRows(rowBuf)
			for _, row := range rowBuf[:n] {
				rowNo++
				r, col := parquetTrip(st, t.zone, row, &cols.idx, &cols.timeKinds, &tr)
				if r == reasonUsed {
					r = t.add(&tr)
				}
				t.count(r, 1)
				if r != reasonUsed && st.opts.Strict && r.isDataError() {
					rows.Close()
					f := fault{reason: r, column: col}
					if col == "" {
						f.detail = explain(st, &tr, r)
					}
					return done, f.at(path, 0, rowNo)
				}
			}
			if progress != nil && n > 0 {
				step := int64(float64(rowNo) * perRow)
				progress(step - done)
				done = step
			}
			if errors.Is(err, io.EOF) {
				break
			}
			if err != nil {
				rows.Close()
				return done, fmt.Errorf("regiongraph: %s: row %d: %v", path, rowNo+1, err)
			}
			if n == 0 {
				break
			}
		}
		rows.Close()
	}
	return done, nil
}

func timeKindOf(typ parquet.Type) (parquetTimeKind, error) {
	lt := typ.LogicalType()
	switch typ.Kind() {
	case parquet.ByteArray:
		return parquetTimeKind{isText: true}, nil
	case parquet.Int32:
		return parquetTimeKind{unitMS: 1000}, nil
	case parquet.Float, parquet.Double:
		return parquetTimeKind{unitMS: 1000, isFloat: true}, nil
	case parquet.Int64:
		if lt != nil {
			if ts, ok := lt.Value.(*format.TimestampType); ok {
				k := parquetTimeKind{civil: !ts.IsAdjustedToUTC}
				switch ts.Unit.Value.(type) {
				case *format.MilliSeconds:
					k.unitMS = 1
				case *format.MicroSeconds:
					k.unitMS = 1e-3
				case *format.NanoSeconds:
					k.unitMS = 1e-6
				default:
					return k, fmt.Errorf("unknown timestamp unit")
				}
				return k, nil
			}
		}
		if ct := typ.ConvertedType(); ct != nil {
			switch *ct {
			case 9: // TIMESTAMP_MILLIS
				return parquetTimeKind{unitMS: 1}, nil
			case 10: // TIMESTAMP_MICROS
				return parquetTimeKind{unitMS: 1e-3}, nil
			}
		}
		return parquetTimeKind{unitMS: 1000}, nil // Unix seconds
	}
	return parquetTimeKind{}, fmt.Errorf("type %v; want a timestamp, Unix seconds or text", typ)
}

func parquetTrip(st *settings, z *zoneCache, row parquet.Row, idx *[7]int, tk *[2]parquetTimeKind, tr *trip) (Reason, string) {
	var vals [7]parquet.Value
	var have [7]bool
	for _, v := range row {
		c := v.Column()
		for i := range idx {
			if idx[i] == c {
				vals[i], have[i] = v, !v.IsNull()
			}
		}
	}
	for i, name := range tripRequired {
		if !have[i] {
			return ReasonMissingField, name
		}
	}
	for i := 0; i < 2; i++ {
		ms, err := parquetTime(z, vals[i], tk[i])
		if err != nil {
			return ReasonUnparseable, tripRequired[i]
		}
		if i == 0 {
			tr.startMS = ms
		} else {
			tr.endMS = ms
		}
	}
	var v [5]float64
	for k := 0; k < 5; k++ {
		x := vals[2+k]
		switch x.Kind() {
		case parquet.Int32:
			v[k] = float64(x.Int32())
		case parquet.Int64:
			v[k] = float64(x.Int64())
		case parquet.Float:
			v[k] = float64(x.Float())
		default:
			v[k] = x.Double()
		}
		if math.IsNaN(v[k]) || math.IsInf(v[k], 0) {
			return ReasonUnparseable, tripRequired[2+k]
		}
	}
	return tr.setPlaces(st, v)
}

func parquetTime(z *zoneCache, v parquet.Value, k parquetTimeKind) (int64, error) {
	if k.isText {
		return parseTime(v.ByteArray(), z)
	}
	var ms float64
	switch v.Kind() {
	case parquet.Int32:
		ms = float64(v.Int32()) * k.unitMS
	case parquet.Int64:
		if k.unitMS == 1 {
			return civilToUnixMS(z, v.Int64(), k.civil), nil
		}
		ms = float64(v.Int64()) * k.unitMS
	case parquet.Float:
		ms = float64(v.Float()) * k.unitMS
	case parquet.Double:
		ms = v.Double() * k.unitMS
	default:
		return 0, errSyntax
	}
	if math.IsNaN(ms) || math.Abs(ms) > 1e15 {
		return 0, errSyntax
	}
	return civilToUnixMS(z, int64(math.Floor(ms)), k.civil), nil
}

func civilToUnixMS(z *zoneCache, ms int64, civil bool) int64 {
	if !civil {
		return ms
	}
	sec := floorDiv(ms, 1000)
	return z.fromCivil(sec)*1000 + (ms - sec*1000)
}
