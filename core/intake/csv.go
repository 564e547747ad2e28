package intake

import (
	"bytes"
	"context"
	"fmt"
	"io"

	"tracewright/core/eventlog"
	"tracewright/core/timestamp"
)

// CSVOptions steer ReadCSV. The zero value sniffs everything and stops at the first bad row.
type CSVOptions struct {
	// Comma is the field separator; 0 sniffs it from the start of the file.
	Comma byte
	// Header says whether the first row names the columns.
	Header HeaderMode
	// Mapping names the columns of each role; an empty role is guessed (see SniffCSV).
	Mapping Mapping
	// TimeFormat is the layout of the time and start columns (see package timestamp); "" infers
	// it from the sample.
	TimeFormat string
	// OnError is Stop (the default) or Skip (set bad rows aside, count and report them).
	OnError Policy
	// MaxReported caps the rows kept in Problems.First (default 20).
	MaxReported int
	// Size is the input's length in bytes if known, for progress.
	Size int64
	// Progress, when set, is called as the reader advances (at most every megabyte read).
	Progress func(Progress)
}

// Progress is how far a reader has come.
type Progress struct {
	Bytes  int64 `json:"bytes"`
	Total  int64 `json:"total"` // 0 when unknown
	Events int   `json:"events"`
}

// Report says how a file was read: what was decided about it and what was set aside.
type Report struct {
	Format   string    `json:"format"` // "csv" or "xes"
	Rows     int       `json:"rows"`   // data rows (CSV) or <event> elements (XES) read
	Events   int       `json:"events"`
	Bytes    int64     `json:"bytes"`
	Problems *Problems `json:"problems"`
	CSV      *Sniff    `json:"csv,omitempty"`
	Warnings []string  `json:"warnings,omitempty"`
}

