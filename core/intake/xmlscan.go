package intake

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"strconv"
	"unicode/utf8"
)

// xmlScanner is a pull tokenizer for the part of XML that XES files use: elements with
// attributes, comments, processing instructions, CDATA and a DOCTYPE (the last three passed
// over), character references and the five predefined entities. Text between elements is passed
// over: XES keeps every value in attributes. It checks that end tags match and that attributes
// are well formed, and reports line and column (column in bytes from 1). Where encoding/xml is
// lenient (no space between two attributes, an attribute given twice: the first counts) so is it.
//
// It exists because encoding/xml allocates for every token: on a generated 75 MB XES log it read
// 40 MB/s with 880 MB allocated per read; see BenchmarkIntakeXES for this scanner's figures. The
// differential fuzz test FuzzXMLScanner checks it against encoding/xml. Like encoding/xml it keeps
// line breaks inside attribute values (normalised to LF) rather than turning them into spaces as
// XML 1.0 section 3.3.3 asks; writers that mean a line break escape it, as ours does.
type xmlScanner struct {
	r    io.Reader
	ctx  context.Context
	buf  []byte
	pos  int
	end  int
	eof  bool
	read int64

	line      int // line of buf[pos]
	lineStart int // index in buf where that line starts (may be negative after a refill)

	stack   [][]byte // names of open elements (copies)
	pending bool     // a self-closing element still owes its end token
	tok     xmlToken
	scratch []byte
	started bool
}

type xmlKind uint8

const (
	xmlStart xmlKind = iota + 1
	xmlEnd
	xmlEOF
)

type xmlAttr struct {
	name, value []byte
}

// xmlToken is valid until the next call of next.
type xmlToken struct {
	kind      xmlKind
	name      []byte // local name, without a namespace prefix
	attrs     []xmlAttr
	line, col int
}

func newXMLScanner(ctx context.Context, r io.Reader) *xmlScanner {
	return &xmlScanner{r: r, ctx: ctx, buf: make([]byte, 256<<10), line: 1}
}

var errNeedMore = errors.New("need more")

func (s *xmlScanner) fill() error {
	if s.eof {
		return io.EOF
	}
	if err := s.ctx.Err(); err != nil {
		return err
	}
	if s.pos > 0 {
		copy(s.buf, s.buf[s.pos:s.end])
		s.end -= s.pos
		s.lineStart -= s.pos
		s.pos = 0
	}
	if s.end == len(s.buf) {
		nb := make([]byte, 2*len(s.buf))
		copy(nb, s.buf[:s.end])
		s.buf = nb
	}
	for {
		n, err := s.r.Read(s.buf[s.end:])
		s.end += n
		s.read += int64(n)
		if err == io.EOF {
			s.eof = true
			return nil
		}
		if err != nil {
			return err
		}
		if n > 0 {
			return nil
		}
	}
}

func (s *xmlScanner) errAt(i int, format string, args ...any) error {
	line, col := s.position(i)
	return &SyntaxError{Line: line, Column: col, Err: fmt.Errorf("%w: %s", ErrXES, fmt.Sprintf(format, args...))}
}

// position returns the line and column of buf[i] (i >= pos).
func (s *xmlScanner) position(i int) (int, int) {
	seg := s.buf[s.pos:i]
	line, start := s.line, s.lineStart
	if k := bytes.Count(seg, []byte{'\n'}); k > 0 {
		line += k
		start = s.pos + bytes.LastIndexByte(seg, '\n') + 1
	}
	return line, i - start + 1
}

// advance moves pos to i, keeping the line count.
func (s *xmlScanner) advance(i int) {
	seg := s.buf[s.pos:i]
	if k := bytes.Count(seg, []byte{'\n'}); k > 0 {
		s.line += k
		s.lineStart = s.pos + bytes.LastIndexByte(seg, '\n') + 1
	}
	s.pos = i
}

