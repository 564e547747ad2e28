package intake

import (
	"bufio"
	"bytes"
	"context"
	"fmt"
	"io"
	"strings"
	"unsafe"

	"tracewright/core/eventlog"
	"tracewright/core/timestamp"
)

// XESOptions steer ReadXES.
type XESOptions struct {
	// Classifier names the XES classifier whose keys make an event's activity; "" uses the
	// concept:name of each event (IEEE 1849-2016, concept extension).
	Classifier string
	// OnError is Stop (the default) or Skip, for events without an activity or with an unreadable
	// timestamp.
	OnError     Policy
	MaxReported int
	Size        int64
	Progress    func(Progress)
}

// XES attribute element names (IEEE 1849-2016, section 5.3) and the kinds they map to.
var xesKinds = map[string]eventlog.Kind{
	"string": eventlog.KindString, "id": eventlog.KindString, "int": eventlog.KindNumber,
	"float": eventlog.KindNumber, "date": eventlog.KindTime, "boolean": eventlog.KindBool,
	"list": eventlog.KindNested, "container": eventlog.KindNested,
}

// The standard extensions' keys that fill the log's own columns.
const (
	keyName      = "concept:name"
	keyTime      = "time:timestamp"
	keyResource  = "org:resource"
	keyLifecycle = "lifecycle:transition"
)

var xsDateTime, _ = timestamp.ParseFormat("YYYY-MM-DDThh:mm[:ss[.f]][Z]")

// countingReader counts the bytes read through it, for progress over a compressed file.
type countingReader struct {
	r io.Reader
	n int64
}

func (c *countingReader) Read(p []byte) (int, error) {
	n, err := c.r.Read(p)
	c.n += int64(n)
	return n, err
}

// xesEvent is an event of the trace being read: its attributes are x.pool[from:to].
type xesEvent struct {
	line     int
	from, to int
}

type xesReader struct {
	ctx   context.Context
	s     *xmlScanner
	cr    *countingReader
	opt   XESOptions
	b     *eventlog.Builder
	rep   *Report
	meta  eventlog.Meta
	keys  []string // classifier keys; nil means concept:name
	trace int      // traces read, for names of traces without one

	lastProgress int64

	// What one trace needs, kept from trace to trace so that reading allocates little: the
	// events, their attributes side by side, a scratch list for globals, and an arena that holds
	// the trace's attribute values (see text).
	events  []xesEvent
	pool    []eventlog.Nested
	scratch []eventlog.Nested
	arena   []byte
	inTrace bool
	names   map[string]string // element names and keys, each allocated once
	grown   bool              // the columns were sized from the first megabyte
}

// name returns b as a string shared by every element or key of that name.
func (x *xesReader) name(b []byte) string {
	if s, ok := x.names[string(b)]; ok {
		return s
	}
	s := string(b)
	if len(x.names) < 10_000 { // a file of ever new keys must not grow this without end
		x.names[s] = s
	}
	return s
}

// text returns an attribute value as a string. Inside a trace it points into x.arena, which the
// next trace writes over: such strings must be copied by whatever keeps them (the builder's
// dictionaries copy what they intern; errors clone their value). Values outside traces (the
// log's attributes and globals) are kept for the whole read, so they are allocated.
func (x *xesReader) text(b []byte) string {
	if !x.inTrace || len(b) == 0 {
		return string(b)
	}
	if cap(x.arena)-len(x.arena) < len(b) {
		// a new chunk; the old one stays alive as long as a string points into it
		x.arena = make([]byte, 0, max(64<<10, 2*len(b)))
	}
	start := len(x.arena)
	x.arena = append(x.arena, b...)
	return unsafe.String(&x.arena[start], len(b))
}

// bytesOf views s as bytes for a call that only reads them (and copies what it keeps).
func bytesOf(s string) []byte { return unsafe.Slice(unsafe.StringData(s), len(s)) }

