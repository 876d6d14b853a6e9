package partition

import (
	"bytes"
	"context"
	"encoding/binary"
	"strings"
	"testing"
)

// Protocol buffer encoding helpers for hand-made PBF files.

func pbTag(field, wire int) []byte { return binary.AppendUvarint(nil, uint64(field<<3|wire)) }

func pbBytes(field int, b []byte) []byte {
	out := append(pbTag(field, 2), binary.AppendUvarint(nil, uint64(len(b)))...)
	return append(out, b...)
}

func pbVarint(field int, v uint64) []byte { return binary.AppendUvarint(pbTag(field, 0), v) }

func zigzag(v int64) uint64 { return uint64(v<<1) ^ uint64(v>>63) }

// pbPacked encodes a packed repeated field of varints.
func pbPacked(field int, vs ...uint64) []byte {
	var b []byte
	for _, v := range vs {
		b = binary.AppendUvarint(b, v)
	}
	return pbBytes(field, b)
}

func cat(parts ...[]byte) []byte { return bytes.Join(parts, nil) }

// fileBlock frames a blob (given as its encoded fields) with its header.
func fileBlock(kind string, blob []byte, datasize int64) []byte {
	head := cat(pbBytes(1, []byte(kind)), pbVarint(3, uint64(datasize)))
	size := binary.BigEndian.AppendUint32(nil, uint32(len(head)))
	return cat(size, head, blob)
}

func blobBlock(blob []byte) []byte { return fileBlock("OSMHeader", blob, int64(len(blob))) }

func rawFileBlock(kind string, data []byte) []byte {
	blob := pbBytes(1, data)
	return fileBlock(kind, blob, int64(len(blob)))
}

// townPBF is a tiny PBF: header bounds -30.02,40.00,-29.98,40.02, and
// one primary road across them; group replaces the data group if not nil.
func townPBF(group []byte) []byte {
	nano := func(deg float64) uint64 { return zigzag(int64(deg * 1e9)) }
	bbox := cat(pbVarint(1, nano(-30.02)), pbVarint(2, nano(-29.98)), pbVarint(3, nano(40.02)), pbVarint(4, nano(40.00)))
	header := cat(pbBytes(1, bbox), pbBytes(4, []byte("OsmSchema-V0.6")), pbBytes(4, []byte("DenseNodes")))
	strs := pbBytes(1, cat(pbBytes(1, nil), pbBytes(1, []byte("highway")), pbBytes(1, []byte("primary")), pbBytes(1, []byte("name")), pbBytes(1, []byte("Canal Row"))))
	if group == nil {
		// Two nodes (granularity 100 nanodegrees), delta coded, then the way.
		dense := cat(pbPacked(1, zigzag(1), zigzag(1)),
			pbPacked(8, zigzag(400100000), zigzag(0)),
			pbPacked(9, zigzag(-300300000), zigzag(600000)))
		way := cat(pbVarint(1, 7), pbPacked(2, 1, 3), pbPacked(3, 2, 4), pbPacked(8, zigzag(1), zigzag(1)))
		group = cat(pbBytes(2, pbBytes(2, dense)), pbBytes(2, pbBytes(3, way)))
	}
	return cat(rawFileBlock("OSMHeader", header), rawFileBlock("OSMData", cat(strs, group)))
}

func TestPBFGuard(t *testing.T) {
	p, err := Build(context.Background(), bytes.NewReader(townPBF(nil)), "canal.osm.pbf", DefaultOptions())
	if err != nil {
		t.Fatalf("hand-made PBF: %v", err)
	}
	// Canal Row runs west to east at 40.01, across the area: two regions.
	if len(p.Regions) != 2 || p.Regions[0].BorderRoads[0].Name != "Canal Row" || p.Bound.Min[0] != -30.02 {
		t.Fatalf("%d regions, bound %v; want 2 regions split by Canal Row", len(p.Regions), p.Bound)
	}

	// Inputs that would make the decoder panic: each must be an error.
	dense := func(extra []byte) []byte {
		return pbBytes(2, pbBytes(2, cat(pbPacked(1, zigzag(1)), pbPacked(8, zigzag(400100000)), pbPacked(9, zigzag(-300300000)), extra)))
	}
	tests := []struct {
		name string
		data []byte
		want string
	}{
		{"plain nodes", townPBF(pbBytes(2, pbBytes(1, pbVarint(1, 1)))), "plain (non-dense) nodes"},
		{"tag string index", townPBF(dense(pbPacked(10, 1, 99, 0))), "string index out of range"},
		{"negative tag string index", townPBF(dense(pbPacked(10, 1, uint64(1<<64-1), 0))), "string index out of range"},
		{"user string index", townPBF(dense(pbBytes(5, pbPacked(5, zigzag(3), zigzag(5))))), "string index out of range"},
		{"way tag index", townPBF(pbBytes(2, pbBytes(3, cat(pbVarint(1, 7), pbPacked(2, 50), pbPacked(3, 2))))), "string index out of range"},
		{"way user index", townPBF(pbBytes(2, pbBytes(3, cat(pbVarint(1, 7), pbBytes(4, pbVarint(5, 77)))))), "string index out of range"},
		{"way arrays", townPBF(pbBytes(2, pbBytes(3, cat(pbVarint(1, 7), pbPacked(8, 2, 2), pbPacked(9, 2, 2, 2))))), "different lengths"},
		{"negative data size", fileBlock("OSMHeader", nil, -5), "out of range"},
		{"huge raw size", blobBlock(cat(pbVarint(2, 1<<31-1), pbBytes(3, []byte("x")))), "out of range"},
		{"no compression", blobBlock(pbVarint(2, 5)), "neither raw nor zlib"},
		{"cut in a block", townPBF(nil)[:60], "truncated"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := Build(context.Background(), bytes.NewReader(tc.data), "bad.osm.pbf", DefaultOptions())
			if err == nil || !strings.Contains(err.Error(), "bad.osm.pbf") || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %v; want the file name and %q", err, tc.want)
			}
		})
	}
}
