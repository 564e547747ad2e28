package intake

import (
	"context"
	"encoding/xml"
	"fmt"
	"io"
	"strings"
	"testing"
	"testing/iotest"

	"github.com/stretchr/testify/require"
)

// scanAll lists the tokens of our scanner as text, small buffers forcing refills.
func scanAll(in string, oneByte bool) ([]string, error) {
	var r io.Reader = strings.NewReader(in)
	if oneByte {
		r = iotest.OneByteReader(r)
	}
	s := newXMLScanner(context.Background(), r)
	s.buf = make([]byte, 8)
	var out []string
	for {
		t, err := s.next()
		if err != nil {
			return out, err
		}
		switch t.kind {
		case xmlEOF:
			return out, nil
		case xmlStart:
			line := "<" + string(t.name)
			for _, a := range t.attrs {
				line += fmt.Sprintf(" %s=%q", a.name, a.value)
			}
			out = append(out, line)
		case xmlEnd:
			out = append(out, "</"+string(t.name))
		}
	}
}

// referenceTokens lists encoding/xml's tokens in the same form, and whether the document has one
// root element and no text outside it (our scanner refuses anything else).
func referenceTokens(in string) ([]string, bool, error) {
	d := xml.NewDecoder(strings.NewReader(in))
	d.Strict = true
	var out []string
	depth, roots := 0, 0
	for {
		tok, err := d.Token()
		if err == io.EOF {
			return out, roots == 1, nil
		}
		if err != nil {
			return nil, false, err
		}
		switch t := tok.(type) {
		case xml.StartElement:
			if depth == 0 {
				roots++
			}
			depth++
			line := "<" + t.Name.Local
			for _, a := range t.Attr {
				line += fmt.Sprintf(" %s=%q", a.Name.Local, a.Value)
			}
			out = append(out, line)
		case xml.EndElement:
			depth--
			out = append(out, "</"+t.Name.Local)
		case xml.CharData:
			if depth == 0 && strings.TrimSpace(string(t)) != "" {
				return out, false, nil
			}
		case xml.Directive:
			return out, false, nil // DOCTYPE and friends: not compared
		}
	}
}

func TestXMLScannerAgainstEncodingXML(t *testing.T) {
	for _, in := range []string{
		`<?xml version="1.0"?><log a="1"><trace><string key="k" value="a &amp; b &lt;c&gt; &#x41;&#66;"/></trace></log>`,
		"<log>\n<!-- a comment with <tags> -->\n<t k='single' v=\"x>y\"/><![CDATA[ <ignored> ]]></log>",
		"<x:log xmlns:x=\"http://example.com\"><x:e x:k=\"v\"/></x:log>",
		"<a b=\"line\r\nbreak&#13;\"/>",
	} {
		want, ok, err := referenceTokens(in)
		require.NoError(t, err)
		require.True(t, ok)
		for _, oneByte := range []bool{false, true} {
			got, err := scanAll(in, oneByte)
			require.NoError(t, err, in)
			require.Equal(t, want, got, in)
		}
	}
}

func TestXMLScannerErrors(t *testing.T) {
	for _, tc := range []struct{ in, msg string }{
		{"<a><b></a>", "element <b> closed by </a>"},
		{"<a x=1/>", "value not in quotes"},
		{"<a x=\"&bogus;\"/>", "invalid character entity"},
		{"<a x=\"&#0;\"/>", "invalid character entity"},
		{"<a>", "ends inside <a>"},
		{"<a/><b/>", "second root"},
		{"<a x=\"1\"", "ends inside markup"},
		{"", "no XML element"},
	} {
		_, err := scanAll(tc.in, false)
		require.Error(t, err, tc.in)
		require.Contains(t, err.Error(), tc.msg, tc.in)
	}
}

// FuzzXMLScanner: wherever encoding/xml reads a document with one root element, our scanner must
// read it too and give the same elements and attributes.
func FuzzXMLScanner(f *testing.F) {
	f.Add(`<log><trace><string key="concept:name" value="a"/></trace></log>`)
	f.Add("<a b='&amp;&#x41;'>\n<!-- c --><d/></a>")
	f.Add(`<?xml version="1.0" encoding="UTF-8"?><log><list key="l"><values><int key="x" value="1"/></values></list></log>`)
	f.Fuzz(func(t *testing.T, in string) {
		want, ok, err := referenceTokens(in)
		if err != nil || !ok {
			return
		}
		for _, oneByte := range []bool{false, true} {
			got, err := scanAll(in, oneByte)
			if err != nil {
				t.Fatalf("encoding/xml read %q, we failed: %v", in, err)
			}
			if strings.Join(got, "\n") != strings.Join(want, "\n") {
				t.Fatalf("input %q:\nencoding/xml %q\nwe           %q", in, want, got)
			}
		}
	})
}