// next returns the next start or end tag, or xmlEOF at the end of a well-formed document.
func (s *xmlScanner) next() (*xmlToken, error) {
	if s.pending {
		s.pending = false
		s.tok.kind = xmlEnd
		s.tok.attrs = s.tok.attrs[:0]
		s.stack = s.stack[:len(s.stack)-1]
		return &s.tok, nil
	}
	for {
		i := bytes.IndexByte(s.buf[s.pos:s.end], '<')
		if i < 0 {
			if s.eof {
				if k := len(bytes.TrimSpace(s.buf[s.pos:s.end])); k > 0 && !s.started {
					return nil, s.errAt(s.pos, "no XML element")
				}
				s.advance(s.end)
				if len(s.stack) > 0 {
					return nil, s.errAt(s.end, "the file ends inside <%s>", s.stack[len(s.stack)-1])
				}
				if !s.started {
					return nil, s.errAt(s.end, "no XML element")
				}
				s.tok = xmlToken{kind: xmlEOF}
				return &s.tok, nil
			}
			s.advance(s.end)
			if err := s.fill(); err != nil {
				return nil, err
			}
			continue
		}
		s.advance(s.pos + i)
		tok, n, err := s.markup(s.buf[s.pos:s.end])
		if err == errNeedMore {
			if s.eof {
				return nil, s.errAt(s.pos, "the file ends inside markup")
			}
			if err := s.fill(); err != nil {
				return nil, err
			}
			continue
		}
		if err != nil {
			return nil, err
		}
		s.advance(s.pos + n)
		if tok != nil {
			return tok, nil
		}
	}
}

