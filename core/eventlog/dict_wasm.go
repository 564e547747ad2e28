package eventlog

import (
	"fmt"
	"unsafe"
)

// dict_wasm.s reads slots as 24 bytes (meta, k0, k1) and names as 16-byte string headers.
const (
	_ = -uint(unsafe.Sizeof(slot{}) ^ 24)
	_ = -uint(unsafe.Sizeof("") ^ 16)
)

// hashBatch sets out[i] to hash(seed, key i) for the packed keys of InternBatch. It returns -1,
// or the index of the first key whose end is before its start or past the text, having hashed
// the keys before it.
//
//go:noescape
func hashBatch(seed uint64, text []byte, ends []int, out []uint64) int

// probeBatch looks the packed keys from index from on up in the table, key i having hash
// hashes[i], and sets out[i] to the id of each key it finds. It stops at the first key that is not
// in the table and returns its index (len(ends) when it found them all); that key is for the
// caller to add.
//
//go:noescape
func probeBatch(slots []slot, text []byte, ends []int, hashes []uint64, names []string, out []int32, from int) int

// internBatch hashes and finds the keys in hand-written WebAssembly (dict_wasm.s) and adds the
// new ones in Go.
func (d *Dict) internBatch(text []byte, ends []int, hashes []uint64, out []int32) {
	if i := hashBatch(d.seed, text, ends, hashes); i >= 0 {
		panic(fmt.Sprintf("eventlog: InternBatch: key %d ends at %d, before the key before it or past the %d bytes of text", i, ends[i], len(text)))
	}
	for i := probeBatch(d.slots, text, ends, hashes, d.names, out, 0); i < len(ends); i = probeBatch(d.slots, text, ends, hashes, d.names, out, i+1) {
		out[i] = d.intern(text[keyStart(ends, i):ends[i]], hashes[i], true)
	}
}

// keyStart is where packed key i starts.
func keyStart(ends []int, i int) int {
	if i == 0 {
		return 0
	}
	return ends[i-1]
}