// ReadXES reads an event log from XES XML (IEEE 1849-2016) as a stream of tokens: memory holds the
// log's columns and one trace at a time, never the document. Each trace becomes a case (named by
// its concept:name, or "trace N" without one; a repeated name gets " (2)" and a warning), each
// event's concept:name (or the chosen classifier's keys joined by "+") its activity,
// time:timestamp its time, org:resource its resource, lifecycle:transition its lifecycle; every
// other attribute is kept with its type, list and container values as trees. Globals fill
// attributes a trace or event lacks. An event without a timestamp is kept in file order and
// counted in Log.Untimed.
func ReadXES(ctx context.Context, r io.Reader, opt XESOptions) (*eventlog.Log, *Report, error) {
	cr := &countingReader{r: r}
	text, err := declaredEncoding(cr)
	if err != nil {
		return nil, &Report{Format: "xes", Problems: newProblems(opt.MaxReported)}, err
	}
	x := &xesReader{ctx: ctx, cr: cr, s: newXMLScanner(ctx, text), opt: opt, b: eventlog.NewBuilder(),
		rep: &Report{Format: "xes", Problems: newProblems(opt.MaxReported)}, meta: eventlog.Meta{Format: "xes"},
		names: map[string]string{}}
	if err := x.run(); err != nil {
		return nil, x.rep, err
	}
	x.rep.Bytes = cr.n
	if opt.Progress != nil {
		opt.Progress(Progress{Bytes: cr.n, Total: opt.Size, Events: x.b.NumEvents()})
	}
	if x.b.NumEvents() == 0 && x.rep.Problems.Skipped > 0 {
		return nil, x.rep, fmt.Errorf("%w: all %d events were set aside; first: %v", ErrNoEvents, x.rep.Problems.Skipped, x.rep.Problems.First[0])
	}
	x.b.SetMeta(x.meta)
	l, err := x.b.Build(eventlog.BuildOptions{})
	if err != nil {
		return nil, x.rep, err
	}
	x.rep.Events = l.NumEvents()
	if l.Untimed > 0 {
		x.rep.Warnings = append(x.rep.Warnings, fmt.Sprintf("%d events have no time:timestamp; they keep their place after the event before them", l.Untimed))
	}
	return l, x.rep, nil
}

// encodingName finds the encoding named by the XML declaration at the start of head (XML 1.0
// section 2.8, EncodingDecl): after optional white space, "<?xml", and before the first '>', the
// first "encoding" followed by '=' and a quoted name of letters, digits, '.', '_' or '-'. It
// returns the name's offset in head, or -1. (It replaced a regular expression, whose package was
// 6% of the engine's code.)
func encodingName(head []byte) (name []byte, at int) {
	space := func(c byte) bool { return c == ' ' || c == '\t' || c == '\n' || c == '\r' || c == '\f' }
	i := 0
	for i < len(head) && space(head[i]) {
		i++
	}
	if !bytes.HasPrefix(head[i:], []byte("<?xml")) {
		return nil, -1
	}
	decl := head
	if end := bytes.IndexByte(head[i:], '>'); end >= 0 {
		decl = head[:i+end]
	}
	for from := i + 5; ; {
		k := bytes.Index(decl[from:], []byte("encoding"))
		if k < 0 {
			return nil, -1
		}
		j := from + k + len("encoding")
		from = from + k + 1
		for j < len(decl) && space(decl[j]) {
			j++
		}
		if j >= len(decl) || decl[j] != '=' {
			continue
		}
		j++
		for j < len(decl) && space(decl[j]) {
			j++
		}
		if j >= len(decl) || (decl[j] != '"' && decl[j] != '\'') {
			continue
		}
		j++
		start := j
		for j < len(decl) && (decl[j]|0x20 >= 'a' && decl[j]|0x20 <= 'z' || decl[j] >= '0' && decl[j] <= '9' || decl[j] == '.' || decl[j] == '_' || decl[j] == '-') {
			j++
		}
		if j == start || j >= len(decl) || (decl[j] != '"' && decl[j] != '\'') {
			continue
		}
		return decl[start:j], start
	}
}

