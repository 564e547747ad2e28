package eventlog

import (
	"fmt"
	"math/rand/v2"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestDictAgainstMap checks the table against Go's map as the reference: ids in order of first
// arrival, the same id for the same string, Lookup, Name and InternBatch agreeing. The keys are
// made to strain the slot layout: every length from 0 to 40 and some past 255 (whose length the
// slot no longer holds), keys that differ only after their 16th byte, keys that differ only by
// trailing zero bytes ("a" and "a\x00"), and enough of them to grow the table many times.
func TestDictAgainstMap(t *testing.T) {
	r := rand.New(rand.NewPCG(7, 8))
	var keys []string
	for n := 0; n <= 40; n++ {
		for range 20 {
			b := make([]byte, n)
			for i := range b {
				b[i] = "ab\x00"[r.IntN(3)]
			}
			keys = append(keys, string(b))
		}
	}
	long := strings.Repeat("x", 300)
	for i := range 50 {
		keys = append(keys, long+fmt.Sprint(i), fmt.Sprint(i)+long, "0123456789abcdef"+fmt.Sprint(i))
	}
	for i := range 20000 {
		keys = append(keys, fmt.Sprintf("WR-%07d", i))
	}
	r.Shuffle(len(keys), func(i, j int) { keys[i], keys[j] = keys[j], keys[i] })
	keys = append(keys, keys[:5000]...) // seen again

	d := NewDict()
	ref := map[string]int32{}
	for _, k := range keys {
		want, ok := ref[k]
		if !ok {
			want = int32(len(ref))
			ref[k] = want
		}
		require.Equal(t, want, d.Intern(k), "%q", k)
	}
	assert.Equal(t, len(ref), d.Len())
	for k, id := range ref {
		got, ok := d.Lookup(k)
		assert.True(t, ok, "%q", k)
		assert.Equal(t, id, got, "%q", k)
		assert.Equal(t, k, d.Name(id))
	}
	// InternBatch, in batches of every size from 1 to 64, some holding a key twice, must give the
	// same ids; in wasm it is hand-written WebAssembly (dict_wasm.s).
	batched := NewDict()
	for i, size := 0, 1; i < len(keys); i, size = i+size, size%64+1 {
		batch := keys[i:min(i+size, len(keys))]
		batch = append(batch[:len(batch):len(batch)], batch[len(batch)/2])
		text, ends := pack(batch)
		hashes, ids := make([]uint64, len(batch)), make([]int32, len(batch))
		batched.InternBatch(text, ends, hashes, ids)
		for j, k := range batch {
			require.Equal(t, ref[k], ids[j], "%q", k)
		}
	}
	assert.Equal(t, len(ref), batched.Len())
	for _, k := range []string{"never", "a\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00", long + "x"} {
		if _, seen := ref[k]; !seen {
			_, ok := d.Lookup(k)
			assert.False(t, ok, "%q", k)
		}
	}
}

// BenchmarkInternBatch interns 100k distinct case ids of 10 bytes, each five times, in random
// order: the case-id table of a 1M-event log whose rows come in random order.
func BenchmarkInternBatch(b *testing.B) {
	r := rand.New(rand.NewPCG(1, 2))
	var keys []string
	for i := range 100_000 {
		for range 5 {
			keys = append(keys, fmt.Sprintf("WR-%07d", i))
		}
	}
	r.Shuffle(len(keys), func(i, j int) { keys[i], keys[j] = keys[j], keys[i] })
	type batch struct {
		text []byte
		ends []int
	}
	var batches []batch
	for i := 0; i < len(keys); i += 256 {
		text, ends := pack(keys[i:min(i+256, len(keys))])
		batches = append(batches, batch{text, ends})
	}
	hashes := make([]uint64, 256)
	ids := make([]int32, 256)
	for b.Loop() {
		d := NewDict()
		for _, p := range batches {
			d.InternBatch(p.text, p.ends, hashes, ids)
		}
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*len(keys)), "ns/key")
}

// pack lays keys out as InternBatch takes them.
func pack(keys []string) (text []byte, ends []int) {
	for _, k := range keys {
		text = append(text, k...)
		ends = append(ends, len(text))
	}
	return text, ends
}

// TestInternBatchChecksEnds checks that a batch whose ends go backwards or past the text is
// refused with a panic, not read outside the text.
func TestInternBatchChecksEnds(t *testing.T) {
	for _, ends := range [][]int{{2, 1}, {3, 9}, {-1}} {
		assert.Panics(t, func() {
			NewDict().InternBatch([]byte("abc"), ends, make([]uint64, len(ends)), make([]int32, len(ends)))
		}, "%v", ends)
	}
}
