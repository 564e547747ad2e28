package intake

import (
	"bytes"
	"context"
	"fmt"
	"strconv"
	"strings"

	"tracewright/core/timestamp"
)

// Separators are the field separators Sniff considers, in order of preference on a tie.
var Separators = []byte{',', ';', '\t', '|'}

// SampleBytes is how much of a file Sniff reads to decide separator, header, roles and timestamp
// format: enough for about a thousand rows of a typical export.
const SampleBytes = 512 << 10

// previewRows is how many data rows a Sniff result carries for the page's preview.
const previewRows = 20

// Sniff is what the first part of a CSV file says about the whole: the separator, whether the
// first row is a header, the column names, a preview, and a proposed role for every column with
// the timestamp format of the time columns. The page shows it for the user to confirm or change.
type Sniff struct {
	Comma   string        `json:"separator"`
	Header  bool          `json:"header"`
	Columns []string      `json:"columns"`
	Preview [][]string    `json:"preview"`
	Guesses []ColumnGuess `json:"guesses"`
	Mapping Mapping       `json:"mapping"`
	// TimeFormat is the layout inferred for the time (and start) column; TimeAmbiguous says day
	// and month could be either way round in the sample, TimeAlternative is the other reading.
	TimeFormat      string `json:"time_format"`
	TimeAmbiguous   bool   `json:"time_ambiguous"`
	TimeAlternative string `json:"time_alternative,omitempty"`
	// TimeExample is the first sampled time value and how it reads under TimeFormat.
	TimeExample       string `json:"time_example,omitempty"`
	TimeExampleParsed string `json:"time_example_parsed,omitempty"`
	SampleRows        int    `json:"sample_rows"`

	rows [][]string // the sampled data rows
}

// inferTime sets the time format fields from the sampled values of the mapped time and start
// columns, taking a layout that reads at least minShare of them.
func (s *Sniff) inferTime(minShare float64) {
	s.TimeFormat, s.TimeAmbiguous, s.TimeAlternative, s.TimeExample, s.TimeExampleParsed = "", false, "", "", ""
	tc := columnIndex(s.Columns, s.Mapping.Time)
	if tc < 0 {
		return
	}
	vals := columnValues(s.rows, tc)
	if sc := columnIndex(s.Columns, s.Mapping.Start); sc >= 0 {
		vals = append(vals, columnValues(s.rows, sc)...)
	}
	inf := timestamp.InferShare(vals, minShare)
	if inf.Format == nil {
		return
	}
	s.TimeFormat = inf.Format.String()
	s.TimeAmbiguous = inf.Ambiguous
	if inf.Alternative != nil {
		s.TimeAlternative = inf.Alternative.String()
	}
	for _, v := range vals {
		if t, ok := inf.Format.ParseString(v); ok {
			s.TimeExample, s.TimeExampleParsed = v, timestamp.FormatRFC3339(t)
			break
		}
	}
}

// HeaderMode says whether the first row names the columns.
type HeaderMode uint8

// HeaderAuto decides from the sample; the others say.
const (
	HeaderAuto HeaderMode = iota
	HeaderPresent
	HeaderAbsent
)

// SniffCSV reads the start of a CSV file (about SampleBytes; more is ignored, less is fine). comma
// 0 lets it find the separator; header says whether it must decide on a header.
func SniffCSV(sample []byte, comma byte, header HeaderMode) (*Sniff, error) {
	sample = bytes.TrimPrefix(sample, []byte("\xef\xbb\xbf"))
	if len(bytes.TrimSpace(sample)) == 0 {
		return nil, ErrEmpty
	}
	complete := len(sample) < SampleBytes
	var rows [][]string
	if comma == 0 {
		best, bestScore := byte(','), -1.0
		for _, c := range Separators {
			rs, _ := sampleRows(sample, c, complete, 200)
			if s := consistency(rs); s > bestScore+1e-9 {
				best, bestScore = c, s
			}
		}
		comma = best
	}
	rows, err := sampleRows(sample, comma, complete, 1001)
	if err != nil {
		return nil, err
	}
	if len(rows) == 0 {
		return nil, ErrEmpty
	}
	s := &Sniff{Comma: string(comma)}
	switch header {
	case HeaderPresent:
		s.Header = true
	case HeaderAbsent:
		s.Header = false
	default:
		s.Header = looksLikeHeader(rows)
	}
	width := len(rows[0])
	if s.Header {
		s.Columns = headerNames(rows[0])
		rows = rows[1:]
	} else {
		for _, r := range rows {
			width = max(width, len(r))
		}
		s.Columns = headerNames(make([]string, width))
	}
	s.SampleRows = len(rows)
	s.Preview = rows[:min(previewRows, len(rows))]
	s.Guesses, s.Mapping = guessRoles(s.Columns, rows)
	s.rows = rows
	s.inferTime(0.5)
	return s, nil
}

