package intake

import (
	"bufio"
	"io"
	"unicode/utf16"
	"unicode/utf8"
)

type encoding uint8

const (
	encUTF8 encoding = iota
	encUTF16LE
	encUTF16BE
	encCP1252
)

// sniffEncoding tells UTF-16 by its byte-order mark, and UTF-8 from Windows-1252 by validity: a
// Windows-1252 text with accented letters is almost never valid UTF-8 (common practice).
func sniffEncoding(head []byte) encoding {
	if len(head) >= 2 && head[0] == 0xff && head[1] == 0xfe {
		return encUTF16LE
	}
	if len(head) >= 2 && head[0] == 0xfe && head[1] == 0xff {
		return encUTF16BE
	}
	// A multi-byte rune may be cut at the end of the head: ignore up to 3 trailing bytes.
	h := head
	for k := 0; k < 3 && len(h) > 0 && !utf8.Valid(h); k++ {
		h = h[:len(h)-1]
	}
	if utf8.Valid(h) {
		return encUTF8
	}
	return encCP1252
}

// cp1252 maps bytes 0x80-0x9f of Windows-1252 to Unicode (the WHATWG Encoding Standard's
// index-windows-1252); bytes 0xa0-0xff are the same code points as Latin-1.
var cp1252 = [32]rune{
	0x20ac, 0x81, 0x201a, 0x0192, 0x201e, 0x2026, 0x2020, 0x2021, 0x02c6, 0x2030, 0x0160, 0x2039, 0x0152, 0x8d, 0x017d, 0x8f,
	0x90, 0x2018, 0x2019, 0x201c, 0x201d, 0x2022, 0x2013, 0x2014, 0x02dc, 0x2122, 0x0161, 0x203a, 0x0153, 0x9d, 0x017e, 0x0178,
}

type cp1252Reader struct {
	r   *bufio.Reader
	out []byte
}

func newCP1252Reader(r io.Reader) io.Reader { return &cp1252Reader{r: bufio.NewReader(r)} }

func (c *cp1252Reader) Read(p []byte) (int, error) {
	for len(c.out) == 0 {
		var in [16 << 10]byte
		n, err := c.r.Read(in[:])
		for _, b := range in[:n] {
			switch {
			case b < 0x80:
				c.out = append(c.out, b)
			case b < 0xa0:
				c.out = utf8.AppendRune(c.out, cp1252[b-0x80])
			default:
				c.out = utf8.AppendRune(c.out, rune(b))
			}
		}
		if err != nil && len(c.out) == 0 {
			return 0, err
		}
	}
	n := copy(p, c.out)
	c.out = c.out[n:]
	return n, nil
}

type utf16Reader struct {
	r       *bufio.Reader
	bigEnd  bool
	out     []byte
	started bool
	pending []uint16
}

func newUTF16Reader(r io.Reader, bigEndian bool) io.Reader {
	return &utf16Reader{r: bufio.NewReader(r), bigEnd: bigEndian}
}

func (u *utf16Reader) Read(p []byte) (int, error) {
	for len(u.out) == 0 {
		var in [16 << 10]byte
		n, err := io.ReadFull(u.r, in[:])
		if n%2 == 1 {
			if b, e := u.r.ReadByte(); e == nil {
				in[n] = b
				n++
			} else {
				n-- // a lone last byte is not a code unit
			}
		}
		units := u.pending
		for i := 0; i+1 < n; i += 2 {
			var v uint16
			if u.bigEnd {
				v = uint16(in[i])<<8 | uint16(in[i+1])
			} else {
				v = uint16(in[i+1])<<8 | uint16(in[i])
			}
			units = append(units, v)
		}
		if !u.started && len(units) > 0 {
			units = units[1:] // the byte-order mark
			u.started = true
		}
		// keep a high surrogate at the end for the next read
		u.pending = nil
		if k := len(units); k > 0 && units[k-1] >= 0xd800 && units[k-1] < 0xdc00 && err == nil {
			u.pending = []uint16{units[k-1]}
			units = units[:k-1]
		}
		for _, r := range utf16.Decode(units) {
			u.out = utf8.AppendRune(u.out, r)
		}
		if err != nil && len(u.out) == 0 {
			if err == io.ErrUnexpectedEOF {
				err = io.EOF
			}
			return 0, err
		}
	}
	n := copy(p, u.out)
	u.out = u.out[n:]
	return n, nil
}
