package regiongraph

import (
	"encoding/binary"
	"errors"
	"fmt"
	"io"

	"github.com/parquet-go/parquet-go"
)

// The Parquet library trusts the lengths a file gives: a footer whose list
// claims two billion entries makes it allocate tens of gigabytes before it
// notices the file is 12 kB, and the Go runtime then aborts the process,
// which no recover catches. openParquetChecked walks the footer's Thrift
// encoding first and refuses any length that the bytes after it cannot
// hold, then checks that every column chunk lies inside the file, and turns
// a panic of the library on what remains into an error.

// maxThriftDepth bounds the nesting of the footer's structs and lists (a
// Parquet footer nests a handful deep).
const maxThriftDepth = 64

// openParquetChecked opens a Parquet file of the given size after
// checking its footer (see above). Errors do not name the file; the
// callers do.
func openParquetChecked(f io.ReaderAt, size int64) (pf *parquet.File, err error) {
	var tail [8]byte
	if size < 12 {
		return nil, fmt.Errorf("%d bytes is too short", size)
	}
	if _, err := f.ReadAt(tail[:], size-8); err != nil {
		return nil, err
	}
	if string(tail[4:]) != "PAR1" {
		return nil, errors.New("no Parquet end marker (PAR1)")
	}
	footer := int64(binary.LittleEndian.Uint32(tail[:4]))
	if footer+12 > size {
		return nil, fmt.Errorf("footer of %d bytes in a file of %d", footer, size)
	}
	buf := make([]byte, footer)
	if _, err := f.ReadAt(buf, size-8-footer); err != nil {
		return nil, err
	}
	if err := checkThrift(buf); err != nil {
		return nil, fmt.Errorf("damaged footer: %v", err)
	}
	defer func() {
		if r := recover(); r != nil {
			pf, err = nil, fmt.Errorf("damaged file: %v", r)
		}
	}()
	pf, err = parquet.OpenFile(f, size, parquet.SkipBloomFilters(true), parquet.SkipPageIndex(true))
	if err != nil {
		return nil, err
	}
	for g, rg := range pf.Metadata().RowGroups {
		for c, cc := range rg.Columns {
			md := cc.MetaData
			start := md.DataPageOffset
			if md.DictionaryPageOffset > 0 && md.DictionaryPageOffset < start {
				start = md.DictionaryPageOffset
			}
			if start < 4 || md.TotalCompressedSize < 0 || start+md.TotalCompressedSize > size-8-footer ||
				md.NumValues < 0 || md.TotalUncompressedSize < 0 {
				return nil, fmt.Errorf("damaged footer: row group %d, column %d lies outside the file", g, c)
			}
			// The page indexes are read later, on demand, by the same
			// trusting decoder: check them now.
			for _, idx := range [][2]int64{{cc.OffsetIndexOffset, int64(cc.OffsetIndexLength)}, {cc.ColumnIndexOffset, int64(cc.ColumnIndexLength)}} {
				if idx[0] == 0 {
					continue
				}
				if idx[0] < 4 || idx[1] < 0 || idx[0]+idx[1] > size-8-footer {
					return nil, fmt.Errorf("damaged footer: the page index of row group %d, column %d lies outside the file", g, c)
				}
				b := make([]byte, idx[1])
				if _, err := f.ReadAt(b, idx[0]); err != nil {
					return nil, err
				}
				if err := checkThrift(b); err != nil {
					return nil, fmt.Errorf("damaged page index of row group %d, column %d: %v", g, c, err)
				}
			}
		}
	}
	return pf, nil
}

// thriftChecker walks Thrift compact-protocol bytes without building
// anything.
type thriftChecker struct {
	b   []byte
	pos int
}

// checkThrift checks that b is one Thrift compact-protocol struct whose
// every length fits in the bytes that follow it.
func checkThrift(b []byte) error {
	c := thriftChecker{b: b}
	return c.structure(0)
}

func (c *thriftChecker) left() int { return len(c.b) - c.pos }

func (c *thriftChecker) byte1() (byte, error) {
	if c.pos >= len(c.b) {
		return 0, errors.New("ends early")
	}
	c.pos++
	return c.b[c.pos-1], nil
}

func (c *thriftChecker) varint() (uint64, error) {
	v, n := binary.Uvarint(c.b[c.pos:])
	if n <= 0 {
		return 0, fmt.Errorf("bad varint at byte %d", c.pos)
	}
	c.pos += n
	return v, nil
}

// length reads a length that must fit in the bytes left, each item taking
// at least per bytes.
func (c *thriftChecker) length(v uint64, per int) (int, error) {
	if v > uint64(c.left()/per) {
		return 0, fmt.Errorf("length %d at byte %d, but only %d bytes follow", v, c.pos, c.left())
	}
	return int(v), nil
}

func (c *thriftChecker) structure(depth int) error {
	if depth > maxThriftDepth {
		return errors.New("nested too deep")
	}
	for {
		h, err := c.byte1()
		if err != nil {
			return err
		}
		typ := h & 0x0f
		if typ == 0 {
			return nil // stop
		}
		if h>>4 == 0 { // the field id follows as a varint
			if _, err := c.varint(); err != nil {
				return err
			}
		}
		if err := c.value(typ, depth); err != nil {
			return err
		}
	}
}

func (c *thriftChecker) value(typ byte, depth int) error {
	switch typ {
	case 1, 2: // boolean in a field header
		return nil
	case 3:
		_, err := c.byte1()
		return err
	case 4, 5, 6:
		_, err := c.varint()
		return err
	case 7:
		if c.left() < 8 {
			return errors.New("ends early")
		}
		c.pos += 8
		return nil
	case 8:
		v, err := c.varint()
		if err != nil {
			return err
		}
		n, err := c.length(v, 1)
		c.pos += n
		return err
	case 9, 10:
		h, err := c.byte1()
		if err != nil {
			return err
		}
		size, elem := uint64(h>>4), h&0x0f
		if size == 15 {
			if size, err = c.varint(); err != nil {
				return err
			}
		}
		n, err := c.length(size, 1)
		if err != nil {
			return err
		}
		if depth >= maxThriftDepth {
			return errors.New("nested too deep")
		}
		for range n {
			if elem == 1 || elem == 2 { // a boolean element is one byte
				if _, err := c.byte1(); err != nil {
					return err
				}
				continue
			}
			if err := c.value(elem, depth+1); err != nil {
				return err
			}
		}
		return nil
	case 11:
		v, err := c.varint()
		if err != nil {
			return err
		}
		n, err := c.length(v, 2)
		if err != nil || n == 0 {
			return err
		}
		kv, err := c.byte1()
		if err != nil {
			return err
		}
		for range n {
			for _, t := range []byte{kv >> 4, kv & 0x0f} {
				if t == 1 || t == 2 {
					if _, err := c.byte1(); err != nil {
						return err
					}
				} else if err := c.value(t, depth+1); err != nil {
					return err
				}
			}
		}
		return nil
	case 12:
		return c.structure(depth + 1)
	}
	return fmt.Errorf("unknown Thrift type %d at byte %d", typ, c.pos)
}
