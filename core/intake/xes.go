package intake

import (
	"context"
	"encoding/xml"
	"errors"
	"fmt"
	"io"
	"strings"

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

// charsetReader lets the XML decoder read the encodings XES files declare besides UTF-8. UTF-16
// arrives here already converted by Open, so it passes through.
func charsetReader(label string, input io.Reader) (io.Reader, error) {
	switch strings.ToLower(label) {
	case "utf-8", "utf8", "us-ascii", "ascii", "utf-16", "utf16", "utf-16le", "utf-16be":
		return input, nil
	case "iso-8859-1", "latin1", "latin-1", "iso8859-1", "windows-1252", "cp1252":
		return newCP1252Reader(input), nil
	}
	return nil, fmt.Errorf("%w: the file declares the encoding %q; save it as UTF-8", ErrUnsupported, label)
}

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

type xesEvent struct {
	line  int
	attrs []eventlog.Nested
}

type xesReader struct {
	ctx   context.Context
	d     *xml.Decoder
	cr    *countingReader
	opt   XESOptions
	b     *eventlog.Builder
	rep   *Report
	meta  eventlog.Meta
	keys  []string // classifier keys; nil means concept:name
	trace int      // traces read, for names of traces without one

	lastProgress int64
}

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
	x := &xesReader{ctx: ctx, cr: cr, d: xml.NewDecoder(cr), opt: opt, b: eventlog.NewBuilder(),
		rep: &Report{Format: "xes", Problems: newProblems(opt.MaxReported)}, meta: eventlog.Meta{Format: "xes"}}
	x.d.Strict = true
	x.d.CharsetReader = charsetReader
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

func (x *xesReader) syntax(err error) error {
	line, col := x.d.InputPos()
	var se *xml.SyntaxError
	if errors.As(err, &se) {
		return &SyntaxError{Line: se.Line, Column: col, Err: fmt.Errorf("%w: %s", ErrXES, se.Msg)}
	}
	if errors.Is(err, io.EOF) || errors.Is(err, io.ErrUnexpectedEOF) {
		return &SyntaxError{Line: line, Column: col, Err: fmt.Errorf("%w: the file ends inside an element", ErrXES)}
	}
	if ctxErr := x.ctx.Err(); ctxErr != nil {
		return ctxErr
	}
	return &SyntaxError{Line: line, Column: col, Err: fmt.Errorf("%w: %w", ErrXES, err)}
}

func (x *xesReader) token() (xml.Token, error) {
	tok, err := x.d.Token()
	if err != nil {
		return nil, err
	}
	if x.cr.n-x.lastProgress >= 1<<20 {
		x.lastProgress = x.cr.n
		if err := x.ctx.Err(); err != nil {
			return nil, err
		}
		if x.opt.Progress != nil {
			x.opt.Progress(Progress{Bytes: x.cr.n, Total: x.opt.Size, Events: x.b.NumEvents()})
		}
	}
	return tok, nil
}

func (x *xesReader) run() error {
	// find <log>
	for {
		tok, err := x.token()
		if err == io.EOF {
			return fmt.Errorf("%w: no <log> element", ErrXES)
		}
		if err != nil {
			return x.syntax(err)
		}
		if se, ok := tok.(xml.StartElement); ok {
			if se.Name.Local != "log" {
				line, col := x.d.InputPos()
				return &SyntaxError{Line: line, Column: col, Err: fmt.Errorf("%w: the root element is <%s>, not <log>", ErrXES, se.Name.Local)}
			}
			break
		}
	}
	for {
		tok, err := x.token()
		if err != nil {
			return x.syntax(err)
		}
		switch t := tok.(type) {
		case xml.EndElement:
			return x.finishClassifier()
		case xml.StartElement:
			switch t.Name.Local {
			case "extension":
				x.meta.Extensions = append(x.meta.Extensions, eventlog.Extension{Name: attr(t, "name"), Prefix: attr(t, "prefix"), URI: attr(t, "uri")})
				if err := x.d.Skip(); err != nil {
					return x.syntax(err)
				}
			case "global":
				lvl := eventlog.EventLevel
				if attr(t, "scope") == "trace" {
					lvl = eventlog.CaseLevel
				}
				kids, err := x.children()
				if err != nil {
					return err
				}
				for _, k := range kids {
					x.meta.Globals = append(x.meta.Globals, eventlog.Global{Level: lvl, Attr: k})
				}
			case "classifier":
				x.meta.Classifiers = append(x.meta.Classifiers, eventlog.Classifier{Name: attr(t, "name"), Keys: splitKeys(attr(t, "keys"))})
				if err := x.d.Skip(); err != nil {
					return x.syntax(err)
				}
			case "trace":
				if err := x.finishClassifier(); err != nil {
					return err
				}
				if err := x.readTrace(); err != nil {
					return err
				}
			default:
				if _, ok := xesKinds[t.Name.Local]; ok {
					n, err := x.attribute(t)
					if err != nil {
						return err
					}
					x.meta.Attrs = append(x.meta.Attrs, n)
				} else if err := x.d.Skip(); err != nil { // unknown elements are passed over
					return x.syntax(err)
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

func attr(se xml.StartElement, name string) string {
	for _, a := range se.Attr {
		if a.Name.Local == name {
			return a.Value
		}
	}
	return ""
}

func hasAttr(se xml.StartElement, name string) bool {
	for _, a := range se.Attr {
		if a.Name.Local == name {
			return true
		}
	}
	return false
}

// attribute reads one attribute element and what it nests: a list's <values>, a container's
// members, or the meta-attributes any attribute may carry (IEEE 1849-2016, section 5.3).
func (x *xesReader) attribute(se xml.StartElement) (eventlog.Nested, error) {
	n := eventlog.Nested{Type: se.Name.Local, Key: attr(se, "key"), Value: attr(se, "value")}
	if !hasAttr(se, "key") {
		line, col := x.d.InputPos()
		return n, &SyntaxError{Line: line, Column: col, Err: fmt.Errorf("%w: <%s> without a key", ErrXES, se.Name.Local)}
	}
	kids, err := x.children()
	n.Children = kids
	return n, err
}

// children reads the attribute elements inside the current element up to its end, flattening a
// list's <values> wrapper.
func (x *xesReader) children() ([]eventlog.Nested, error) {
	var out []eventlog.Nested
	for {
		tok, err := x.token()
		if err != nil {
			return nil, x.syntax(err)
		}
		switch t := tok.(type) {
		case xml.EndElement:
			return out, nil
		case xml.StartElement:
			if t.Name.Local == "values" {
				kids, err := x.children()
				if err != nil {
					return nil, err
				}
				out = append(out, kids...)
				continue
			}
			if _, ok := xesKinds[t.Name.Local]; !ok {
				if err := x.d.Skip(); err != nil {
					return nil, x.syntax(err)
				}
				continue
			}
			n, err := x.attribute(t)
			if err != nil {
				return nil, err
			}
			out = append(out, n)
		}
	}
}

func (x *xesReader) readTrace() error {
	x.trace++
	traceLine, _ := x.d.InputPos()
	var tattrs []eventlog.Nested
	var events []xesEvent
	for {
		tok, err := x.token()
		if err != nil {
			return x.syntax(err)
		}
		switch t := tok.(type) {
		case xml.EndElement:
			return x.addTrace(traceLine, tattrs, events)
		case xml.StartElement:
			if t.Name.Local == "event" {
				line, _ := x.d.InputPos()
				kids, err := x.children()
				if err != nil {
					return err
				}
				events = append(events, xesEvent{line: line, attrs: kids})
				x.rep.Rows++
				continue
			}
			if _, ok := xesKinds[t.Name.Local]; ok {
				n, err := x.attribute(t)
				if err != nil {
					return err
				}
				tattrs = append(tattrs, n)
				continue
			}
			if err := x.d.Skip(); err != nil {
				return x.syntax(err)
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
	c := x.b.Case([]byte(name))
	for _, a := range tattrs {
		if a.Key == keyName && len(a.Children) == 0 {
			continue
		}
		kind := xesKinds[a.Type]
		text := a.Value
		if len(a.Children) > 0 {
			kind, text = eventlog.KindNested, a.Encode()
		}
		x.b.SetCaseValue(x.b.CaseColumn(a.Key, kind), c, []byte(text))
	}
	for _, ev := range events {
		if err := x.addEvent(c, ev); err != nil {
			return err
		}
	}
	return nil
}

func (x *xesReader) addEvent(c int32, ev xesEvent) error {
	attrs := x.withGlobals(ev.attrs, eventlog.EventLevel)
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
		e := &RowError{Line: ev.line, Column: key, Value: value, Err: cause}
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
	lc, err := x.b.Lifecycle([]byte(life))
	if err != nil {
		return &RowError{Line: ev.line, Column: keyLifecycle, Value: life, Err: fmt.Errorf("%w: %w", ErrLifecycle, err)}
	}
	idx, err := x.b.Add(eventlog.Event{Case: c, Activity: x.b.Activity([]byte(name)), Resource: x.b.Resource([]byte(res)), Time: t, Life: lc, Row: int32(ev.line)})
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
		kind := xesKinds[a.Type]
		text := a.Value
		if len(a.Children) > 0 || kind == eventlog.KindNested {
			kind, text = eventlog.KindNested, a.Encode()
		}
		x.b.SetEventValue(x.b.EventColumn(a.Key, kind), idx, []byte(text))
	}
	return nil
}