// markup reads the markup at the start of data ('<'). It returns the token (nil for markup that
// yields none) and the bytes it takes, or errNeedMore when data ends first.
func (s *xmlScanner) markup(data []byte) (*xmlToken, int, error) {
	if len(data) < 2 {
		return nil, 0, errNeedMore
	}
	switch data[1] {
	case '?':
		end := bytes.Index(data, []byte("?>"))
		if end < 0 {
			return nil, 0, errNeedMore
		}
		return nil, end + 2, nil
	case '!':
		switch {
		case bytes.HasPrefix(data, []byte("<!--")):
			end := bytes.Index(data[4:], []byte("-->"))
			if end < 0 {
				return nil, 0, errNeedMore
			}
			return nil, 4 + end + 3, nil
		case bytes.HasPrefix(data, []byte("<![CDATA[")):
			if len(s.stack) == 0 {
				return nil, 0, s.errAt(s.pos, "CDATA outside the root element")
			}
			end := bytes.Index(data, []byte("]]>"))
			if end < 0 {
				return nil, 0, errNeedMore
			}
			return nil, end + 3, nil
		case len(data) < 9:
			return nil, 0, errNeedMore
		case bytes.HasPrefix(data, []byte("<!DOCTYPE")):
			depth := 0
			for i := 9; i < len(data); i++ {
				switch data[i] {
				case '[':
					depth++
				case ']':
					depth--
				case '>':
					if depth <= 0 {
						return nil, i + 1, nil
					}
				}
			}
			return nil, 0, errNeedMore
		}
		return nil, 0, s.errAt(s.pos, "unexpected markup %q", string(data[:min(len(data), 9)]))
	case '/':
		nameEnd := 2
		for nameEnd < len(data) && isNameByte(data[nameEnd]) {
			nameEnd++
		}
		j := nameEnd
		for j < len(data) && isSpace(data[j]) {
			j++
		}
		if j >= len(data) {
			return nil, 0, errNeedMore
		}
		if data[j] != '>' || nameEnd == 2 {
			return nil, 0, s.errAt(s.pos+j, "malformed end tag")
		}
		name := data[2:nameEnd]
		if len(s.stack) == 0 {
			return nil, 0, s.errAt(s.pos, "unexpected end element </%s>", name)
		}
		open := s.stack[len(s.stack)-1]
		if !bytes.Equal(open, name) {
			return nil, 0, s.errAt(s.pos, "element <%s> closed by </%s>", open, name)
		}
		s.stack = s.stack[:len(s.stack)-1]
		line, col := s.position(s.pos)
		s.tok = xmlToken{kind: xmlEnd, name: local(name), attrs: s.tok.attrs[:0], line: line, col: col}
		return &s.tok, j + 1, nil
	}
	// a start tag
	if len(s.stack) == 0 && s.started {
		return nil, 0, s.errAt(s.pos, "a second root element")
	}
	nameEnd := 1
	for nameEnd < len(data) && isNameByte(data[nameEnd]) {
		nameEnd++
	}
	if nameEnd >= len(data) {
		return nil, 0, errNeedMore
	}
	if nameEnd == 1 {
		return nil, 0, s.errAt(s.pos+1, "expected an element name after '<'")
	}
	name := data[1:nameEnd]
	s.scratch = s.scratch[:0]
	attrs := s.tok.attrs[:0]
	type span struct{ n0, n1, v0, v1 int }
	var spans [16]span
	sp := spans[:0]
	i := nameEnd
	selfClose := false
	for {
		for i < len(data) && isSpace(data[i]) {
			i++
		}
		if i >= len(data) {
			return nil, 0, errNeedMore
		}
		if data[i] == '>' {
			i++
			break
		}
		if data[i] == '/' {
			if i+1 >= len(data) {
				return nil, 0, errNeedMore
			}
			if data[i+1] != '>' {
				return nil, 0, s.errAt(s.pos+i, "expected '>' after '/'")
			}
			selfClose = true
			i += 2
			break
		}
		if i == nameEnd {
			return nil, 0, s.errAt(s.pos+i, "expected a space before an attribute")
		}
		n0 := i
		for i < len(data) && isNameByte(data[i]) {
			i++
		}
		n1 := i
		if n1 == n0 {
			return nil, 0, s.errAt(s.pos+i, "expected an attribute name")
		}
		for i < len(data) && isSpace(data[i]) {
			i++
		}
		if i >= len(data) {
			return nil, 0, errNeedMore
		}
		if data[i] != '=' {
			return nil, 0, s.errAt(s.pos+i, "attribute %s has no value", data[n0:n1])
		}
		i++
		for i < len(data) && isSpace(data[i]) {
			i++
		}
		if i >= len(data) {
			return nil, 0, errNeedMore
		}
		q := data[i]
		if q != '"' && q != '\'' {
			return nil, 0, s.errAt(s.pos+i, "attribute %s: value not in quotes", data[n0:n1])
		}
		close := bytes.IndexByte(data[i+1:], q)
		if close < 0 {
			return nil, 0, errNeedMore
		}
		raw := data[i+1 : i+1+close]
		if bytes.IndexByte(raw, '<') >= 0 {
			return nil, 0, s.errAt(s.pos+i+1+bytes.IndexByte(raw, '<'), "'<' inside an attribute value")
		}
		v0 := len(s.scratch)
		var err error
		if s.scratch, err = s.unescape(s.scratch, raw, s.pos+i+1); err != nil {
			return nil, 0, err
		}
		sp = append(sp, span{n0, n1, v0, len(s.scratch)})
		i += 1 + close + 1
	}
	for _, a := range sp {
		attrs = append(attrs, xmlAttr{name: local(data[a.n0:a.n1]), value: s.scratch[a.v0:a.v1]})
	}
	s.started = true
	// push a copy of the name, reusing the buffer a closed element at this depth left behind
	if n := len(s.stack); n < cap(s.stack) {
		s.stack = s.stack[:n+1]
		s.stack[n] = append(s.stack[n][:0], name...)
	} else {
		s.stack = append(s.stack, append([]byte(nil), name...))
	}
	line, col := s.position(s.pos)
	s.tok = xmlToken{kind: xmlStart, name: local(s.stack[len(s.stack)-1]), attrs: attrs, line: line, col: col}
	s.pending = selfClose
	return &s.tok, i, nil
}

