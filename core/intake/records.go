package intake

import (
	"bytes"
	"context"
	"encoding/binary"
	"io"
	"math/bits"
)

// records splits CSV text (RFC 4180) into records of fields, without allocating per record.
//
// Fields of a line that holds no quote are slices of the read buffer, found eight bytes at a time
// (plainSWAR natively, its hand-written WebAssembly twin in wasm: records_wasm.go); a line with a
// quote goes through a state machine that unescapes into a scratch buffer. The slices are valid
// until the next call, and in wasm they must not be used after it (records_wasm.go says why).
//
// Beyond RFC 4180 it accepts LF as well as CRLF line ends, a UTF-8 byte-order mark, and a quote
// inside an unquoted field (kept as written: exports write 28" wheels). It refuses a quoted field
// followed by anything but a separator or a line end, and a quoted field left open at the end.
type records struct {
	r     io.Reader
	ctx   context.Context
	comma byte
	buf   []byte
	pos   int // start of the unread part of buf
	end   int // end of the data in buf
	eof   bool
	err   error

	line    int      // 1-based line where the next record starts
	read    int64    // bytes consumed from r
	fields  [][]byte // the fields of a record without quotes
	qfields [][]byte // the fields of a record with quotes (slices of scratch)
	hdrs    []uint64 // in wasm, the splitter's fields (records_wasm.go)
	scratch []byte
	bounds  []int
	recLine int // line where the current record started

	onRefill func(read int64)
}

// newRecords reads r with a buffer of size bytes to start with (it grows for longer records).
func newRecords(ctx context.Context, r io.Reader, comma byte, size int) *records {
	if size < 16 {
		size = 16
	}
	return &records{r: r, ctx: ctx, comma: comma, buf: make([]byte, size), line: 1}
}

// fill moves the unread part to the front and reads more. It reports false at the end of input.
func (rr *records) fill() bool {
	if rr.eof {
		return false
	}
	if rr.ctx != nil {
		if err := rr.ctx.Err(); err != nil {
			rr.err = err
			return false
		}
	}
	if rr.pos > 0 {
		copy(rr.buf, rr.buf[rr.pos:rr.end])
		rr.end -= rr.pos
		rr.pos = 0
	}
	if rr.end == len(rr.buf) {
		nb := make([]byte, 2*len(rr.buf))
		copy(nb, rr.buf[:rr.end])
		rr.buf = nb
	}
	for {
		n, err := rr.r.Read(rr.buf[rr.end:])
		rr.end += n
		rr.read += int64(n)
		if err == io.EOF {
			rr.eof = true
			break
		}
		if err != nil {
			rr.err = err
			return false
		}
		if n > 0 {
			break
		}
	}
	if rr.onRefill != nil {
		rr.onRefill(rr.read)
	}
	return true
}

// skipBOM drops a UTF-8 byte-order mark at the very start.
func (rr *records) skipBOM() {
	for rr.end-rr.pos < 3 && rr.fill() {
	}
	if bytes.HasPrefix(rr.buf[rr.pos:rr.end], []byte("\xef\xbb\xbf")) {
		rr.pos += 3
	}
}

// next returns the next record's fields, or nil at the end (then rr.err says whether it was a
// failure). Empty lines are passed over, as encoding/csv does.
func (rr *records) next() ([][]byte, error) {
	for {
		if rr.pos >= rr.end && !rr.fill() {
			return nil, rr.err
		}
		data := rr.buf[rr.pos:rr.end]
		n, st := rr.plain(data)
		switch st {
		case needMore:
			if rr.fill() {
				continue
			}
			if rr.err != nil {
				return nil, rr.err
			}
			continue // now at the end of input: plain takes the rest as the last record
		case complete:
			rr.pos += n
			rr.recLine = rr.line
			rr.line++
			if len(rr.fields) == 1 && len(rr.fields[0]) == 0 {
				if rr.pos >= rr.end && rr.eof {
					return nil, nil
				}
				continue // an empty line
			}
			return rr.fields, nil
		}
		rr.recLine = rr.line
		fields, n, lines, err := rr.quoted(data)
		if err != nil {
			return nil, err
		}
		if n < 0 { // the record runs past the buffer: read more and try again
			if !rr.fill() && rr.err != nil {
				return nil, rr.err
			}
			continue
		}
		rr.pos += n
		rr.line += lines
		return fields, nil
	}
}

type scan uint8

const (
	complete scan = iota // a record without quotes, ending in a line end or the input's end
	needMore             // no line end in the buffer yet
	hasQuote             // the record has a quote: the quoted path reads it
)

// Byte masks for finding bytes eight at a time in a uint64 ("SWAR"): Go's wasm target has no
// SIMD and bytes.IndexByte there is a plain loop, so one pass over eight bytes per step, looking
// for separator, quote and line end together, is what keeps the browser's intake fast; natively
// it also beats one IndexByte call per field on short fields.
const (
	ones  = 0x0101010101010101
	highs = 0x8080808080808080
	lows  = 0x7f7f7f7f7f7f7f7f
)

