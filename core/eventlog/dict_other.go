//go:build !wasm

package eventlog

// internBatch is InternBatch in Go: hash every key, then find or add each.
func (d *Dict) internBatch(text []byte, ends []int, hashes []uint64, out []int32) {
	start := 0
	for i, e := range ends {
		hashes[i] = hash(d.seed, text[start:e])
		start = e
	}
	start = 0
	for i, e := range ends {
		out[i] = d.intern(text[start:e], hashes[i], true)
		start = e
	}
}
