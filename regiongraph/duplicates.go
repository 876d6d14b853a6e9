package regiongraph

import (
	"encoding/binary"
	"math/bits"
	"sync"
	"sync/atomic"
)

// rowSet remembers the rows of an ingest by 64-bit hashes, to find
// repeated rows and trip ids: overlapping exports, or one trip written
// several times, would otherwise count the same trip again. Rows are
// remembered per local day of their start: a trip's repeat in an
// overlapping export has the same start, so it falls on the same day, and
// the set of a day is a day's worth of rows. A row with a trip id is
// remembered by the id's hash with a 16-bit fingerprint of the row's text,
// which tells an exact repeat ("duplicate row") from a repeated id with
// other values ("duplicate trip id"); a row without an id by the hash of
// its text. The tables use open addressing, 10 bytes a row with an id and
// 8 without. With 64-bit hashes, two different rows of a 10-million-row
// ingest share a hash with a chance of about 3 in a million.
//
// The hash is fixed (no seed), so the rows judged repeats do not change
// from run to run even in the unlikely case of a collision. The days'
// tables together are held to a budget: past it, the tables of cold days
// (no row among the last coldRows checked) go to the spill file, least
// recently used first, and come back when a row of their day does. Input
// sorted by day (or a few days interleaved, or exports overlapping by some
// days) so keeps a day or two in memory; in input whose days are shuffled
// no day goes cold, and the tables stay in memory (10 bytes a row) rather
// than go back and forth to the file.
type rowSet struct {
	days   map[Day]*dayRowSet
	clock  int64
	bytes  int64 // of the tables in memory
	budget int64
	spill  *spillFile
	buf    []byte
	err    error // the first spill failure
	cold   int64 // coldRows, smaller in tests
	// retry is the clock before which evict does not look again after it
	// found no cold day.
	retry int64
	// over is the bytes of tables in memory past the budget (no day cold
	// enough to go), read by the trip readers, which then hold fewer trip
	// records: the two share the ingest's memory.
	over atomic.Int64
}

// dayRowSet is the set of one local day's rows.
type dayRowSet struct {
	ids, content hashTable
	lastUse      int64
	evicted      bool
	seg          segment // when evicted: the tables' entries in the spill file
	nIDs         int     // of the segment's entries, ids first
}

// newRowSet returns a set holding at most budget bytes of tables in
// memory (besides the day being checked), spilling to spill.
func newRowSet(budget int64, spill *spillFile) *rowSet {
	return &rowSet{days: make(map[Day]*dayRowSet), budget: budget, spill: spill, cold: coldRows}
}

// rowKey is what a reader keeps of a parsed row for the set.
type rowKey struct {
	day     Day    // local day of the start
	id      uint64 // hash of the trip id, 0 without one
	content uint64 // hash of the row's text
}

func rowKeyOf(day Day, rec, id []byte) rowKey {
	k := rowKey{day: day, content: rowHash(rec)}
	if len(id) > 0 {
		k.id = rowHash(id) | 1 // never 0
	}
	return k
}

// rowHash is a fixed 64-bit hash of b: MurmurHash3's x64 block mixing over
// 8-byte words and its 64-bit finaliser, with seed 0.
func rowHash(b []byte) uint64 {
	const c1, c2 = 0x87c37b91114253d5, 0x4cf5ad432745937f
	h := uint64(0)
	n := len(b)
	for ; len(b) >= 8; b = b[8:] {
		k := binary.LittleEndian.Uint64(b) * c1
		k = bits.RotateLeft64(k, 31) * c2
		h ^= k
		h = bits.RotateLeft64(h, 27)*5 + 0x52dce729
	}
	var k uint64
	for i := len(b) - 1; i >= 0; i-- {
		k = k<<8 | uint64(b[i])
	}
	k *= c1
	k = bits.RotateLeft64(k, 31) * c2
	h ^= k ^ uint64(n)
	h ^= h >> 33
	h *= 0xff51afd7ed558ccd
	h ^= h >> 33
	h *= 0xc4ceb9fe1a85ec53
	h ^= h >> 33
	return h
}

// check returns ReasonDuplicateRow or ReasonDuplicateTripID when a row of
// key k was seen before on its day, and remembers it otherwise
// (reasonUsed).
func (s *rowSet) check(k rowKey) Reason {
	d := s.day(k.day)
	before := d.bytes()
	r := reasonUsed
	if k.id != 0 {
		fp, seen := d.ids.insert(k.id, uint16(k.content>>48))
		switch {
		case !seen:
		case fp == uint16(k.content>>48):
			r = ReasonDuplicateRow
		default:
			r = ReasonDuplicateTripID
		}
	} else if _, seen := d.content.insert(k.content|1, 0); seen {
		r = ReasonDuplicateRow
	}
	if grown := d.bytes() - before; grown != 0 {
		s.bytes += grown
		if s.bytes > s.budget {
			s.evict(d)
		}
		s.over.Store(max(0, s.bytes-s.budget))
	}
	return r
}

// day returns the set of a day, read back if it was evicted.
func (s *rowSet) day(day Day) *dayRowSet {
	s.clock++
	d := s.days[day]
	if d == nil {
		d = &dayRowSet{ids: hashTable{fingerprints: true}}
		s.days[day] = d
	}
	d.lastUse = s.clock
	if d.evicted {
		s.load(d)
	}
	return d
}

