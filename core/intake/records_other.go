//go:build !wasm

package intake

func (rr *records) plain(data []byte) (int, scan) { return rr.plainSWAR(data) }