// sampleRows splits the sample into at most limit records. When the sample was cut from a longer
// file its last record may be cut too, so it is dropped.
func sampleRows(sample []byte, comma byte, complete bool, limit int) ([][]string, error) {
	rr := newRecords(context.Background(), bytes.NewReader(sample), comma, len(sample)+1)
	var rows [][]string
	for len(rows) < limit {
		fs, err := rr.next()
		if err != nil {
			var se *SyntaxError
			if !complete && asSyntax(err, &se) && se.Err == ErrUnclosed {
				break // a quoted field cut by the end of the sample
			}
			return rows, err
		}
		if fs == nil {
			break
		}
		row := make([]string, len(fs))
		for i, f := range fs {
			row[i] = string(f)
		}
		rows = append(rows, row)
	}
	if !complete && len(rows) > 1 && len(rows) < limit {
		rows = rows[:len(rows)-1]
	}
	return rows, nil
}

// consistency scores a separator by how regular the records it makes are: the share of records
// with the most common field count, weighted up for more fields, zero for a single field.
func consistency(rows [][]string) float64 {
	if len(rows) == 0 {
		return 0
	}
	count := map[int]int{}
	for _, r := range rows {
		count[len(r)]++
	}
	mode, modeN := 0, 0
	for k, n := range count {
		if n > modeN || (n == modeN && k > mode) {
			mode, modeN = k, n
		}
	}
	if mode < 2 {
		return 0
	}
	share := float64(modeN) / float64(len(rows))
	// Regularity first; among equally regular separators the one giving more fields wins (a
	// semicolon file whose amounts carry decimal commas splits regularly on commas too).
	return share*100 + float64(min(mode, 99))/100
}

// looksLikeHeader decides whether the first row names the columns: it does when in some column
// the first value is text while the values below are mostly timestamps or numbers, or when every
// first value is distinct and none of them recurs below in its column. Otherwise the file is
// taken to have no header only if the first row looks like the rows below in every column.
func looksLikeHeader(rows [][]string) bool {
	if len(rows) < 2 {
		return true
	}
	first, rest := rows[0], rows[1:]
	typed := func(v string) bool {
		if _, err := strconv.ParseFloat(strings.TrimSpace(v), 64); err == nil {
			return true
		}
		return timestamp.Infer([]string{v}).Format != nil
	}
	for j, h := range first {
		vals := columnValues(rest, j)
		if len(vals) == 0 {
			continue
		}
		n := 0
		for _, v := range vals {
			if typed(v) {
				n++
			}
		}
		if n*10 >= len(vals)*9 {
			return !typed(h)
		}
	}
	seen := map[string]bool{}
	for j, h := range first {
		if h == "" || seen[h] {
			return false
		}
		seen[h] = true
		for _, v := range columnValues(rest, j) {
			if v == h {
				return false
			}
		}
	}
	return true
}

// headerNames makes the column names unique and non-empty: an empty name becomes "column N"
// (1-based), a repeated one gets " (2)", " (3)" and so on.
func headerNames(row []string) []string {
	out := make([]string, len(row))
	seen := map[string]int{}
	for i, h := range row {
		h = strings.TrimSpace(h)
		if h == "" {
			h = "column " + strconv.Itoa(i+1)
		}
		if n := seen[h]; n > 0 {
			seen[h] = n + 1
			h = fmt.Sprintf("%s (%d)", h, n+1)
		} else {
			seen[h] = 1
		}
		out[i] = h
	}
	return out
}

func columnValues(rows [][]string, j int) []string {
	var out []string
	for _, r := range rows {
		if j < len(r) && strings.TrimSpace(r[j]) != "" {
			out = append(out, r[j])
		}
	}
	return out
}

// columnIndex finds a column by name, or by a 1-based number written "#3" or "3".
func columnIndex(cols []string, name string) int {
	if name == "" {
		return -1
	}
	for i, c := range cols {
		if c == name {
			return i
		}
	}
	for i, c := range cols {
		if strings.EqualFold(c, name) {
			return i
		}
	}
	if n, err := strconv.Atoi(strings.TrimPrefix(name, "#")); err == nil && n >= 1 && n <= len(cols) {
		return n - 1
	}
	return -1
}