// declaredEncoding reads the XML declaration's encoding (XML 1.0 section 4.3.3) and returns the
// text as UTF-8. UTF-16 arrives here already converted by Open.
func declaredEncoding(r io.Reader) (io.Reader, error) {
	br := bufio.NewReaderSize(r, 4096)
	head, _ := br.Peek(512)
	head = bytes.TrimPrefix(head, []byte("\xef\xbb\xbf"))
	name, at := encodingName(head)
	if at < 0 {
		return br, nil
	}
	switch strings.ToLower(string(name)) {
	case "utf-8", "utf8", "us-ascii", "ascii", "utf-16", "utf16", "utf-16le", "utf-16be":
		return br, nil
	case "iso-8859-1", "latin1", "latin-1", "iso8859-1", "windows-1252", "cp1252":
		return newCP1252Reader(br), nil
	}
	return nil, &SyntaxError{Line: 1, Column: at + 1,
		Err: fmt.Errorf("%w: the file declares the encoding %q; save it as UTF-8", ErrUnsupported, name)}
}

func (x *xesReader) token() (*xmlToken, error) {
	tok, err := x.s.next()
	if err != nil {
		return nil, err
	}
	if x.cr.n-x.lastProgress >= 1<<20 {
		x.lastProgress = x.cr.n
		if x.opt.Progress != nil {
			x.opt.Progress(Progress{Bytes: x.cr.n, Total: x.opt.Size, Events: x.b.NumEvents()})
		}
	}
	return tok, nil
}

// unexpectedEnd is the error for a document that ends where an element must go on.
func (x *xesReader) unexpectedEnd() error {
	return x.s.errAt(x.s.pos, "the file ends inside an element")
}

func (x *xesReader) run() error {
	tok, err := x.token()
	if err != nil {
		return err
	}
	if tok.kind != xmlStart || string(tok.name) != "log" {
		if tok.kind == xmlEOF {
			return fmt.Errorf("%w: no <log> element", ErrXES)
		}
		return &SyntaxError{Line: tok.line, Column: tok.col, Err: fmt.Errorf("%w: the root element is <%s>, not <log>", ErrXES, tok.name)}
	}
	for {
		tok, err := x.token()
		if err != nil {
			return err
		}
		switch tok.kind {
		case xmlEOF:
			return x.unexpectedEnd()
		case xmlEnd:
			if _, err := x.token(); err != nil { // the end of the document, or what follows it
				return err
			}
			return x.finishClassifier()
		case xmlStart:
			switch string(tok.name) {
			case "extension":
				name, _ := tok.attr("name")
				prefix, _ := tok.attr("prefix")
				uri, _ := tok.attr("uri")
				x.meta.Extensions = append(x.meta.Extensions, eventlog.Extension{Name: name, Prefix: prefix, URI: uri})
				if err := x.s.skip(); err != nil {
					return err
				}
			case "global":
				lvl := eventlog.EventLevel
				if scope, _ := tok.attr("scope"); scope == "trace" {
					lvl = eventlog.CaseLevel
				}
				kids, err := x.children(nil)
				if err != nil {
					return err
				}
				for _, k := range kids {
					x.meta.Globals = append(x.meta.Globals, eventlog.Global{Level: lvl, Attr: k})
				}
			case "classifier":
				name, _ := tok.attr("name")
				keys, _ := tok.attr("keys")
				x.meta.Classifiers = append(x.meta.Classifiers, eventlog.Classifier{Name: name, Keys: splitKeys(keys)})
				if err := x.s.skip(); err != nil {
					return err
				}
			case "trace":
				if err := x.finishClassifier(); err != nil {
					return err
				}
				if err := x.readTrace(tok.line); err != nil {
					return err
				}
			default:
				if _, ok := xesKinds[string(tok.name)]; ok {
					n, err := x.attribute(tok)
					if err != nil {
						return err
					}
					x.meta.Attrs = append(x.meta.Attrs, n)
				} else if err := x.s.skip(); err != nil { // unknown elements are passed over
					return err
				}
			}
		}
	}
}

// finishClassifier resolves the chosen classifier once the log's header is read.
func (x *xesReader) finishClassifier() error {
	if x.keys != nil || x.opt.Classifier == "" {
		return nil
	}
	for _, c := range x.meta.Classifiers {
		if c.Name == x.opt.Classifier {
			x.keys = c.Keys
			x.meta.Classifier = c.Name
			return nil
		}
	}
	var names []string
	for _, c := range x.meta.Classifiers {
		names = append(names, c.Name)
	}
	return fmt.Errorf("%w: the file declares no classifier %q (it declares: %s)", ErrXES, x.opt.Classifier, list(names))
}