// ReadCSV reads an event log from CSV text. It first sniffs the opening SampleBytes (separator,
// header, roles and time format, each overridden by opt), then streams the rest: fields are
// interned straight from the read buffer and timestamps parsed without allocation.
//
// A row without a case id, activity or readable timestamp, or with the wrong number of fields,
// stops the read with a *RowError (opt.OnError == Stop) or is set aside and reported (Skip). A
// broken quote stops the read with a *SyntaxError under either policy. Cancelling ctx stops the
// read at the next buffer refill with ctx's error.
func ReadCSV(ctx context.Context, r io.Reader, opt CSVOptions) (*eventlog.Log, *Report, error) {
	head, err := io.ReadAll(io.LimitReader(r, SampleBytes))
	if err != nil {
		return nil, nil, err
	}
	sn, err := SniffCSV(head, opt.Comma, opt.Header)
	if err != nil {
		return nil, nil, err
	}
	rep := &Report{Format: "csv", Problems: newProblems(opt.MaxReported), CSV: sn}
	m := mergeMapping(opt.Mapping, sn.Mapping)
	if m.Time != sn.Mapping.Time || m.Start != sn.Mapping.Start {
		// The user named the time columns: take the layout that reads most of their values.
		sn.Mapping = m
		sn.inferTime(0)
	}
	sn.Mapping = m
	idx, err := resolve(sn.Columns, m)
	if err != nil {
		return nil, rep, err
	}
	layout := opt.TimeFormat
	if layout == "" {
		layout = sn.TimeFormat
		if sn.TimeAmbiguous {
			rep.Warnings = append(rep.Warnings, fmt.Sprintf("dates could be read day-first (%s) or month-first (%s); read day-first: set the time format to change it", sn.TimeFormat, sn.TimeAlternative))
		}
	}
	if layout == "" {
		return nil, rep, fmt.Errorf("%w: no timestamp format reads the column %q; give one", ErrRoles, m.Time)
	}
	tf, err := timestamp.ParseFormat(layout)
	if err != nil {
		return nil, rep, err
	}
	sn.TimeFormat = layout

	all := io.MultiReader(bytes.NewReader(head), r)
	// The buffer size hardly matters natively (64 KB, 1 MB and 4 MB split the 1M-event benchmark
	// file within 3% of each other); 1 MB keeps refills rare. A small file gets its own size.
	bufSize := 1 << 20
	if opt.Size > 0 && opt.Size < int64(bufSize) {
		bufSize = int(opt.Size) + 1
	} else if len(head) < SampleBytes {
		bufSize = len(head) + 1
	}
	rr := newRecords(ctx, all, sn.Comma[0], bufSize)
	b := eventlog.NewBuilder()
	var lastReport int64
	rr.onRefill = func(read int64) {
		if opt.Progress != nil && read-lastReport >= 1<<20 {
			lastReport = read
			opt.Progress(Progress{Bytes: read, Total: opt.Size, Events: b.NumEvents()})
		}
	}
	rr.skipBOM()
	if sn.Header {
		if _, err := rr.next(); err != nil {
			return nil, rep, err
		}
	}
	var attrCols []int // the handles of attribute columns, by source column (-1: not an attribute)
	for j := range sn.Columns {
		h := -1
		if idx.attr[j] {
			h = b.EventColumn(sn.Columns[j], eventlog.KindUnknown)
		}
		attrCols = append(attrCols, h)
	}
	if opt.Size > 0 && len(head) > 0 {
		// Estimate the rows from the sample's density, so the columns are allocated about once.
		// A 3% margin: an estimate just short makes every column grow by half again at the end.
		lines := bytes.Count(head, []byte{'\n'}) + 1
		rows := float64(opt.Size) / float64(len(head)) * float64(lines) * 1.03
		b.Grow(int(rows) * int(eventsPerRow(idx)))
	}
	pipe := newBatchPipe(b, idx.cas, attrCols)
	defer pipe.close()
	rb := pipe.next()
	lcStart, _ := b.Lifecycle([]byte("start"))
	lcComplete, _ := b.Lifecycle([]byte("complete"))
	width := len(sn.Columns)
	for {
		fs, err := rr.next()
		if err != nil {
			return nil, rep, err
		}
		if fs == nil {
			break
		}
		rep.Rows++
		line := rr.recLine
		bad := func(col int, cause error) *RowError {
			e := &RowError{Line: line, Err: cause}
			if col >= 0 {
				e.Column = sn.Columns[col]
				if col < len(fs) {
					e.Value = string(fs[col])
				}
			}
			return e
		}
		var rowErr *RowError
		var t, t0, st int64 = 0, 0, eventlog.NoTime
		switch {
		case len(fs) != width:
			rowErr = &RowError{Line: line, Err: fmt.Errorf("%w: %d, the header has %d", ErrFieldCount, len(fs), width)}
		case blank(fs[idx.cas]):
			rowErr = bad(idx.cas, ErrNoCase)
		case blank(fs[idx.act]):
			rowErr = bad(idx.act, ErrNoActivity)
		default:
			// A row needs a time; with a start column, a start alone is an activity begun and
			// not yet completed.
			hasTime := !blank(fs[idx.time])
			hasStart := idx.start >= 0 && !blank(fs[idx.start])
			var ok bool
			switch {
			case !hasTime && !hasStart:
				rowErr = bad(idx.time, ErrNoTime)
			case hasTime:
				if t, ok = tf.Parse(fs[idx.time]); !ok {
					rowErr = bad(idx.time, ErrBadTime)
				} else {
					t0 = t
				}
			}
			if rowErr == nil && hasStart {
				if st, ok = tf.Parse(fs[idx.start]); !ok {
					rowErr = bad(idx.start, ErrBadTime)
				}
			}
			if rowErr == nil && !hasTime {
				t0 = eventlog.NoTime
			}
		}
		if rowErr != nil {
			if opt.OnError == Stop {
				return nil, rep, rowErr
			}
			rep.Problems.add(rowErr)
			continue
		}
		c := int32(-1) // set by the batch below
		a := b.Activity(fs[idx.act])
		res := int32(-1)
		if idx.res >= 0 {
			res = b.Resource(fs[idx.res])
		}
		var lc uint8
		if idx.life >= 0 {
			if lc, err = b.Lifecycle(fs[idx.life]); err != nil {
				return nil, rep, &RowError{Line: line, Column: sn.Columns[idx.life], Value: string(fs[idx.life]), Err: fmt.Errorf("%w: %w", ErrLifecycle, err)}
			}
		}
		first := -1
		if st != eventlog.NoTime {
			if first, err = b.Add(eventlog.Event{Case: c, Activity: a, Resource: res, Time: st, Life: lcStart, Row: int32(line)}); err != nil {
				return nil, rep, err
			}
			lc = lcComplete
		}
		last := first
		if t0 != eventlog.NoTime {
			if last, err = b.Add(eventlog.Event{Case: c, Activity: a, Resource: res, Time: t, Life: lc, Row: int32(line)}); err != nil {
				return nil, rep, err
			}
			if first < 0 {
				first = last
			}
		}
		rb.add(fs, first, last)
		if rb.full() {
			pipe.send(rb)
			rb = pipe.next()
		}
	}
	pipe.send(rb)
	pipe.close()
	rep.Bytes = rr.read
	if opt.Progress != nil {
		opt.Progress(Progress{Bytes: rr.read, Total: opt.Size, Events: b.NumEvents()})
	}
	if b.NumEvents() == 0 {
		if rep.Problems.Skipped > 0 {
			return nil, rep, fmt.Errorf("%w: all %d rows were set aside; first: %v", ErrNoEvents, rep.Problems.Skipped, rep.Problems.First[0])
		}
		return nil, rep, ErrNoEvents
	}
	b.SetMeta(eventlog.Meta{Format: "csv"})
	l, err := b.Build(eventlog.BuildOptions{LiftCaseAttributes: true})
	if err != nil {
		return nil, rep, err
	}
	rep.Events = l.NumEvents()
	return l, rep, nil
}

