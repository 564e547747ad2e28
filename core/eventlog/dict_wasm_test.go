package eventlog

import (
	"math/rand/v2"
	"testing"
)

// TestHashBatch checks the hand-written hash (dict_wasm.s) against hash for every length from 0
// to 40, on random bytes. The table places keys by hash, so the two must agree bit for bit:
// grow and Lookup use hash.
func TestHashBatch(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 6))
	var keys []string
	for n := 0; n <= 40; n++ {
		for range 50 {
			b := make([]byte, n)
			for i := range b {
				b[i] = byte(r.Uint32())
			}
			keys = append(keys, string(b))
		}
	}
	text, ends := pack(keys)
	out := make([]uint64, len(keys))
	for _, seed := range []uint64{1, 0x9e3779b97f4a7c15, r.Uint64() | 1} {
		if i := hashBatch(seed, text, ends, out); i >= 0 {
			t.Fatalf("key %d refused", i)
		}
		for i, k := range keys {
			if want := hash(seed, []byte(k)); out[i] != want {
				t.Fatalf("seed %x, %d bytes %x: %x, want %x", seed, len(k), k, out[i], want)
			}
		}
	}
}

// TestProbeBatchFindsKnown checks that the hand-written probe finds every key the table holds,
// with its id, without falling back to Go: a probe that computed a key's slot contents unlike
// intern would still give right ids through the fallback, only slowly.
func TestProbeBatchFindsKnown(t *testing.T) {
	r := rand.New(rand.NewPCG(9, 10))
	d := NewDict()
	var keys []string
	for n := 0; n <= 300; n++ {
		for range 5 {
			b := make([]byte, n)
			for i := range b {
				b[i] = "xy"[r.IntN(2)]
			}
			keys = append(keys, string(b))
			d.InternBytes(b)
		}
	}
	text, ends := pack(keys)
	hashes, out := make([]uint64, len(keys)), make([]int32, len(keys))
	hashBatch(d.seed, text, ends, hashes)
	if i := probeBatch(d.slots, text, ends, hashes, d.names, out, 0); i != len(keys) {
		t.Fatalf("the probe stopped at key %d (%d bytes), which the table holds", i, len(keys[i]))
	}
	for i, k := range keys {
		if want, _ := d.Lookup(k); out[i] != want {
			t.Fatalf("key %d: id %d, want %d", i, out[i], want)
		}
	}
}