// splitKeys splits a classifier's keys: separated by spaces, a key with spaces in single quotes
// (IEEE 1849-2016, section 5.6).
func splitKeys(s string) []string {
	var out []string
	for s = strings.TrimSpace(s); s != ""; s = strings.TrimSpace(s) {
		if s[0] == '\'' {
			if end := strings.IndexByte(s[1:], '\''); end >= 0 {
				out = append(out, s[1:1+end])
				s = s[end+2:]
				continue
			}
		}
		end := strings.IndexAny(s, " \t\n")
		if end < 0 {
			out = append(out, s)
			break
		}
		out = append(out, s[:end])
		s = s[end:]
	}
	return out
}

// attribute reads one attribute element and what it nests: a list's <values>, a container's
// members, or the meta-attributes any attribute may carry (IEEE 1849-2016, section 5.3).
func (x *xesReader) attribute(tok *xmlToken) (eventlog.Nested, error) {
	key, hasKey := tok.attrBytes("key")
	value, _ := tok.attrBytes("value")
	n := eventlog.Nested{Type: x.name(tok.name), Key: x.name(key), Value: x.text(value)}
	if !hasKey {
		return n, &SyntaxError{Line: tok.line, Column: tok.col, Err: fmt.Errorf("%w: <%s> without a key", ErrXES, tok.name)}
	}
	kids, err := x.children(nil)
	n.Children = kids
	return n, err
}

// children reads the attribute elements inside the current element up to its end, flattening a
// list's <values> wrapper.
func (x *xesReader) children(out []eventlog.Nested) ([]eventlog.Nested, error) {
	for {
		tok, err := x.token()
		if err != nil {
			return nil, err
		}
		switch tok.kind {
		case xmlEOF:
			return nil, x.unexpectedEnd()
		case xmlEnd:
			return out, nil
		case xmlStart:
			if string(tok.name) == "values" {
				var err error
				if out, err = x.children(out); err != nil {
					return nil, err
				}
				continue
			}
			if _, ok := xesKinds[string(tok.name)]; !ok {
				if err := x.s.skip(); err != nil {
					return nil, err
				}
				continue
			}
			n, err := x.attribute(tok)
			if err != nil {
				return nil, err
			}
			out = append(out, n)
		}
	}
}

func (x *xesReader) readTrace(traceLine int) error {
	x.trace++
	x.inTrace = true
	defer func() { x.inTrace = false }()
	x.arena = x.arena[:0] // the last trace's values are no longer used
	x.events, x.pool = x.events[:0], x.pool[:0]
	var tattrs []eventlog.Nested
	for {
		tok, err := x.token()
		if err != nil {
			return err
		}
		switch tok.kind {
		case xmlEOF:
			return x.unexpectedEnd()
		case xmlEnd:
			return x.addTrace(traceLine, tattrs, x.events)
		case xmlStart:
			if string(tok.name) == "event" {
				line, from := tok.line, len(x.pool)
				if x.pool, err = x.children(x.pool); err != nil {
					return err
				}
				x.events = append(x.events, xesEvent{line: line, from: from, to: len(x.pool)})
				x.rep.Rows++
				continue
			}
			if _, ok := xesKinds[string(tok.name)]; ok {
				n, err := x.attribute(tok)
				if err != nil {
					return err
				}
				tattrs = append(tattrs, n)
				continue
			}
			if err := x.s.skip(); err != nil {
				return err
			}
		}
	}
}

func (x *xesReader) withGlobals(attrs []eventlog.Nested, lvl eventlog.Level) []eventlog.Nested {
	for _, g := range x.meta.Globals {
		if g.Level != lvl {
			continue
		}
		found := false
		for _, a := range attrs {
			if a.Key == g.Attr.Key {
				found = true
				break
			}
		}
		if !found {
			attrs = append(attrs, g.Attr)
		}
	}
	return attrs
}

