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
// in the large case-id table, and in rows of random order nearly every lookup there misses the
// processor's caches). A slot holds the key's length, part of its hash and its id, and the key's
// first 16 bytes, so a lookup of a key of up to 16 bytes (most case ids, activity names are
// often longer) touches one slot and nothing else; a longer key is compared in the arena only
// when its first 16 bytes agree. A Go map costs a random access to the key's string header and
// another to its bytes. Measured on the intake benchmark (1M events, rows in random order): see
// DEVELOPERS.md.
//
// Strings live back to back in arena chunks that are never moved or written again, and Name
// returns strings that point into them (so a Dict's strings stay valid as long as any is used).
type Dict struct {
	seed  uint64
	slots []slot
	names []string
	chunk []byte // the arena chunk being filled
}

// slot is one entry of the table. meta is 0 for an empty slot, else the hash's top 24 bits, the
// key's length (255 for 255 and more) and id+1: tag<<40 | length<<32 | (id+1).
type slot struct {
	meta   uint64
	k0, k1 uint64 // the key's first 16 bytes, little-endian, zero beyond its end
}

const arenaChunk = 1 << 20

// NewDict returns an empty dictionary.
func NewDict() *Dict {
	return &Dict{seed: rand.Uint64() | 1, slots: make([]slot, 16)}
}

// Intern returns the id of s, adding s if it is new.
func (d *Dict) Intern(s string) int32 {
	return d.InternBytes(unsafe.Slice(unsafe.StringData(s), len(s)))
}

// InternBytes is Intern for a byte slice; b is copied only when it is new, so b may be a
// reader's reusable buffer.
func (d *Dict) InternBytes(b []byte) int32 {
	return d.intern(b, hash(d.seed, b), true)
}

// InternBatch interns a batch of packed keys, key i being text[ends[i-1]:ends[i]] (the first from
// 0), into out[i], in order, exactly as InternBytes one by one would; hashes is scratch. The keys
// come packed, as a reader gathers a column's values, so that handing them over builds no slice
// per key. It panics if an end lies before the one before it or past the text.
//
// It exists for speed on large tables: it first hashes every key, then probes, so that the
// probes of different keys (each a likely cache miss in a table of 100k cases) are independent
// instructions close together, which the processor overlaps; interleaved with the rest of a
// row's work they wait one after the other. In wasm both passes are hand-written WebAssembly
// (dict_wasm.s): Go's wasm code sends every turn of a loop through a dispatch at the head of its
// function, and the two passes are nearly all loop.
func (d *Dict) InternBatch(text []byte, ends []int, hashes []uint64, out []int32) {
	d.internBatch(text, ends, hashes[:len(ends)], out[:len(ends)])
}

// metaOf is a slot's meta without the id, for the key b of hash h.
func metaOf(h uint64, b []byte) uint64 {
	return (h>>40)<<40 | uint64(min(len(b), 255))<<32
}

const idMask = 1<<32 - 1

// intern finds b, whose hash is h, by linear probing, and adds it if add is set; else it
// returns -1 for a key it does not hold.
//
// A slot holds the key's first 16 bytes as two little-endian words, zero beyond its end. They
// are loaded in overlapping pieces, not byte by byte: in Go's wasm code every turn of a loop is a
// jump through the function's dispatch, and this code runs for every activity and resource read.
func (d *Dict) intern(b []byte, h uint64, add bool) int32 {
	want := metaOf(h, b)
	var k0, k1 uint64
	switch n := len(b); {
	case n >= 16:
		k0, k1 = binary.LittleEndian.Uint64(b), binary.LittleEndian.Uint64(b[8:])
	case n > 8:
		// the last eight bytes, shifted so that the ones before b[8] fall off
		k0, k1 = binary.LittleEndian.Uint64(b), binary.LittleEndian.Uint64(b[n-8:])>>(8*(16-n))
	case n == 8:
		k0 = binary.LittleEndian.Uint64(b)
	case n >= 4:
		k0 = uint64(binary.LittleEndian.Uint32(b)) | uint64(binary.LittleEndian.Uint32(b[n-4:]))<<(8*(n-4))
	case n > 0:
		k0 = uint64(b[0]) | uint64(b[n>>1])<<(8*(n>>1)) | uint64(b[n-1])<<(8*(n-1))
	}
	mask := uint64(len(d.slots) - 1)
	for i := h & mask; ; i = (i + 1) & mask {
		s := &d.slots[i]
		if s.meta == 0 {
			if !add {
				return -1
			}
			id := int32(len(d.names))
			d.names = append(d.names, d.store(b))
			*s = slot{meta: want | uint64(id+1), k0: k0, k1: k1}
			// grow at a load of 0.7: slots are 24 bytes, and a table of unique values (an
			// event id column) should not take three times its entries in them
			if 10*len(d.names) > 7*len(d.slots) {
				d.grow()
			}
			return id
		}
		if s.meta&^idMask == want && s.k0 == k0 && s.k1 == k1 {
			id := int32(uint32(s.meta)) - 1
			if len(b) <= 16 || equal(d.names[id], b) {
				return id
			}
		}
	}
}

// hash mixes eight bytes at a time with one multiplication, then finishes with the 64-bit
// finaliser of MurmurHash3 (Appleby); dict_wasm.s computes the same. It replaced hash/maphash:
// in wasm, maphash runs the runtime's portable fallback, and hashing took a third of the intake's
// time there; natively the two are within noise for the short keys of event logs. The seed is
// random per dictionary, so a crafted file cannot count on collisions; ids do not depend on it.
func hash(seed uint64, b []byte) uint64 {
	h := seed ^ uint64(len(b))*0x9e3779b97f4a7c15
	for len(b) >= 8 {
		h = (h ^ binary.LittleEndian.Uint64(b)) * 0xbf58476d1ce4e5b9
		h = bits.RotateLeft64(h, 31)
		b = b[8:]
	}
	// the last bytes, loaded as intern loads a short key
	if n := len(b); n >= 4 {
		t := uint64(binary.LittleEndian.Uint32(b)) | uint64(binary.LittleEndian.Uint32(b[n-4:]))<<(8*(n-4))
		h = (h ^ t) * 0x94d049bb133111eb
	} else if n > 0 {
		t := uint64(b[0]) | uint64(b[n>>1])<<(8*(n>>1)) | uint64(b[n-1])<<(8*(n-1))
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
	slots := make([]slot, 2*len(d.slots))
	mask := uint64(len(slots) - 1)
	for _, s := range d.slots {
		if s.meta == 0 {
			continue
		}
		id := int32(uint32(s.meta)) - 1
		name := d.names[id]
		i := hash(d.seed, unsafe.Slice(unsafe.StringData(name), len(name))) & mask
		for slots[i].meta != 0 {
			i = (i + 1) & mask
		}
		slots[i] = s
	}
	d.slots = slots
}

// Lookup returns the id of s and whether s is known.
func (d *Dict) Lookup(s string) (int32, bool) {
	b := unsafe.Slice(unsafe.StringData(s), len(s))
	id := d.intern(b, hash(d.seed, b), false)
	return id, id >= 0
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
	n := int(unsafe.Sizeof(slot{}))*len(d.slots) + 16*cap(d.names)
	for _, s := range d.names {
		n += len(s)
	}
	return n
}
