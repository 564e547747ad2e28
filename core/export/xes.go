package export

import (
	"bufio"
	"encoding/xml"
	"io"
	"strconv"
	"strings"

	"tracewright/core/eventlog"
	"tracewright/core/timestamp"
)

// standardExtensions are declared when the source declared none (IEEE 1849-2016, section 6).
var standardExtensions = []eventlog.Extension{
	{Name: "Concept", Prefix: "concept", URI: "http://www.xes-standard.org/concept.xesext"},
	{Name: "Time", Prefix: "time", URI: "http://www.xes-standard.org/time.xesext"},
	{Name: "Lifecycle", Prefix: "lifecycle", URI: "http://www.xes-standard.org/lifecycle.xesext"},
	{Name: "Organizational", Prefix: "org", URI: "http://www.xes-standard.org/org.xesext"},
}

type xesWriter struct {
	w   *bufio.Writer
	err error
	buf []byte
}

func (x *xesWriter) s(parts ...string) {
	for _, p := range parts {
		if x.err == nil {
			_, x.err = x.w.WriteString(p)
		}
	}
}

// esc escapes text for a double-quoted XML attribute value.
func (x *xesWriter) esc(v string) {
	if x.err == nil {
		x.err = xml.EscapeText(x.w, []byte(v))
	}
}

func (x *xesWriter) simple(indent, typ, key, value string) {
	x.s(indent, "<", typ, ` key="`)
	x.esc(key)
	x.s(`" value="`)
	x.esc(value)
	x.s("\"/>\n")
}

func (x *xesWriter) nested(indent string, n eventlog.Nested) {
	if len(n.Children) == 0 && n.Type != "list" && n.Type != "container" {
		x.simple(indent, n.Type, n.Key, n.Value)
		return
	}
	x.s(indent, "<", n.Type, ` key="`)
	x.esc(n.Key)
	x.s(`"`)
	if n.Type != "list" && n.Type != "container" {
		x.s(` value="`)
		x.esc(n.Value)
		x.s(`"`)
	}
	x.s(">\n")
	inner := indent + "\t"
	if n.Type == "list" {
		x.s(inner, "<values>\n")
		for _, c := range n.Children {
			x.nested(inner+"\t", c)
		}
		x.s(inner, "</values>\n")
	} else {
		for _, c := range n.Children {
			x.nested(inner, c)
		}
	}
	x.s(indent, "</", n.Type, ">\n")
}

// column writes the value of col at i, if any, with its XES type.
func (x *xesWriter) column(indent string, col *eventlog.Column, i int) {
	text, ok := col.Text(i)
	if !ok {
		return
	}
	switch col.Kind {
	case eventlog.KindNumber:
		if strings.IndexByte(text, ',') >= 0 { // read with a decimal comma; xs:double has a point
			text = strconv.FormatFloat(col.Num[i], 'f', -1, 64)
		}
		typ := "float"
		if _, err := strconv.ParseInt(text, 10, 64); err == nil {
			typ = "int"
		}
		x.simple(indent, typ, col.Key, text)
	case eventlog.KindTime:
		x.buf = timestamp.AppendRFC3339(x.buf[:0], col.Time[i])
		x.simple(indent, "date", col.Key, string(x.buf))
	case eventlog.KindBool:
		x.simple(indent, "boolean", col.Key, strconv.FormatBool(col.Bool[i] == 1))
	case eventlog.KindNested:
		n, err := eventlog.ParseNested(text)
		if err != nil {
			x.simple(indent, "string", col.Key, text)
			return
		}
		x.nested(indent, n)
	default:
		x.simple(indent, "string", col.Key, text)
	}
}

// WriteXES writes the log as an XES document.
func WriteXES(w io.Writer, l *eventlog.Log) error {
	x := &xesWriter{w: bufio.NewWriterSize(w, 1<<20)}
	x.s(`<?xml version="1.0" encoding="UTF-8"?>`, "\n")
	x.s(`<log xes.version="1849-2016" xes.features="nested-attributes" xmlns="http://www.xes-standard.org/">`, "\n")
	exts := l.Meta.Extensions
	if len(exts) == 0 {
		exts = standardExtensions
	}
	for _, e := range exts {
		x.s("\t", `<extension name="`)
		x.esc(e.Name)
		x.s(`" prefix="`)
		x.esc(e.Prefix)
		x.s(`" uri="`)
		x.esc(e.URI)
		x.s("\"/>\n")
	}
	for _, g := range l.Meta.Globals {
		scope := "event"
		if g.Level == eventlog.CaseLevel {
			scope = "trace"
		}
		x.s("\t", `<global scope="`, scope, "\">\n")
		x.nested("\t\t", g.Attr)
		x.s("\t</global>\n")
	}
	classifiers := l.Meta.Classifiers
	if len(classifiers) == 0 {
		classifiers = []eventlog.Classifier{{Name: "Activity", Keys: []string{"concept:name"}}}
	}
	for _, c := range classifiers {
		keys := make([]string, len(c.Keys))
		for i, k := range c.Keys {
			if strings.ContainsAny(k, " \t") {
				k = "'" + k + "'"
			}
			keys[i] = k
		}
		x.s("\t", `<classifier name="`)
		x.esc(c.Name)
		x.s(`" keys="`)
		x.esc(strings.Join(keys, " "))
		x.s("\"/>\n")
	}
	for _, a := range l.Meta.Attrs {
		x.nested("\t", a)
	}
	// A log read with another classifier keeps each event's concept:name as an attribute; it is
	// written from there, and the activity column is not written twice.
	nameAttr := l.EventAttr("concept:name")
	for c := 0; c < l.NumCases(); c++ {
		x.s("\t<trace>\n")
		x.simple("\t\t", "string", "concept:name", l.CaseID(c))
		for _, col := range l.CaseAttrs {
			x.column("\t\t", col, c)
		}
		from, to := l.Events(c)
		for e := from; e < to; e++ {
			x.s("\t\t<event>\n")
			if nameAttr == nil {
				x.simple("\t\t\t", "string", "concept:name", l.Activities.Name(l.Act[e]))
			}
			if lc := l.Life[e]; lc != 0 {
				x.simple("\t\t\t", "string", "lifecycle:transition", l.Lifecycles.Name(int32(lc)))
			}
			if r := l.Res[e]; r >= 0 {
				x.simple("\t\t\t", "string", "org:resource", l.Resources.Name(r))
			}
			if t := l.Time[e]; t != eventlog.NoTime {
				x.buf = timestamp.AppendRFC3339(x.buf[:0], t)
				x.simple("\t\t\t", "date", "time:timestamp", string(x.buf))
			}
			for _, col := range l.EventAttrs {
				x.column("\t\t\t", col, e)
			}
			x.s("\t\t</event>\n")
		}
		x.s("\t</trace>\n")
	}
	x.s("</log>\n")
	if x.err != nil {
		return x.err
	}
	return x.w.Flush()
}
