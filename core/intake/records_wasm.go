package intake

import "unsafe"

// splitLine is plainSWAR's scan in WebAssembly written by hand (split_wasm.s): it finds the
// fields of one record without quotes at the start of data and writes them into hdrs as slice
// headers of data (address, length, capacity; at most len(hdrs)/3 of them). It returns the bytes
// the record takes with its line end, the number of fields and a scan state, or tooMany when
// hdrs is full.
//
//go:noescape
func splitLine(data []byte, comma byte, eof bool, hdrs []uint64) (n, nf, st int)

// tooMany is splitLine's answer when a record has more fields than hdrs holds.
const tooMany = 3

// split_wasm.s answers with these values.
const (
	_ = -uint(complete)
	_ = -uint(needMore ^ 1)
	_ = -uint(hasQuote ^ 2)
)

// plain is plainSWAR in hand-written WebAssembly. Go's wasm code sends every turn of a loop
// through a dispatch at the head of its function; the hand-written loops are plain wasm loops,
// which the browser compiles to tight machine loops (measured in DEVELOPERS.md).
//
// rr.fields is then a view of hdrs as [][]byte, with no copy. That is safe with Go's collector,
// which never moves memory: hdrs holds no pointers as far as the collector knows, so no write to
// it needs a barrier, and every address in it points into data, a part of rr.buf, which rr keeps
// alive until the next call of next, the fields' documented lifetime. A field copied out of the
// view (a []byte on the stack) is an ordinary slice of rr.buf. No empty field points past the end
// of data (split_wasm.s gives it data's own address).
func (rr *records) plain(data []byte) (int, scan) {
	for {
		n, nf, st := splitLine(data, rr.comma, rr.eof, rr.hdrs)
		switch {
		case st == tooMany:
			rr.hdrs = make([]uint64, 2*len(rr.hdrs)+3*32)
			continue
		case scan(st) != complete:
			return 0, scan(st)
		}
		rr.fields = unsafe.Slice((*[]byte)(unsafe.Pointer(unsafe.SliceData(rr.hdrs))), nf)
		return n, complete
	}
}