// SeparatorOf reads a separator as people name it: "" (find it), "tab", or one character.
func SeparatorOf(s string) (byte, error) {
	switch s {
	case "":
		return 0, nil
	case "tab", "\t":
		return '\t', nil
	}
	if len(s) != 1 {
		return 0, fmt.Errorf("the separator must be one character or \"tab\", not %q", s)
	}
	return s[0], nil
}

// HeaderModeOf reads "yes", "no", or "auto" (or "") for whether the first row is a header.
func HeaderModeOf(s string) (HeaderMode, error) {
	switch s {
	case "", "auto":
		return HeaderAuto, nil
	case "yes":
		return HeaderPresent, nil
	case "no":
		return HeaderAbsent, nil
	}
	return HeaderAuto, fmt.Errorf("the header setting is yes, no or auto, not %q", s)
}

// blank reports whether a field is empty or only spaces and tabs. It looks at the first byte
// first, so a filled field costs one comparison (bytes.TrimSpace was 2% of the intake in wasm).
func blank(f []byte) bool {
	if len(f) == 0 {
		return true
	}
	if f[0] > ' ' {
		return false
	}
	for _, c := range f {
		if c != ' ' && c != '\t' && c != '\r' {
			return false
		}
	}
	return true
}

type columnIndexes struct {
	cas, act, time, start, res, life int
	attr                             []bool
}

func eventsPerRow(idx columnIndexes) int64 {
	if idx.start >= 0 {
		return 2
	}
	return 1
}

// mergeMapping takes the user's choices and fills what they left empty from the guess.
func mergeMapping(user, guess Mapping) Mapping {
	m := user
	if m.Case == "" {
		m.Case = guess.Case
	}
	if m.Activity == "" {
		m.Activity = guess.Activity
	}
	if m.Time == "" {
		m.Time = guess.Time
	}
	// Optional roles are guessed only when the user chose none of the required ones by hand: a
	// user who names the time column has said what the time is.
	if user.Case == "" && user.Activity == "" && user.Time == "" {
		if m.Start == "" {
			m.Start = guess.Start
		}
		if m.Resource == "" {
			m.Resource = guess.Resource
		}
		if m.Lifecycle == "" {
			m.Lifecycle = guess.Lifecycle
		}
	} else if m.Resource == "" {
		m.Resource = guess.Resource
	}
	return m
}

// resolve finds each role's column and checks the mapping is usable.
func resolve(cols []string, m Mapping) (columnIndexes, error) {
	idx := columnIndexes{attr: make([]bool, len(cols))}
	var err error
	find := func(role Role, name string, required bool) int {
		if err != nil {
			return -1
		}
		if name == "" {
			if required {
				err = fmt.Errorf("%w: no column was found for the %s; name one (columns: %s)", ErrRoles, role, list(cols))
			}
			return -1
		}
		j := columnIndex(cols, name)
		if j < 0 {
			err = fmt.Errorf("%w: the %s column %q is not in the file (columns: %s)", ErrRoles, role, name, list(cols))
		}
		return j
	}
	idx.cas = find(RoleCase, m.Case, true)
	idx.act = find(RoleActivity, m.Activity, true)
	idx.time = find(RoleTime, m.Time, true)
	idx.start = find(RoleStart, m.Start, false)
	idx.res = find(RoleResource, m.Resource, false)
	idx.life = find(RoleLifecycle, m.Lifecycle, false)
	if err != nil {
		return idx, err
	}
	if idx.start >= 0 && idx.life >= 0 {
		return idx, fmt.Errorf("%w: a start column and a lifecycle column cannot both be given", ErrRoles)
	}
	used := map[int]Role{}
	for _, p := range []struct {
		r Role
		j int
	}{{RoleCase, idx.cas}, {RoleActivity, idx.act}, {RoleTime, idx.time}, {RoleStart, idx.start}, {RoleResource, idx.res}, {RoleLifecycle, idx.life}} {
		if p.j < 0 {
			continue
		}
		if other, dup := used[p.j]; dup {
			return idx, fmt.Errorf("%w: column %q is given as both %s and %s", ErrRoles, cols[p.j], other, p.r)
		}
		used[p.j] = p.r
	}
	ignore := map[int]bool{}
	for _, name := range m.Ignore {
		if j := columnIndex(cols, name); j >= 0 {
			ignore[j] = true
		} else {
			return idx, fmt.Errorf("%w: the column to ignore %q is not in the file", ErrRoles, name)
		}
	}
	for j := range cols {
		_, role := used[j]
		idx.attr[j] = !role && !ignore[j]
	}
	return idx, nil
}

