package partition

import (
	"bytes"
	"compress/zlib"
	"encoding/binary"
	"errors"
	"fmt"
	"io"

	"github.com/paulmach/protoscan"
)

// The PBF decoder trusts its input: a block with an out-of-range string
// index, a negative size or a plain (non-dense) node makes it panic in one
// of its goroutines, which no caller can recover. pbfGuard sits between
// the file and the decoder and passes on each file block only after
// checking it, so that bad input becomes an error instead. Having
// uncompressed a block to check it, it passes it on uncompressed (a raw
// blob), so the decoder does not uncompress it again.

const (
	maxBlobHeaderBytes = 64 << 10 // limits of the PBF format (and the decoder)
	maxBlobBytes       = 32 << 20
)

// pbfGuard is an io.Reader that yields a PBF stream block by block, each
// checked first; a bad block ends the stream with an error naming it.
type pbfGuard struct {
	r       io.Reader
	pending []byte
	err     error
	block   int
	buf     bytes.Buffer // uncompressed data of the current block
	out     []byte       // the current block, re-encoded
}

func newPBFGuard(r io.Reader) *pbfGuard { return &pbfGuard{r: r} }

func (g *pbfGuard) Read(p []byte) (int, error) {
	for len(g.pending) == 0 {
		if g.err != nil {
			return 0, g.err
		}
		g.pending, g.err = g.next()
	}
	n := copy(p, g.pending)
	g.pending = g.pending[n:]
	return n, nil
}

// next reads and checks one file block and returns its bytes.
func (g *pbfGuard) next() ([]byte, error) {
	var size [4]byte
	if _, err := io.ReadFull(g.r, size[:]); err != nil {
		return nil, err // io.EOF at a block boundary is the clean end
	}
	g.block++
	n := binary.BigEndian.Uint32(size[:])
	if n == 0 || n >= maxBlobHeaderBytes {
		return nil, fmt.Errorf("PBF block %d: header size %d out of range", g.block, n)
	}
	head := make([]byte, n)
	if _, err := io.ReadFull(g.r, head); err != nil {
		return nil, unexpected(err)
	}
	kind, dataSize, err := blobHeader(head)
	if err != nil {
		return nil, fmt.Errorf("PBF block %d: %v", g.block, err)
	}
	blob := make([]byte, dataSize)
	if _, err := io.ReadFull(g.r, blob); err != nil {
		return nil, unexpected(err)
	}
	data, err := g.blobData(blob)
	if err != nil {
		return nil, fmt.Errorf("PBF block %d: %v", g.block, err)
	}
	if kind == "OSMData" {
		if err := checkPrimitiveBlock(data); err != nil {
			return nil, fmt.Errorf("PBF block %d: %v", g.block, err)
		}
	}
	return g.rawBlock(kind, data), nil
}

// rawBlock encodes a file block holding data as a raw blob: the size,
// BlobHeader{type, datasize} and Blob{raw}.
func (g *pbfGuard) rawBlock(kind string, data []byte) []byte {
	blobLen := 1 + varintLen(uint64(len(data))) + len(data)
	out := append(g.out[:0], 0, 0, 0, 0)
	out = append(out, 0x0a)
	out = binary.AppendUvarint(out, uint64(len(kind)))
	out = append(out, kind...)
	out = append(out, 0x18)
	out = binary.AppendUvarint(out, uint64(blobLen))
	binary.BigEndian.PutUint32(out, uint32(len(out)-4))
	out = append(out, 0x0a)
	out = binary.AppendUvarint(out, uint64(len(data)))
	out = append(out, data...)
	g.out = out
	return out
}

func varintLen(v uint64) int {
	n := 1
	for v >= 0x80 {
		v >>= 7
		n++
	}
	return n
}

func unexpected(err error) error {
	if errors.Is(err, io.EOF) {
		return io.ErrUnexpectedEOF
	}
	return err
}

// blobHeader returns the type and data size of a BlobHeader.
func blobHeader(b []byte) (kind string, size int, err error) {
	msg := protoscan.New(b)
	foundSize := false
	for msg.Next() {
		switch msg.FieldNumber() {
		case 1:
			if kind, err = msg.String(); err != nil {
				return "", 0, err
			}
		case 3:
			v, err := msg.Int32()
			if err != nil {
				return "", 0, err
			}
			if v < 0 || v >= maxBlobBytes {
				return "", 0, fmt.Errorf("data size %d out of range", v)
			}
			size, foundSize = int(v), true
		default:
			msg.Skip()
		}
	}
	if err := msg.Err(); err != nil {
		return "", 0, err
	}
	if kind == "" || !foundSize {
		return "", 0, errors.New("blob header without type or size")
	}
	return kind, size, nil
}

