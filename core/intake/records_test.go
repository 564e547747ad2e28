package intake

import (
	"context"
	"encoding/csv"
	"errors"
	"io"
	"strings"
	"testing"
	"testing/iotest"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func split(t *testing.T, in string, bufSize int, r func(io.Reader) io.Reader) ([][]string, []int, error) {
	t.Helper()
	var src io.Reader = strings.NewReader(in)
	if r != nil {
		src = r(src)
	}
	rr := newRecords(context.Background(), src, ',', bufSize)
	rr.buf = make([]byte, bufSize) // tiny buffers: records must survive refills
	rr.skipBOM()
	var out [][]string
	var lines []int
	for {
		fs, err := rr.next()
		if err != nil {
			return out, lines, err
		}
		if fs == nil {
			return out, lines, nil
		}
		row := []string{}
		for _, f := range fs {
			row = append(row, string(f))
		}
		out = append(out, row)
		lines = append(lines, rr.recLine)
	}
}

// TestRFC4180 checks the rules of RFC 4180 (Shafranovich 2005), section 2, with the RFC's own
// examples, at several buffer sizes so that a record cut by a refill is read the same.
func TestRFC4180(t *testing.T) {
	for _, tc := range []struct {
		name string
		in   string
		want [][]string
	}{
		{"rule 1: CRLF ends records", "aaa,bbb,ccc\r\nzzz,yyy,xxx\r\n", [][]string{{"aaa", "bbb", "ccc"}, {"zzz", "yyy", "xxx"}}},
		{"rule 2: last line break optional", "aaa,bbb,ccc\r\nzzz,yyy,xxx", [][]string{{"aaa", "bbb", "ccc"}, {"zzz", "yyy", "xxx"}}},
		{"rule 4: spaces are part of a field", "a b , c\r\n", [][]string{{"a b ", " c"}}},
		{"rule 5: fields may be quoted", "\"aaa\",\"bbb\",\"ccc\"\r\nzzz,yyy,xxx", [][]string{{"aaa", "bbb", "ccc"}, {"zzz", "yyy", "xxx"}}},
		{"rule 6: line breaks and commas in quotes", "\"aaa\",\"b\r\nbb\",\"ccc\"\r\nzzz,yyy,xxx", [][]string{{"aaa", "b\r\nbb", "ccc"}, {"zzz", "yyy", "xxx"}}},
		{"rule 7: doubled quotes", "\"aaa\",\"b\"\"bb\",\"ccc\"", [][]string{{"aaa", "b\"bb", "ccc"}}},
		// beyond the RFC, as documented in the package doc
		{"LF line ends", "a,b\nc,d\n", [][]string{{"a", "b"}, {"c", "d"}}},
		{"empty lines passed over", "a,b\n\n\r\nc,d\n", [][]string{{"a", "b"}, {"c", "d"}}},
		{"empty fields", ",,\n\"\",x,\n", [][]string{{"", "", ""}, {"", "x", ""}}},
		{"quote inside unquoted field kept", "28\" wheel,x\n", [][]string{{"28\" wheel", "x"}}},
		{"byte-order mark", "\xef\xbb\xbfa,b\n", [][]string{{"a", "b"}}},
		{"quoted field then unquoted", "\"x\",y,\"z\"\n", [][]string{{"x", "y", "z"}}},
		{"unicode", "Prüfung,Ärztin,日本\n", [][]string{{"Prüfung", "Ärztin", "日本"}}},
	} {
		for _, size := range []int{1, 3, 7, 64, 1 << 16} {
			t.Run(tc.name, func(t *testing.T) {
				got, _, err := split(t, tc.in, size, nil)
				require.NoError(t, err)
				assert.Equal(t, tc.want, got, "buffer %d", size)
			})
		}
		t.Run(tc.name+"/one byte reads", func(t *testing.T) {
			got, _, err := split(t, tc.in, 5, iotest.OneByteReader)
			require.NoError(t, err)
			assert.Equal(t, tc.want, got)
		})
	}
}

func TestRecordLines(t *testing.T) {
	_, lines, err := split(t, "h1,h2\n\"a\nb\nc\",x\n\nlast,y\n", 4, nil)
	require.NoError(t, err)
	assert.Equal(t, []int{1, 2, 6}, lines, "a record starts where its first line is; quoted newlines count")
}

func TestQuoteErrors(t *testing.T) {
	for _, tc := range []struct {
		name      string
		in        string
		line, col int
		cause     error
	}{
		{"unclosed at end", "a,b\nc,\"never closed\nmore\n", 2, 3, ErrUnclosed},
		{"text after closing quote", "a,b\n\"x\"y,z\n", 2, 4, ErrQuote},
		{"text after closing quote on a later line", "a,\"1\n2\"z\n", 2, 3, ErrQuote},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, _, err := split(t, tc.in, 8, nil)
			var se *SyntaxError
			require.True(t, errors.As(err, &se), "%v", err)
			assert.Equal(t, tc.line, se.Line)
			assert.Equal(t, tc.col, se.Column)
			assert.ErrorIs(t, err, tc.cause)
		})
	}
}

// FuzzRecords compares the splitter with encoding/csv from the Go standard library: wherever
// encoding/csv reads an input without error, we must read the same records. (Inputs with a
// carriage return are left out: encoding/csv turns a quoted CRLF into LF, we keep the text.)
func FuzzRecords(f *testing.F) {
	for _, s := range []string{"a,b\nc,d\n", "\"a\"\"b\",c\n", "\"x\ny\",z", ",,\n", "a\n\nb\n", "\"\"\n"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, in string) {
		if strings.ContainsRune(in, '\r') || strings.HasPrefix(in, "\xef\xbb\xbf") {
			return
		}
		cr := csv.NewReader(strings.NewReader(in))
		cr.FieldsPerRecord = -1
		want, err := cr.ReadAll()
		if err != nil {
			return
		}
		for _, size := range []int{2, 1 << 10} {
			got, _, err := split(t, in, size, nil)
			if strings.Contains(in, "\"") && err != nil {
				// encoding/csv accepts a quote right after a quoted field's close only in lazy
				// mode; strict mode errors, so an error here is a real disagreement
				t.Fatalf("we failed where encoding/csv read %q: %v", in, err)
			}
			require.NoError(t, err)
			if len(want) == 0 {
				want = nil
			}
			if len(got) == 0 {
				got = nil
			}
			if !equalRecords(want, got) {
				t.Fatalf("input %q (buffer %d): encoding/csv %q, we %q", in, size, want, got)
			}
		}
	})
}

func equalRecords(a, b [][]string) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if len(a[i]) != len(b[i]) {
			return false
		}
		for j := range a[i] {
			if a[i][j] != b[i][j] {
				return false
			}
		}
	}
	return true
}
