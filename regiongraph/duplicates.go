package regiongraph

import (
	"hash/maphash"
	"sync"
)

// rowSet remembers the rows of an ingest by 64-bit hashes, across its
// files, to find repeated rows and trip ids: overlapping exports, or one
// trip written several times, would otherwise count the same trip again.
// A row with a trip id is remembered by the id's hash with a 16-bit
// fingerprint of the row's text, which tells an exact repeat ("duplicate
// row") from a repeated id with other values ("duplicate trip id"); a row
// without an id by the hash of its text. The tables use open addressing,
// 10 bytes a row with an id and 8 without. With 64-bit hashes, two
// different rows of a 10-million-row ingest share a hash with a chance of
// about 3 in a million.
type rowSet struct {
	seed    maphash.Seed
	ids     hashTable
	content hashTable
}

func newRowSet() *rowSet {
	return &rowSet{seed: maphash.MakeSeed(), ids: hashTable{fingerprints: true}}
}

// rowKey is what a reader keeps of a parsed row for the set.
type rowKey struct {
	id      uint64 // hash of the trip id, 0 without one
	content uint64 // hash of the row's text
}

func (s *rowSet) key(rec, id []byte) rowKey {
	k := rowKey{content: maphash.Bytes(s.seed, rec)}
	if len(id) > 0 {
		k.id = maphash.Bytes(s.seed, id) | 1 // never 0
	}
	return k
}

// check returns ReasonDuplicateRow or ReasonDuplicateTripID when a row of
// key k was seen before, and remembers it otherwise (reasonUsed).
func (s *rowSet) check(k rowKey) Reason {
	if k.id != 0 {
		fp, seen := s.ids.insert(k.id, uint16(k.content>>48))
		switch {
		case !seen:
			return reasonUsed
		case fp == uint16(k.content>>48):
			return ReasonDuplicateRow
		default:
			return ReasonDuplicateTripID
		}
	}
	if _, seen := s.content.insert(k.content|1, 0); seen {
		return ReasonDuplicateRow
	}
	return reasonUsed
}

// hashTable is a set of non-zero 64-bit keys, with an optional 16-bit
// value each, by linear probing; it grows at three quarters full.
type hashTable struct {
	fingerprints bool
	keys         []uint64 // 0 marks a free slot
	values       []uint16
	n            int
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