func (d *dayRowSet) bytes() int64 { return d.ids.bytes() + d.content.bytes() }

// coldRows is the number of rows checked since a day's last row that
// makes the day cold: about three days of a city of 300,000 trips a day.
const coldRows = 1 << 20

// evict writes the least recently used cold days other than keep to the spill
// file until the tables in memory are under half the budget.
func (s *rowSet) evict(keep *dayRowSet) {
	if s.clock < s.retry {
		return
	}
	for s.bytes > s.budget/2 && s.err == nil {
		var lru *dayRowSet
		for _, d := range s.days {
			if d != keep && !d.evicted && d.bytes() > 0 && d.lastUse < s.clock-s.cold && (lru == nil || d.lastUse < lru.lastUse) {
				lru = d
			}
		}
		if lru == nil {
			s.retry = s.clock + s.cold/16
			return
		}
		b := s.buf[:0]
		nIDs := 0
		for i, key := range lru.ids.keys {
			if key != 0 {
				b = binary.LittleEndian.AppendUint64(b, key)
				b = binary.LittleEndian.AppendUint16(b, lru.ids.values[i])
				nIDs++
			}
		}
		for _, key := range lru.content.keys {
			if key != 0 {
				b = binary.LittleEndian.AppendUint64(b, key)
			}
		}
		s.buf = b
		off, err := s.spill.write(b)
		if err != nil {
			s.err = err
			return
		}
		s.bytes -= lru.bytes()
		lru.seg, lru.nIDs = segment{off: off, n: len(b)}, nIDs
		lru.evicted = true
		lru.ids = hashTable{fingerprints: true}
		lru.content = hashTable{}
	}
}

// load reads an evicted day's tables back.
func (s *rowSet) load(d *dayRowSet) {
	d.evicted = false
	if cap(s.buf) < d.seg.n {
		s.buf = make([]byte, d.seg.n)
	}
	b := s.buf[:d.seg.n]
	if err := s.spill.readAt(b, d.seg.off); err != nil {
		s.err = err
		return
	}
	nContent := (len(b) - 10*d.nIDs) / 8
	d.ids.reserve(d.nIDs)
	d.content.reserve(nContent)
	for i := 0; i < d.nIDs; i++ {
		d.ids.insert(binary.LittleEndian.Uint64(b[10*i:]), binary.LittleEndian.Uint16(b[10*i+8:]))
	}
	for i, at := 0, 10*d.nIDs; i < nContent; i, at = i+1, at+8 {
		d.content.insert(binary.LittleEndian.Uint64(b[at:]), 0)
	}
	s.bytes += d.bytes()
	if s.bytes > s.budget {
		s.evict(d)
	}
	s.over.Store(max(0, s.bytes-s.budget))
}

// hashTable is a set of non-zero 64-bit keys, with an optional 16-bit
// value each, by linear probing; it grows at three quarters full.
type hashTable struct {
	fingerprints bool
	keys         []uint64 // 0 marks a free slot
	values       []uint16
	n            int
}

func (h *hashTable) bytes() int64 { return int64(8*len(h.keys) + 2*len(h.values)) }

// reserve sizes an empty table for n keys.
func (h *hashTable) reserve(n int) {
	size := 1024
	for 4*n > 3*size {
		size *= 2
	}
	if size > len(h.keys) {
		h.keys = make([]uint64, size)
		if h.fingerprints {
			h.values = make([]uint16, size)
		}
	}
}

// insert adds key with value v unless present; it returns the value kept
// and whether key was present.
func (h *hashTable) insert(key uint64, v uint16) (uint16, bool) {
	if 4*(h.n+1) > 3*len(h.keys) {
		h.grow()
	}
	mask := uint64(len(h.keys) - 1)
	for i := key & mask; ; i = (i + 1) & mask {
		switch h.keys[i] {
		case 0:
			h.keys[i] = key
			if h.fingerprints {
				h.values[i] = v
			}
			h.n++
			return v, false
		case key:
			if h.fingerprints {
				return h.values[i], true
			}
			return 0, true
		}
	}
}

func (h *hashTable) grow() {
	old, oldValues := h.keys, h.values
	size := max(1024, 2*len(old))
	h.keys = make([]uint64, size)
	if h.fingerprints {
		h.values = make([]uint16, size)
	}
	h.n = 0
	for i, k := range old {
		if k != 0 {
			var v uint16
			if h.fingerprints {
				v = oldValues[i]
			}
			h.insert(k, v)
		}
	}
}

// turnstile lets the readers of a file's chunks, which parse in parallel,
// pass one point in the order of the chunks: the row set then keeps the
// first of repeated rows in file order, whatever the number of readers.
type turnstile struct {
	mu   sync.Mutex
	cond *sync.Cond
	next int64
}

func newTurnstile() *turnstile {
	t := &turnstile{}
	t.cond = sync.NewCond(&t.mu)
	return t
}

// pass waits for chunk seq's turn, runs f and lets the next chunk through.
// Every chunk must pass, in use or not, or the later ones wait forever.
func (t *turnstile) pass(seq int64, f func()) {
	t.mu.Lock()
	for t.next != seq {
		t.cond.Wait()
	}
	f()
	t.next++
	t.cond.Broadcast()
	t.mu.Unlock()
}