// zeroBytes has the high bit set in exactly the bytes of v that are zero (no false positives:
// the additions cannot carry from one byte into the next).
func zeroBytes(v uint64) uint64 {
	return ^((v&lows + lows) | v | lows)
}

// plainSWAR splits one record at the start of data if it has no quote, appending its fields to
// rr.fields. It returns the bytes consumed (with the line end). It is plain natively; the wasm
// build's plain (records_wasm.go) gives the same fields and is tested against it.
func (rr *records) plainSWAR(data []byte) (int, scan) {
	rr.fields = rr.fields[:0]
	comma := rr.comma
	cm, nl, qu := uint64(comma)*ones, uint64('\n')*ones, uint64('"')*ones
	start, i := 0, 0
	for ; i+8 <= len(data); i += 8 {
		w := binary.LittleEndian.Uint64(data[i:])
		m := zeroBytes(w^cm) | zeroBytes(w^nl) | zeroBytes(w^qu)
		for m != 0 {
			k := i + bits.TrailingZeros64(m)>>3
			m &= m - 1
			switch data[k] {
			case '\n':
				rr.fields = append(rr.fields, trimCR(data[start:k]))
				return k + 1, complete
			case '"':
				return 0, hasQuote
			default:
				rr.fields = append(rr.fields, data[start:k])
				start = k + 1
			}
		}
	}
	for ; i < len(data); i++ {
		switch data[i] {
		case '\n':
			rr.fields = append(rr.fields, trimCR(data[start:i]))
			return i + 1, complete
		case '"':
			return 0, hasQuote
		case comma:
			rr.fields = append(rr.fields, data[start:i])
			start = i + 1
		}
	}
	if !rr.eof {
		return 0, needMore
	}
	rr.fields = append(rr.fields, trimCR(data[start:]))
	return len(data), complete
}

func trimCR(b []byte) []byte {
	if len(b) > 0 && b[len(b)-1] == '\r' {
		return b[:len(b)-1]
	}
	return b
}

// quoted parses one record that contains a quote. It returns n = -1 when the record is not
// complete in data and more input may follow; lines is how many line ends the record consumed.
func (rr *records) quoted(data []byte) (fields [][]byte, n, lines int, err error) {
	rr.scratch = rr.scratch[:0]
	rr.bounds = rr.bounds[:0]
	i, lineStart := 0, 0
	for {
		fieldStart := len(rr.scratch)
		if i < len(data) && data[i] == '"' {
			openLine, openCol := rr.recLine+lines, i-lineStart+1
			i++
			for {
				j := bytes.IndexByte(data[i:], '"')
				if j < 0 {
					if !rr.eof {
						return nil, -1, 0, nil
					}
					return nil, 0, 0, &SyntaxError{Line: openLine, Column: openCol, Err: ErrUnclosed}
				}
				seg := data[i : i+j]
				if k := bytes.Count(seg, []byte{'\n'}); k > 0 {
					lines += k
					lineStart = i + bytes.LastIndexByte(seg, '\n') + 1
				}
				rr.scratch = append(rr.scratch, seg...)
				i += j + 1
				if i < len(data) && data[i] == '"' { // "" is an escaped quote
					rr.scratch = append(rr.scratch, '"')
					i++
					continue
				}
				if i >= len(data) && !rr.eof {
					return nil, -1, 0, nil
				}
				break
			}
			if i < len(data) && data[i] == '\r' && (i+1 == len(data) || data[i+1] == '\n') {
				i++
			}
			if i < len(data) && data[i] != rr.comma && data[i] != '\n' {
				return nil, 0, 0, &SyntaxError{Line: rr.recLine + lines, Column: i - lineStart + 1, Err: ErrQuote}
			}
		} else {
			begin := i
			for i < len(data) && data[i] != rr.comma && data[i] != '\n' {
				i++
			}
			if i >= len(data) && !rr.eof {
				return nil, -1, 0, nil
			}
			seg := data[begin:i]
			if len(seg) > 0 && seg[len(seg)-1] == '\r' && (i >= len(data) || data[i] == '\n') {
				seg = seg[:len(seg)-1]
			}
			rr.scratch = append(rr.scratch, seg...)
		}
		rr.bounds = append(rr.bounds, fieldStart, len(rr.scratch))
		if i >= len(data) {
			break
		}
		if data[i] == '\n' {
			i++
			lines++
			break
		}
		i++ // the separator; a separator at the very end leaves one empty field
		if i >= len(data) {
			if !rr.eof {
				return nil, -1, 0, nil
			}
			rr.bounds = append(rr.bounds, len(rr.scratch), len(rr.scratch))
			break
		}
	}
	rr.qfields = rr.qfields[:0]
	for k := 0; k < len(rr.bounds); k += 2 {
		rr.qfields = append(rr.qfields, rr.scratch[rr.bounds[k]:rr.bounds[k+1]])
	}
	return rr.qfields, i, lines, nil
}
