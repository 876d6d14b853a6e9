package regiongraph

import (
	"context"
	"encoding/binary"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"testing"

	"github.com/parquet-go/parquet-go"
)

// smallStoreBytes is a store of a few edges, as written.
func smallStoreBytes(t testing.TB) []byte {
	path := filepath.Join(t.TempDir(), "seed.parquet")
	if err := createFile(path, func(w io.Writer) error {
		return writeParquet(w, syntheticStore(3, 4, 4, "am"), 20, parquet.PageBufferSize(256))
	}); err != nil {
		t.Fatal(err)
	}
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// smallTripParquet is a Parquet trip table of a few trips.
func smallTripParquet(t testing.TB) []byte {
	type row struct {
		TripID   string  `parquet:"trip_id"`
		Start    int64   `parquet:"start_time"`
		End      int64   `parquet:"end_time"`
		StartLon float64 `parquet:"start_lon"`
		StartLat float64 `parquet:"start_lat"`
		EndLon   float64 `parquet:"end_lon"`
		EndLat   float64 `parquet:"end_lat"`
		Distance float64 `parquet:"distance_m"`
	}
	rows := []row{{"a", 1714550400, 1714551000, 13.01, 52.01, 13.05, 52.01, 3000}, {"b", 1714550400, 1714551000, 13.05, 52.01, 13.01, 52.03, 3500}}
	path := filepath.Join(t.TempDir(), "trips.parquet")
	if err := parquet.WriteFile(path, rows); err != nil {
		t.Fatal(err)
	}
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// footerRange returns where the Thrift footer of a Parquet file's bytes lies.
func footerRange(b []byte) (start, end int) {
	n := int(binary.LittleEndian.Uint32(b[len(b)-8:]))
	return len(b) - 8 - n, len(b) - 8
}

// lengthPatches are what an adversary writes over a length field: the
// largest int32 little-endian, and as Thrift varints, a huge length.
var lengthPatches = [][]byte{{0xff, 0xff, 0xff, 0x7f}, {0xff, 0xff, 0xff, 0xff, 0x07}, {0xf9, 0xff, 0xff, 0xff, 0x0f}}

// readDamaged writes data to a file and reads it as a store (trips false)
// or ingests it as a Parquet trip table, returning the error and the bytes
// allocated meanwhile.
func readDamaged(t testing.TB, dir string, data []byte, trips bool) (error, uint64) {
	path := filepath.Join(dir, "damaged.parquet")
	if err := os.WriteFile(path, data, 0o644); err != nil {
		t.Fatal(err)
	}
	var before, after runtime.MemStats
	runtime.ReadMemStats(&before)
	var err error
	if trips {
		opts := DefaultOptions()
		opts.TimeZone = "UTC"
		_, err = Ingest(context.Background(), gridPartition(4, 4, 13.0, 52.0, 0.02), "x", []Input{{Path: path, Format: FormatTrips}}, opts)
	} else {
		_, err = ReadFile(path)
	}
	runtime.ReadMemStats(&after)
	return err, after.TotalAlloc - before.TotalAlloc
}

// Every length field of the footer overwritten with a huge value: the
// readers return an error naming the file (or, where the field was not a
// length, a result), never panic, and allocate little.
func TestParquetLengthFieldsBounded(t *testing.T) {
	const maxAlloc = 64 << 20
	for _, tc := range []struct {
		name  string
		data  []byte
		trips bool
	}{{"store", smallStoreBytes(t), false}, {"trip table", smallTripParquet(t), true}} {
		t.Run(tc.name, func(t *testing.T) {
			dir := t.TempDir()
			start, end := footerRange(tc.data)
			var failed, worst uint64
			for at := start; at < end; at++ {
				for _, patch := range lengthPatches {
					data := append([]byte(nil), tc.data...)
					copy(data[at:end], patch)
					err, alloc := readDamaged(t, dir, data, tc.trips)
					worst = max(worst, alloc)
					if alloc > maxAlloc {
						t.Errorf("offset %d: %d MB allocated", at, alloc>>20)
					}
					if err != nil {
						failed++
						if !strings.Contains(err.Error(), "damaged.parquet") {
							t.Errorf("offset %d: error %q does not name the file", at, err)
						}
					}
				}
			}
			if failed == 0 {
				t.Error("no damaged footer was refused")
			}
			t.Logf("%d footer bytes x %d patches: %d refused, at most %.1f MB allocated by one read", end-start, len(lengthPatches), failed, float64(worst)/(1<<20))
		})
	}
}

// The footer that claims a two-billion-entry list, as in a 12 kB store that
// once made the reader allocate 26 GB, is refused before any allocation.
func TestCheckThriftRefusesHugeLists(t *testing.T) {
	tests := []struct {
		name string
		b    []byte
		ok   bool
	}{
		{"empty struct", []byte{0x00}, true},
		{"i32 field", []byte{0x15, 0x02, 0x00}, true},
		{"list of 2 i32", []byte{0x19, 0x25, 0x02, 0x04, 0x00}, true},
		{"list claiming 2^31 structs", []byte{0x19, 0xfc, 0xff, 0xff, 0xff, 0xff, 0x07, 0x00}, false},
		{"binary claiming 2^31 bytes", []byte{0x18, 0xff, 0xff, 0xff, 0xff, 0x07, 0x00}, false},
		{"map claiming 2^30 entries", []byte{0x1b, 0xff, 0xff, 0xff, 0xff, 0x03, 0x55, 0x00}, false},
		{"truncated", []byte{0x15}, false},
		{"unknown type", []byte{0x1d, 0x00}, false},
	}
	for _, tc := range tests {
		if err := checkThrift(tc.b); (err == nil) != tc.ok {
			t.Errorf("%s: error %v, want ok %v", tc.name, err, tc.ok)
		}
	}
	deep := make([]byte, 0, 200)
	for range 100 {
		deep = append(deep, 0x1c) // field 1, a struct
	}
	if err := checkThrift(deep); err == nil || !strings.Contains(err.Error(), "deep") {
		t.Errorf("100 nested structs: %v", err)
	}
}

// FuzzParquetLengthFields writes a chosen value over a chosen place of a
// small store's or trip table's footer, as a little-endian int32 or a Thrift
// varint: the mutations that reach length fields, which random bytes rarely
// do.
func FuzzParquetLengthFields(f *testing.F) {
	store, trips := smallStoreBytes(f), smallTripParquet(f)
	f.Add(uint16(10), uint32(0x7fffffff), false, false)
	f.Add(uint16(100), uint32(0xffffffff), true, true)
	f.Add(uint16(7), uint32(1<<30), true, false)
	f.Fuzz(func(t *testing.T, at uint16, value uint32, varint, tripTable bool) {
		data := store
		if tripTable {
			data = trips
		}
		data = append([]byte(nil), data...)
		start, end := footerRange(data)
		pos := start + int(at)%(end-start)
		var patch []byte
		if varint {
			patch = binary.AppendUvarint(nil, uint64(value))
		} else {
			patch = binary.LittleEndian.AppendUint32(nil, value)
		}
		copy(data[pos:end], patch)
		if _, alloc := readDamaged(t, t.TempDir(), data, tripTable); alloc > 256<<20 {
			t.Fatalf("%d MB allocated", alloc>>20)
		}
	})
}
