package intake

import (
	"encoding/json"
	"errors"
	"fmt"
	"strings"
)

// Causes of a RowError or SyntaxError, for errors.Is.
var (
	ErrNoCase      = errors.New("no case id")
	ErrNoActivity  = errors.New("no activity")
	ErrNoTime      = errors.New("no timestamp")
	ErrBadTime     = errors.New("timestamp does not match the format")
	ErrFieldCount  = errors.New("wrong number of fields")
	ErrQuote       = errors.New("bad quoting")
	ErrUnclosed    = errors.New("quoted field not closed before the end of the file")
	ErrRoles       = errors.New("column roles")
	ErrXES         = errors.New("not valid XES")
	ErrEmpty       = errors.New("the file holds no data")
	ErrNoEvents    = errors.New("no event could be read")
	ErrEncoding    = errors.New("not UTF-8 text")
	ErrLifecycle   = errors.New("lifecycle column")
	ErrUnsupported = errors.New("unsupported file")
)

// RowError is a problem with one row of a CSV file or one event of an XES file: where it is, in
// which column or attribute, the text found there, and the cause.
//
// Line is 1-based and counts lines of the file (a CSV record with a quoted newline spans several;
// Line is where it starts). Column is the column's header name (or "column N" without a
// header), or the XES attribute key.
type RowError struct {
	Line   int    `json:"line"`
	Column string `json:"column,omitempty"`
	Value  string `json:"value,omitempty"`
	Err    error  `json:"-"`
}

func (e *RowError) Error() string {
	var b strings.Builder
	fmt.Fprintf(&b, "line %d", e.Line)
	if e.Column != "" {
		fmt.Fprintf(&b, ", column %q", e.Column)
	}
	b.WriteString(": ")
	b.WriteString(e.Err.Error())
	if e.Value != "" {
		v := e.Value
		if len(v) > 60 {
			v = v[:57] + "..."
		}
		fmt.Fprintf(&b, ": %q", v)
	}
	return b.String()
}

func (e *RowError) Unwrap() error { return e.Err }

// SyntaxError is a problem that stops reading: the file's structure is broken at Line and
// Column, so no later row can be trusted. Column counts bytes from 1 within the line.
type SyntaxError struct {
	Line   int   `json:"line"`
	Column int   `json:"column"`
	Err    error `json:"-"`
}

func (e *SyntaxError) Error() string {
	return fmt.Sprintf("line %d, column %d: %v", e.Line, e.Column, e.Err)
}

func (e *SyntaxError) Unwrap() error { return e.Err }

// Policy says what a reader does with a row it cannot use.
type Policy uint8

// The two policies: stop at the first bad row with its error, or set it aside, count it, report
// the first ones with their lines, and go on.
const (
	Stop Policy = iota
	Skip
)

// Problems tallies the rows a reader set aside under Skip. Nothing is dropped silently: every
// skipped row is counted by cause, and the first ones are kept with their positions.
type Problems struct {
	Skipped int            `json:"skipped"`
	ByCause map[string]int `json:"by_cause,omitempty"`
	First   []*RowError    `json:"first,omitempty"`
	limit   int
}

func newProblems(limit int) *Problems {
	if limit <= 0 {
		limit = 20
	}
	return &Problems{ByCause: map[string]int{}, limit: limit}
}

func (p *Problems) add(e *RowError) {
	p.Skipped++
	p.ByCause[e.Err.Error()]++
	if len(p.First) < p.limit {
		p.First = append(p.First, e)
	}
}

// Summary says in one line how many rows were set aside and why, capped for display.
func (p *Problems) Summary() string {
	if p.Skipped == 0 {
		return ""
	}
	var b strings.Builder
	fmt.Fprintf(&b, "%d rows set aside", p.Skipped)
	for i, e := range p.First {
		if i == 3 {
			fmt.Fprintf(&b, "; and %d more", p.Skipped-3)
			break
		}
		b.WriteString("; ")
		b.WriteString(e.Error())
	}
	return b.String()
}

// MarshalJSON writes the position, the text and the cause as plain fields, the form in which an
// error crosses to the page or to a script.
func (e *RowError) MarshalJSON() ([]byte, error) {
	return json.Marshal(struct {
		Line    int    `json:"line"`
		Column  string `json:"column,omitempty"`
		Value   string `json:"value,omitempty"`
		Cause   string `json:"cause"`
		Message string `json:"message"`
	}{e.Line, e.Column, e.Value, e.Err.Error(), e.Error()})
}
