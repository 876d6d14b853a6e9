package regiongraph

import (
	"encoding/binary"
	"fmt"
	"math"
	"os"
	"sync"
)

// spillFile is one temporary file of an ingest, created on first use in
// the ingest's spill folder and removed when closed. Trip records and
// duplicate-check tables that outgrow the ingest's memory are appended to
// it as segments and read back by offset: the memory of an ingest then
// depends on its largest day, not on its number of days.
type spillFile struct {
	dir string

	mu   sync.Mutex
	f    *os.File
	size int64
	err  error // the first failure; every later call returns it
}

// A segment is a run of n fixed-size items at off in a spill file.
type segment struct {
	off int64
	n   int
}

func newSpillFile(dir string) *spillFile { return &spillFile{dir: dir} }

// write appends b and returns its offset.
func (s *spillFile) write(b []byte) (int64, error) {
	s.mu.Lock()
	defer s.mu.Unlock()
	if s.err != nil {
		return 0, s.err
	}
	if s.f == nil {
		f, err := os.CreateTemp(s.dir, "narrows-spill-*.tmp")
		if err != nil {
			s.err = fmt.Errorf("regiongraph: spill file: %w", err)
			return 0, s.err
		}
		s.f = f
	}
	off := s.size
	if _, err := s.f.WriteAt(b, off); err != nil {
		s.err = fmt.Errorf("regiongraph: spill file: %w", err)
		return 0, s.err
	}
	s.size += int64(len(b))
	return off, nil
}

// written returns the bytes written so far.
func (s *spillFile) written() int64 {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.size
}

// readAt fills b from off; it may be called from several goroutines.
func (s *spillFile) readAt(b []byte, off int64) error {
	s.mu.Lock()
	f, err := s.f, s.err
	s.mu.Unlock()
	if err != nil {
		return err
	}
	if _, err := f.ReadAt(b, off); err != nil {
		return fmt.Errorf("regiongraph: spill file: %w", err)
	}
	return nil
}

// close removes the file.
func (s *spillFile) close() {
	s.mu.Lock()
	defer s.mu.Unlock()
	if s.f != nil {
		s.f.Close()
		os.Remove(s.f.Name())
		s.f = nil
	}
}

// recordBytes is the size of a record in a spill file.
const recordBytes = 16

// spillRecords appends the records to the file as one segment, through the
// scratch buffer *buf.
func (s *spillFile) spillRecords(recs []record, buf *[]byte) (segment, error) {
	b := (*buf)[:0]
	for i := range recs {
		r := &recs[i]
		b = binary.LittleEndian.AppendUint32(b, r.pair)
		b = binary.LittleEndian.AppendUint32(b, math.Float32bits(r.distance))
		b = binary.LittleEndian.AppendUint32(b, math.Float32bits(r.duration))
		b = binary.LittleEndian.AppendUint32(b, math.Float32bits(r.straight))
	}
	*buf = b
	off, err := s.write(b)
	return segment{off: off, n: len(recs)}, err
}

// appendRecords appends the records of a segment to recs, reading through
// the scratch buffer *buf.
func (s *spillFile) appendRecords(recs []record, seg segment, buf *[]byte) ([]record, error) {
	if cap(*buf) < seg.n*recordBytes {
		*buf = make([]byte, seg.n*recordBytes)
	}
	b := (*buf)[:seg.n*recordBytes]
	if err := s.readAt(b, seg.off); err != nil {
		return recs, err
	}
	for i := 0; i < len(b); i += recordBytes {
		recs = append(recs, record{
			pair:     binary.LittleEndian.Uint32(b[i:]),
			distance: math.Float32frombits(binary.LittleEndian.Uint32(b[i+4:])),
			duration: math.Float32frombits(binary.LittleEndian.Uint32(b[i+8:])),
			straight: math.Float32frombits(binary.LittleEndian.Uint32(b[i+12:])),
		})
	}
	return recs, nil
}
