package eventlog

import (
	"encoding/json"
	"math"
	"strconv"
	"strings"
)

// Kind is the type of an attribute column.
type Kind uint8

// The kinds follow the XES attribute types (IEEE 1849-2016, section 5.3): string and id are
// KindString, int and float are KindNumber, date is KindTime, boolean is KindBool, and list and
// container values (which nest further attributes) are KindNested. KindUnknown marks a value read
// from a format without types (CSV), whose column is typed by Build from all its values.
const (
	KindUnknown Kind = iota
	KindString
	KindNumber
	KindTime
	KindBool
	KindNested
)

var kindNames = [...]string{"unknown", "string", "number", "time", "bool", "nested"}

// String returns the kind's lower-case name, as used in JSON output.
func (k Kind) String() string {
	if int(k) < len(kindNames) {
		return kindNames[k]
	}
	return "kind(" + strconv.Itoa(int(k)) + ")"
}

// MarshalText writes the kind's name, so JSON shows "number" rather than 2.
func (k Kind) MarshalText() ([]byte, error) { return []byte(k.String()), nil }

// Level says whether an attribute belongs to a whole case or to single events.
type Level uint8

// The two levels of XES: trace attributes and event attributes.
const (
	CaseLevel Level = iota
	EventLevel
)

// Column holds one attribute for every case or every event of a Log, in the Log's order.
//
// Exactly one of the value slices is set, by Kind: Str (ids into Dict) for KindString and
// KindNested, Num for KindNumber, Time for KindTime, Bool for KindBool. A missing value is -1 in
// Str, NaN in Num, NoTime in Time, -1 in Bool. Dict also holds, for every kind, the original text
// of the values, so nothing written in the file is lost by typing: "1.50" stays "1.50" on export.
type Column struct {
	Key   string
	Kind  Kind
	Level Level
	Str   []int32
	Num   []float64
	Time  []int64
	Bool  []int8
	// Raw holds, for typed kinds, the id in Dict of each value's original text (-1 missing).
	// It is nil for KindString and KindNested, whose Str already is that.
	Raw  []int32
	Dict *Dict
}

// Text returns the value at i as it was written in the source, and false where it is missing.
func (c *Column) Text(i int) (string, bool) {
	ids := c.Raw
	if ids == nil {
		ids = c.Str
	}
	if ids[i] < 0 {
		return "", false
	}
	return c.Dict.Name(ids[i]), true
}

// Len is the number of values (cases or events) in the column.
func (c *Column) Len() int {
	if c.Raw != nil {
		return len(c.Raw)
	}
	return len(c.Str)
}

// Nested is a list or container value of XES (IEEE 1849-2016, sections 5.3.8 and 5.3.9): a
// tree of typed attributes. A Log stores it in a KindNested column as its JSON encoding, which
// Text returns and ParseNested reads back; the XES writer turns it into elements again.
type Nested struct {
	// Type is the XES element name: string, date, int, float, boolean, id, list or container.
	Type     string   `json:"t"`
	Key      string   `json:"k"`
	Value    string   `json:"v,omitempty"`
	Children []Nested `json:"c,omitempty"`
}

// Encode returns the JSON text under which the value is interned.
func (n Nested) Encode() string {
	b, _ := json.Marshal(n) // a tree of strings always marshals
	return string(b)
}

// ParseNested decodes the text of a KindNested value.
func ParseNested(s string) (Nested, error) {
	var n Nested
	err := json.Unmarshal([]byte(s), &n)
	return n, err
}

// ParseBool reads the spellings of a boolean that XES allows (xs:boolean: true, false, 1, 0) and
// the capitalised forms spreadsheets write.
func ParseBool(s string) (bool, bool) {
	switch strings.ToLower(s) {
	case "true", "1":
		return true, true
	case "false", "0":
		return false, true
	}
	return false, false
}

// parseDecimalComma reads a number written with a decimal comma and no grouping (12,5 or -3 or
// 0,25), as spreadsheets in much of Europe export them; ok is false for anything else.
func parseDecimalComma(s string) (f float64, ok bool) {
	d := strings.TrimLeft(s, "+-")
	if len(s)-len(d) > 1 || d == "" {
		return 0, false
	}
	comma := strings.IndexByte(d, ',')
	for i := 0; i < len(d); i++ {
		if c := d[i]; (c < '0' || c > '9') && i != comma {
			return 0, false
		}
	}
	if comma == 0 || comma == len(d)-1 {
		return 0, false
	}
	return ParseNumber(strings.Replace(s, ",", ".", 1))
}

// ParseNumber reads a decimal or scientific number as strconv does, refusing NaN and
// infinities, which no export means as a number.
func ParseNumber(s string) (float64, bool) {
	f, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsNaN(f) || math.IsInf(f, 0) {
		return 0, false
	}
	return f, true
}