func (x *xesReader) addTrace(line int, tattrs []eventlog.Nested, events []xesEvent) error {
	tattrs = x.withGlobals(tattrs, eventlog.CaseLevel)
	name := ""
	for _, a := range tattrs {
		if a.Key == keyName && len(a.Children) == 0 {
			name = a.Value
		}
	}
	if name == "" {
		name = fmt.Sprintf("trace %d", x.trace)
	}
	if x.b.HasCase(name) {
		base := name
		for k := 2; x.b.HasCase(name); k++ {
			name = fmt.Sprintf("%s (%d)", base, k)
		}
		x.rep.Warnings = append(x.rep.Warnings, fmt.Sprintf("line %d: a trace repeats the case id %q; it is read as %q", line, base, name))
	}
	c := x.b.Case(bytesOf(name))
	for _, a := range tattrs {
		if a.Key == keyName && len(a.Children) == 0 {
			continue
		}
		kind, text := stored(a)
		x.b.SetCaseValue(x.b.CaseColumn(a.Key, kind), c, bytesOf(text))
	}
	for _, ev := range events {
		if err := x.addEvent(c, ev); err != nil {
			return err
		}
	}
	if !x.grown && x.opt.Size > 0 && x.cr.n >= 1<<20 {
		// Size the columns once from the density of the first megabyte (bytes as stored, so
		// gzip's ratio cancels out), with ReadCSV's 3% margin: growing by doubling copied each
		// column several times and took a fifth of the read.
		x.grown = true
		n := x.b.NumEvents()
		if est := int(float64(n) / float64(x.cr.n) * float64(x.opt.Size) * 1.03); est > n {
			x.b.Grow(est - n)
		}
	}
	return nil
}

func (x *xesReader) addEvent(c int32, ev xesEvent) error {
	attrs := x.pool[ev.from:ev.to]
	if len(x.meta.Globals) > 0 {
		x.scratch = x.withGlobals(append(x.scratch[:0], attrs...), eventlog.EventLevel)
		attrs = x.scratch
	}
	var name, res, life string
	var t int64 = eventlog.NoTime
	byKey := func(k string) (eventlog.Nested, bool) {
		for _, a := range attrs {
			if a.Key == k {
				return a, true
			}
		}
		return eventlog.Nested{}, false
	}
	fail := func(key, value string, cause error) error {
		e := &RowError{Line: ev.line, Column: key, Value: strings.Clone(value), Err: cause}
		if x.opt.OnError == Stop {
			return e
		}
		x.rep.Problems.add(e)
		return nil
	}
	if x.keys == nil {
		if a, ok := byKey(keyName); ok {
			name = a.Value
		}
	} else {
		parts := make([]string, 0, len(x.keys))
		for _, k := range x.keys {
			if a, ok := byKey(k); ok && a.Value != "" {
				parts = append(parts, a.Value)
			}
		}
		name = strings.Join(parts, "+")
	}
	if name == "" {
		return fail(keyName, "", ErrNoActivity)
	}
	if a, ok := byKey(keyTime); ok {
		var okT bool
		if t, okT = xsDateTime.ParseString(a.Value); !okT {
			return fail(keyTime, a.Value, ErrBadTime)
		}
	}
	if a, ok := byKey(keyResource); ok {
		res = a.Value
	}
	if a, ok := byKey(keyLifecycle); ok {
		life = a.Value
	}
	lc, err := x.b.Lifecycle(bytesOf(life))
	if err != nil {
		return &RowError{Line: ev.line, Column: keyLifecycle, Value: strings.Clone(life), Err: fmt.Errorf("%w: %w", ErrLifecycle, err)}
	}
	idx, err := x.b.Add(eventlog.Event{Case: c, Activity: x.b.Activity(bytesOf(name)), Resource: x.b.Resource(bytesOf(res)), Time: t, Life: lc, Row: int32(ev.line)})
	if err != nil {
		return err
	}
	for _, a := range attrs {
		if len(a.Children) == 0 {
			switch a.Key {
			case keyTime, keyResource, keyLifecycle:
				continue
			case keyName:
				if x.keys == nil {
					continue
				}
			}
		}
		kind, text := stored(a)
		x.b.SetEventValue(x.b.EventColumn(a.Key, kind), idx, bytesOf(text))
	}
	return nil
}

// stored is how an attribute goes into a column: simple values as their text under their kind; a
// list, a container (even an empty one) or a value with meta-attributes as its whole tree.
func stored(a eventlog.Nested) (eventlog.Kind, string) {
	kind := xesKinds[a.Type]
	if len(a.Children) > 0 || kind == eventlog.KindNested {
		return eventlog.KindNested, a.Encode()
	}
	return kind, a.Value
}