// unescape appends raw with its references decoded (XML 1.0 section 4.6: the five predefined
// entities; section 4.1: character references).
func (s *xmlScanner) unescape(dst, raw []byte, at int) ([]byte, error) {
	for {
		amp := bytes.IndexByte(raw, '&')
		lit := raw
		if amp >= 0 {
			lit = raw[:amp]
		}
		if i := controlByte(lit); i >= 0 {
			return nil, s.errAt(at+i, "character U+%04X is not allowed in XML", lit[i])
		}
		if amp < 0 {
			if !utf8.Valid(raw) {
				return nil, s.errAt(at, "invalid UTF-8")
			}
			return appendLines(dst, raw), nil
		}
		dst = appendLines(dst, raw[:amp])
		semi := bytes.IndexByte(raw[amp:], ';')
		if semi < 0 {
			return nil, s.errAt(at+amp, "'&' without ';'")
		}
		ref := raw[amp+1 : amp+semi]
		switch string(ref) {
		case "lt":
			dst = append(dst, '<')
		case "gt":
			dst = append(dst, '>')
		case "amp":
			dst = append(dst, '&')
		case "quot":
			dst = append(dst, '"')
		case "apos":
			dst = append(dst, '\'')
		default:
			if len(ref) < 2 || ref[0] != '#' {
				return nil, s.errAt(at+amp, "invalid character entity &%s;", ref)
			}
			var n uint64
			var err error
			if ref[1] == 'x' {
				n, err = strconv.ParseUint(string(ref[2:]), 16, 32)
			} else {
				n, err = strconv.ParseUint(string(ref[1:]), 10, 32)
			}
			if err != nil || !isXMLChar(rune(n)) {
				return nil, s.errAt(at+amp, "invalid character entity &%s;", ref)
			}
			dst = utf8.AppendRune(dst, rune(n))
		}
		raw = raw[amp+semi+1:]
		at += amp + semi + 1
	}
}

// appendLines appends b with its line ends normalised to LF, as XML 1.0 section 2.11 asks of
// literal text (a character reference &#13; still gives CR).
func appendLines(dst, b []byte) []byte {
	for {
		i := bytes.IndexByte(b, '\r')
		if i < 0 {
			return append(dst, b...)
		}
		dst = append(dst, b[:i]...)
		dst = append(dst, '\n')
		b = b[i+1:]
		if len(b) > 0 && b[0] == '\n' {
			b = b[1:]
		}
	}
}

// skip passes over the rest of the element whose start tag was just read.
func (s *xmlScanner) skip() error {
	depth := 1
	for depth > 0 {
		t, err := s.next()
		if err != nil {
			return err
		}
		switch t.kind {
		case xmlStart:
			depth++
		case xmlEnd:
			depth--
		case xmlEOF:
			return s.errAt(s.pos, "the file ends inside an element")
		}
	}
	return nil
}

// attrBytes is attr without a copy: the bytes are the scanner's, valid until the next token.
func (t *xmlToken) attrBytes(name string) ([]byte, bool) {
	for _, a := range t.attrs {
		if string(a.name) == name {
			return a.value, true
		}
	}
	return nil, false
}

func (t *xmlToken) attr(name string) (string, bool) {
	v, ok := t.attrBytes(name)
	return string(v), ok
}

// local drops a namespace prefix as encoding/xml does: at the first colon, and only when both
// the prefix and the rest are non-empty (a name ":" or "a:" is kept whole).
func local(name []byte) []byte {
	if i := bytes.IndexByte(name, ':'); i >= 1 && i <= len(name)-2 {
		return name[i+1:]
	}
	return name
}

func isSpace(c byte) bool { return c == ' ' || c == '\t' || c == '\n' || c == '\r' }

// isNameByte accepts the bytes of XML names: ASCII letters, digits, '_', ':', '-', '.', and any
// byte of a multi-byte UTF-8 character (names in other scripts).
func isNameByte(c byte) bool {
	return c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' || c >= '0' && c <= '9' || c == '_' || c == ':' || c == '-' || c == '.' || c >= 0x80
}

// controlByte finds the first control character XML 1.0 does not allow (section 2.2: of the
// characters below U+0020 only tab, line feed and carriage return), or −1.
func controlByte(b []byte) int {
	for i, c := range b {
		if c < 0x20 && c != '\t' && c != '\n' && c != '\r' {
			return i
		}
	}
	return -1
}

// isXMLChar is the Char production of XML 1.0 section 2.2.
func isXMLChar(r rune) bool {
	return r == 0x09 || r == 0x0A || r == 0x0D || r >= 0x20 && r <= 0xD7FF || r >= 0xE000 && r <= 0xFFFD || r >= 0x10000 && r <= 0x10FFFF
}
