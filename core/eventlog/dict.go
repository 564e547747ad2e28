package eventlog

import (
	"encoding/binary"
	"math/bits"
	"math/rand/v2"
	"unsafe"
)

// Dict interns strings: each distinct string gets a dense int32 id, in order of first arrival, so
// ids are deterministic for a given input order and can index slices directly.
//
// It is an open-addressing hash table of its own rather than a Go map, because interning is the
// hot loop of intake (a 1M-event log with 100k cases makes 3 to 6 lookups per row, most of them
// in the large case-id table). Each slot packs the upper half of the key's hash with the key's
// offset in an arena, so a lookup costs one table access and one arena access and allocates
// nothing; a Go map costs a third access for the key's string header. Measured on the intake
// benchmark (1M events, rows in random order): see DEVELOPERS.md.
//
// Strings live back to back in arena chunks that are never moved or written again, and Name
// returns strings that point into them (so a Dict's strings stay valid as long as any is used).
type Dict struct {
	seed  uint64
	slots []uint64 // hash tag << 32 | (id + 1); 0 is empty
	names []string
	chunk []byte // the arena chunk being filled
}

const arenaChunk = 1 << 20

// NewDict returns an empty dictionary.
func NewDict() *Dict {
	return &Dict{seed: rand.Uint64() | 1, slots: make([]uint64, 16)}
}

// Intern returns the id of s, adding s if it is new.
func (d *Dict) Intern(s string) int32 {
	return d.InternBytes(unsafe.Slice(unsafe.StringData(s), len(s)))
}

// InternBytes is Intern for a byte slice; b is copied only when it is new, so b may be a
// reader's reusable buffer.
func (d *Dict) InternBytes(b []byte) int32 {
	return d.intern(b, hash(d.seed, b))
}

// InternBatch interns keys[i] into out[i], in order, exactly as InternBytes one by one would.
//
// It exists for speed on large tables: it first hashes every key, then probes, so that the
// probes of different keys (each a likely cache miss in a table of 100k cases) are independent
// instructions close together, which the processor overlaps; interleaved with the rest of a
// row's work they wait one after the other.
func (d *Dict) InternBatch(keys [][]byte, hashes []uint64, out []int32) {
	for i, k := range keys {
		hashes[i] = hash(d.seed, k)
	}
	for i, k := range keys {
		out[i] = d.intern(k, hashes[i])
	}
}

// intern finds or adds b, whose hash is h, by linear probing.
func (d *Dict) intern(b []byte, h uint64) int32 {
	tag := h >> 32
	mask := uint64(len(d.slots) - 1)
	for i := h & mask; ; i = (i + 1) & mask {
		s := d.slots[i]
		if s == 0 {
			id := int32(len(d.names))
			d.names = append(d.names, d.store(b))
			d.slots[i] = tag<<32 | uint64(id+1)
			if 2*len(d.names) > len(d.slots) {
				d.grow()
			}
			return id
		}
		if s>>32 == tag {
			if id := int32(uint32(s)) - 1; equal(d.names[id], b) {
				return id
			}
		}
	}
}

// hash mixes eight bytes at a time with one multiplication, then finishes with the 64-bit
// finaliser of MurmurHash3 (Appleby). It replaced hash/maphash: in wasm, maphash runs the
// runtime's portable fallback, and hashing took a third of the intake's time there; natively the
// two are within noise for the short keys of event logs. The seed is random per dictionary, so a
// crafted file cannot count on collisions; ids do not depend on it.
func hash(seed uint64, b []byte) uint64 {
	h := seed ^ uint64(len(b))*0x9e3779b97f4a7c15
	for len(b) >= 8 {
		h = (h ^ binary.LittleEndian.Uint64(b)) * 0xbf58476d1ce4e5b9
		h = bits.RotateLeft64(h, 31)
		b = b[8:]
	}
	if len(b) > 0 {
		var t uint64
		for i, c := range b {
			t |= uint64(c) << (8 * i)
		}
		h = (h ^ t) * 0x94d049bb133111eb
	}
	h ^= h >> 33
	h *= 0xff51afd7ed558ccd
	h ^= h >> 33
	h *= 0xc4ceb9fe1a85ec53
	h ^= h >> 33
	return h
}

// equal compares eight bytes at a time. In wasm, == on strings calls into the runtime for every
// lookup (7% of the intake there); natively it is no slower than ==.
func equal(s string, b []byte) bool {
	if len(s) != len(b) {
		return false
	}
	p := unsafe.Slice(unsafe.StringData(s), len(s))
	for len(p) >= 8 {
		if binary.LittleEndian.Uint64(p) != binary.LittleEndian.Uint64(b) {
			return false
		}
		p, b = p[8:], b[8:]
	}
	for i := range p {
		if p[i] != b[i] {
			return false
		}
	}
	return true
}

// store copies b into the arena and returns it as a string.
func (d *Dict) store(b []byte) string {
	if len(b) == 0 {
		return ""
	}
	if len(b) > arenaChunk/8 {
		return string(b) // large values get their own allocation
	}
	if cap(d.chunk)-len(d.chunk) < len(b) {
		// Chunks double from 4 KB up to 1 MB, so a dictionary of a few names stays small.
		size := min(arenaChunk, max(4096, 2*cap(d.chunk)))
		d.chunk = make([]byte, 0, size)
	}
	start := len(d.chunk)
	d.chunk = append(d.chunk, b...)
	return unsafe.String(&d.chunk[start], len(b))
}

func (d *Dict) grow() {
	slots := make([]uint64, 2*len(d.slots))
	mask := uint64(len(slots) - 1)
	for id, s := range d.names {
		h := hash(d.seed, unsafe.Slice(unsafe.StringData(s), len(s)))
		i := h & mask
		for slots[i] != 0 {
			i = (i + 1) & mask
		}
		slots[i] = (h>>32)<<32 | uint64(id+1)
	}
	d.slots = slots
}

// Lookup returns the id of s and whether s is known.
func (d *Dict) Lookup(s string) (int32, bool) {
	h := hash(d.seed, unsafe.Slice(unsafe.StringData(s), len(s)))
	tag := h >> 32
	mask := uint64(len(d.slots) - 1)
	for i := h & mask; ; i = (i + 1) & mask {
		sl := d.slots[i]
		if sl == 0 {
			return -1, false
		}
		if sl>>32 == tag {
			id := int32(uint32(sl)) - 1
			if d.names[id] == s {
				return id, true
			}
		}
	}
}

// Name returns the string of id. It panics on an id the dictionary never issued: ids come from
// this dictionary, so a bad one is a programming error, not bad input.
func (d *Dict) Name(id int32) string { return d.names[id] }

// Len is the number of distinct strings.
func (d *Dict) Len() int { return len(d.names) }

// Names returns all strings indexed by id. The slice is shared: callers must not modify it.
func (d *Dict) Names() []string { return d.names }

// size estimates the bytes the dictionary holds: the strings' bytes and headers and the table.
func (d *Dict) size() int {
	n := 8*len(d.slots) + 16*cap(d.names)
	for _, s := range d.names {
		n += len(s)
	}
	return n
}