// list joins names for a message, capped at ten.
func list(names []string) string {
	var b bytes.Buffer
	for i, n := range names {
		if i == 10 {
			fmt.Fprintf(&b, " and %d more", len(names)-10)
			break
		}
		if i > 0 {
			b.WriteString(", ")
		}
		if r := []rune(n); len(r) > 40 {
			n = string(r[:37]) + "..."
		}
		fmt.Fprintf(&b, "%q", n)
	}
	return b.String()
}

// rowBatch gathers the interned fields (case id and attributes) of up to n rows, so that each
// column's values are interned together (see eventlog.Dict.InternBatch). On the 1M-event intake
// benchmark in random row order this took a run from about 615 ms to about 440 ms for the case
// ids alone.
type rowBatch struct {
	n           int
	caseCol     int
	attrCols    []int // builder handle per source column, -1 if not an attribute
	first, last []int
	cols        []batchColumn // [0] is the case id, then one per attribute column
	hashes      []uint64
	ids         []int32
}

// batchColumn holds one column's texts of a batch, back to back, with the rows they belong to.
type batchColumn struct {
	src, handle int
	text        []byte
	ends        []int
	rows        []int
}

func newRowBatch(n, caseCol int, attrCols []int) *rowBatch {
	rb := &rowBatch{n: n, caseCol: caseCol, attrCols: attrCols, hashes: make([]uint64, n), ids: make([]int32, n)}
	rb.cols = append(rb.cols, batchColumn{src: caseCol, handle: -1})
	for j, h := range attrCols {
		if h >= 0 {
			rb.cols = append(rb.cols, batchColumn{src: j, handle: h})
		}
	}
	return rb
}

func (rb *rowBatch) add(fs [][]byte, first, last int) {
	row := len(rb.first)
	rb.first = append(rb.first, first)
	rb.last = append(rb.last, last)
	for k := range rb.cols {
		c := &rb.cols[k]
		f := fs[c.src]
		if len(f) == 0 && k > 0 {
			continue // an empty attribute is a missing value
		}
		c.text = append(c.text, f...)
		c.ends = append(c.ends, len(c.text))
		c.rows = append(c.rows, row)
	}
}

func (rb *rowBatch) full() bool { return len(rb.first) >= rb.n }

// batchPipe runs the interning of full batches on a second goroutine while the reader parses
// the next rows: natively the two stages use both cores; in a browser (one thread) they take
// turns at each batch and cost the same as one loop.
type batchPipe struct {
	sink   *eventlog.CaseSink
	full   chan *rowBatch
	free   chan *rowBatch
	done   chan struct{}
	closed bool
}

func newBatchPipe(b *eventlog.Builder, caseCol int, attrCols []int) *batchPipe {
	p := &batchPipe{sink: b.NewCaseSink(), full: make(chan *rowBatch, 2), free: make(chan *rowBatch, 4), done: make(chan struct{})}
	for i := 0; i < 3; i++ {
		p.free <- newRowBatch(1024, caseCol, attrCols)
	}
	go func() {
		defer close(p.done)
		for rb := range p.full {
			rb.flush(p.sink)
			p.free <- rb
		}
	}()
	return p
}

func (p *batchPipe) next() *rowBatch { return <-p.free }

func (p *batchPipe) send(rb *rowBatch) { p.full <- rb }

// close waits for the interning goroutine and hands its cases to the Builder. It is safe to call
// twice (the second call, deferred for early returns, does nothing).
func (p *batchPipe) close() {
	if p.closed {
		return
	}
	p.closed = true
	close(p.full)
	<-p.done
	p.sink.Close()
}

func (rb *rowBatch) flush(b *eventlog.CaseSink) {
	for k := range rb.cols {
		c := &rb.cols[k]
		v := eventlog.Batch{Text: c.text, Ends: c.ends, Rows: c.rows, First: rb.first, Last: rb.last}
		m := len(c.ends)
		if k == 0 {
			b.SetCases(&v, rb.hashes[:m], rb.ids[:m])
		} else {
			b.SetEventValues(c.handle, &v, rb.hashes[:m], rb.ids[:m])
		}
		c.text, c.ends, c.rows = c.text[:0], c.ends[:0], c.rows[:0]
	}
	rb.first, rb.last = rb.first[:0], rb.last[:0]
}