// blobData returns the uncompressed content of a Blob, as the decoder
// would read it (raw first, then zlib).
func (g *pbfGuard) blobData(b []byte) ([]byte, error) {
	msg := protoscan.New(b)
	var raw, zdata []byte
	rawSize := int32(-1)
	for msg.Next() {
		var err error
		switch msg.FieldNumber() {
		case 1:
			raw, err = msg.Bytes()
		case 2:
			rawSize, err = msg.Int32()
		case 3:
			zdata, err = msg.Bytes()
		default:
			msg.Skip()
		}
		if err != nil {
			return nil, err
		}
	}
	if err := msg.Err(); err != nil {
		return nil, err
	}
	switch {
	case raw != nil:
		if len(raw) > maxBlobBytes-16 {
			return nil, fmt.Errorf("raw blob of %d bytes too large", len(raw))
		}
		return raw, nil
	case zdata != nil:
		if rawSize < 0 || rawSize > maxBlobBytes-16 {
			return nil, fmt.Errorf("uncompressed size %d out of range", rawSize)
		}
		zr, err := zlib.NewReader(bytes.NewReader(zdata))
		if err != nil {
			return nil, fmt.Errorf("zlib: %v", err)
		}
		g.buf.Reset()
		if _, err := g.buf.ReadFrom(io.LimitReader(zr, int64(rawSize)+1)); err != nil {
			return nil, fmt.Errorf("zlib: %v", err)
		}
		if g.buf.Len() != int(rawSize) {
			return nil, fmt.Errorf("uncompressed %d bytes, header says %d", g.buf.Len(), rawSize)
		}
		return g.buf.Bytes(), nil
	}
	return nil, errors.New("blob is neither raw nor zlib-compressed (other compressions are not supported)")
}

// checkPrimitiveBlock checks what the decoder does not: string indices in
// range, no plain nodes, and way node arrays no longer than the first.
func checkPrimitiveBlock(data []byte) error {
	msg := protoscan.New(data)
	strings := 0
	for msg.Next() {
		if msg.FieldNumber() != 1 {
			msg.Skip()
			continue
		}
		d, err := msg.MessageData()
		if err != nil {
			return err
		}
		// The decoder unmarshals each string table afresh: the last counts.
		strings = 0
		st := protoscan.New(d)
		for st.Next() {
			if st.FieldNumber() == 1 {
				strings++
			}
			st.Skip()
		}
		if err := st.Err(); err != nil {
			return err
		}
	}
	if err := msg.Err(); err != nil {
		return err
	}
	msg.Reset(nil)
	for msg.Next() {
		if msg.FieldNumber() != 2 {
			msg.Skip()
			continue
		}
		d, err := msg.MessageData()
		if err != nil {
			return err
		}
		if err := checkGroup(d, strings); err != nil {
			return err
		}
	}
	return msg.Err()
}

func checkGroup(data []byte, strings int) error {
	msg := protoscan.New(data)
	for msg.Next() {
		switch msg.FieldNumber() {
		case 1:
			return errors.New("plain (non-dense) nodes are not supported; rewrite the file with dense nodes")
		case 2, 3:
			d, err := msg.MessageData()
			if err != nil {
				return err
			}
			if msg.FieldNumber() == 2 {
				err = checkDenseNodes(d, strings)
			} else {
				err = checkWay(d, strings)
			}
			if err != nil {
				return err
			}
		default:
			msg.Skip()
		}
	}
	return msg.Err()
}

var errStringIndex = errors.New("string index out of range")

func checkDenseNodes(data []byte, strings int) error {
	msg := protoscan.New(data)
	for msg.Next() {
		switch msg.FieldNumber() {
		case 5: // dense info: user_sid, delta coded
			d, err := msg.MessageData()
			if err != nil {
				return err
			}
			info := protoscan.New(d)
			for info.Next() {
				if info.FieldNumber() != 5 {
					info.Skip()
					continue
				}
				it, err := info.Iterator(nil)
				if err != nil {
					return err
				}
				var sid int32
				for it.HasNext() {
					v, err := it.Sint32()
					if err != nil {
						return err
					}
					sid += v
					if sid < 0 || int(sid) >= strings {
						return errStringIndex
					}
				}
			}
			if err := info.Err(); err != nil {
				return err
			}
		case 10: // keys_vals
			it, err := msg.Iterator(nil)
			if err != nil {
				return err
			}
			for it.HasNext() {
				v, err := it.Int32()
				if err != nil {
					return err
				}
				if v < 0 || int(v) >= strings {
					return errStringIndex
				}
			}
		default:
			msg.Skip()
		}
	}
	return msg.Err()
}

func checkWay(data []byte, strings int) error {
	msg := protoscan.New(data)
	nodes := 0
	for msg.Next() {
		switch fn := msg.FieldNumber(); fn {
		case 2, 3: // keys, vals
			it, err := msg.Iterator(nil)
			if err != nil {
				return err
			}
			for it.HasNext() {
				v, err := it.Uint32()
				if err != nil {
					return err
				}
				if int64(v) >= int64(strings) {
					return errStringIndex
				}
			}
		case 4: // info: user_sid
			d, err := msg.MessageData()
			if err != nil {
				return err
			}
			info := protoscan.New(d)
			for info.Next() {
				if info.FieldNumber() != 5 {
					info.Skip()
					continue
				}
				v, err := info.Uint32()
				if err != nil {
					return err
				}
				if int64(v) >= int64(strings) {
					return errStringIndex
				}
			}
			if err := info.Err(); err != nil {
				return err
			}
		case 8, 9, 10: // refs, lats, lons: the first non-empty one sizes the node list
			it, err := msg.Iterator(nil)
			if err != nil {
				return err
			}
			n := it.Count(protoscan.WireTypeVarint)
			if nodes == 0 {
				nodes = n
			} else if n > nodes {
				return errors.New("way node arrays of different lengths")
			}
		default:
			msg.Skip()
		}
	}
	return msg.Err()
}
