package eventlog

import (
	"encoding/binary"
	"errors"
	"fmt"
	"math"
	"slices"
	"sort"
	"strings"
	"sync"

	"tracewright/core/timestamp"
)

// ErrTooManyLifecycles is returned when a source names more than 255 distinct lifecycle
// transitions; the standard model (IEEE 1849-2016) has twelve, so such a column is not lifecycle.
var ErrTooManyLifecycles = errors.New("more than 255 distinct lifecycle transitions")

// ErrTooLarge is returned when a log would exceed 2^31-1 events or cases, the range of the int32
// ids the columns use.
var ErrTooLarge = errors.New("more than 2,147,483,647 events or cases")

// Builder collects events in source order. Readers intern names through it and add one event at a
// time; Build then makes the Log. A Builder is not safe for concurrent use and is spent by Build.
type Builder struct {
	log *Log

	evCase []int32
	act    []int32
	time   []int64
	res    []int32
	life   []uint8
	row    []int32

	evCols   []*rawColumn
	caseCols []*rawColumn
	evIdx    map[string]int
	caseIdx  map[string]int
}

// rawColumn holds an attribute's values as interned text until Build types it.
type rawColumn struct {
	key      string
	level    Level
	declared Kind // the kind every value so far was declared with; KindUnknown for CSV
	mixed    bool // values were declared with different kinds: the column stays text
	ids      []int32
	dict     *Dict
}

// NewBuilder returns an empty Builder.
func NewBuilder() *Builder {
	l := &Log{Cases: NewDict(), Activities: NewDict(), Resources: NewDict(), Lifecycles: NewDict()}
	l.Lifecycles.Intern("")
	return &Builder{log: l, evIdx: map[string]int{}, caseIdx: map[string]int{}}
}

// Grow reserves room for n more events, so that a reader that knows the size of its input (a CSV
// file's bytes divided by a sampled row length) allocates the columns once. It covers the
// attribute columns made so far.
func (b *Builder) Grow(n int) {
	b.evCase = slices.Grow(b.evCase, n)
	b.act = slices.Grow(b.act, n)
	b.time = slices.Grow(b.time, n)
	b.res = slices.Grow(b.res, n)
	b.life = slices.Grow(b.life, n)
	b.row = slices.Grow(b.row, n)
	for _, c := range b.evCols {
		c.ids = slices.Grow(c.ids, n)
	}
}

// Case interns a case id.
func (b *Builder) Case(id []byte) int32 { return b.log.Cases.InternBytes(id) }

// Batch is one column's values from a run of rows, packed as a reader gathers them: value i is
// Text[Ends[i-1]:Ends[i]] (the first from 0) and belongs to row Rows[i], whose events are
// First[r]..Last[r] for r = Rows[i] (indexes that Add returned). A row without a value has no
// entry.
type Batch struct {
	Text        []byte
	Ends, Rows  []int
	First, Last []int
}

// SetEventValues sets column col of each value's events to the value, interning the values in
// one batch (see Dict.InternBatch). hashes and ids are scratch of len(v.Ends).
func (b *Builder) SetEventValues(col int, v *Batch, hashes []uint64, ids []int32) {
	c := b.evCols[col]
	c.dict.InternBatch(v.Text, v.Ends, hashes, ids)
	c.ids = setIDs(c.ids, v, ids)
}

// setIDs sets dst[ev] = ids[i] for the events of value i, growing dst with -1 (no value). It
// grows dst once per value, not once per event, so that the loop over the events only stores.
func setIDs(dst []int32, v *Batch, ids []int32) []int32 {
	for i, id := range ids[:len(v.Ends)] {
		r := v.Rows[i]
		first, last := v.First[r], v.Last[r]
		for len(dst) <= last {
			dst = append(dst, -1)
		}
		for ev := first; ev <= last; ev++ {
			dst[ev] = id
		}
	}
	return dst
}

// CaseSink lets another goroutine intern case ids and set attribute values while the reader
// goroutine goes on adding events: the Builder's case dictionary, attribute columns and the
// events' case column are then written through the sink alone, until Close hands the cases
// back. Between NewCaseSink and Close the reader must call only Add, Activity, Resource and
// Lifecycle; this split lets intake use two cores natively (see DEVELOPERS.md for figures).
type CaseSink struct {
	b     *Builder
	cases []int32
}

// NewCaseSink starts handing cases and attribute values to a sink.
func (b *Builder) NewCaseSink() *CaseSink {
	return &CaseSink{b: b, cases: make([]int32, 0, cap(b.evCase))}
}

// SetCases interns the batch's values (see Dict.InternBatch) as the cases of their events.
func (s *CaseSink) SetCases(v *Batch, hashes []uint64, ids []int32) {
	s.b.log.Cases.InternBatch(v.Text, v.Ends, hashes, ids)
	s.cases = setIDs(s.cases, v, ids)
}

// SetEventValues is Builder.SetEventValues through the sink.
func (s *CaseSink) SetEventValues(col int, v *Batch, hashes []uint64, ids []int32) {
	s.b.SetEventValues(col, v, hashes, ids)
}

// Close copies the sink's cases into the events; the reader's goroutine calls it once the sink's
// goroutine is done.
func (s *CaseSink) Close() {
	copy(s.b.evCase, s.cases)
}

// Activity interns an activity name.
func (b *Builder) Activity(name []byte) int32 { return b.log.Activities.InternBytes(name) }

// Resource interns a resource name; an empty name is no resource (-1).
func (b *Builder) Resource(name []byte) int32 {
	if len(name) == 0 {
		return -1
	}
	return b.log.Resources.InternBytes(name)
}

// Lifecycle interns a lifecycle transition; an empty one is 0 (none).
func (b *Builder) Lifecycle(name []byte) (uint8, error) {
	id := b.log.Lifecycles.InternBytes(name)
	if id > 255 {
		return 0, ErrTooManyLifecycles
	}
	return uint8(id), nil
}

// NumEvents is the number of events added so far.
func (b *Builder) NumEvents() int { return len(b.act) }

// Event is one event as a reader adds it: interned ids, the time in Unix microseconds (or
// NoTime), and the 1-based source line.
type Event struct {
	Case, Activity, Resource int32
	Time                     int64
	Life                     uint8
	Row                      int32
}

// Add appends an event and returns its index, which SetEventValue takes.
func (b *Builder) Add(e Event) (int, error) {
	if len(b.act) >= math.MaxInt32 {
		return 0, ErrTooLarge
	}
	b.evCase = append(b.evCase, e.Case)
	b.act = append(b.act, e.Activity)
	b.time = append(b.time, e.Time)
	b.res = append(b.res, e.Resource)
	b.life = append(b.life, e.Life)
	b.row = append(b.row, e.Row)
	return len(b.act) - 1, nil
}

// EventColumn returns the handle of the event attribute key, creating it. kind is the kind the
// source declares for the values that will be set through this handle (KindUnknown if none).
func (b *Builder) EventColumn(key string, kind Kind) int {
	return column(&b.evCols, b.evIdx, key, kind, EventLevel)
}

// CaseColumn is EventColumn for case attributes.
func (b *Builder) CaseColumn(key string, kind Kind) int {
	return column(&b.caseCols, b.caseIdx, key, kind, CaseLevel)
}

func column(cols *[]*rawColumn, idx map[string]int, key string, kind Kind, level Level) int {
	if i, ok := idx[key]; ok {
		c := (*cols)[i]
		if c.declared != kind {
			c.mixed = true
		}
		return i
	}
	idx[key] = len(*cols)
	*cols = append(*cols, &rawColumn{key: key, level: level, declared: kind, dict: NewDict()})
	return len(*cols) - 1
}

// SetEventValue sets event ev's value of column col to text (copied when new).
func (b *Builder) SetEventValue(col, ev int, text []byte) {
	b.evCols[col].set(ev, text)
}

// SetCaseValue sets case c's value of column col. A later value for the same case replaces an
// earlier one.
func (b *Builder) SetCaseValue(col int, c int32, text []byte) {
	b.caseCols[col].set(int(c), text)
}

// HasCaseValue reports whether case c has a value in column col (used to apply XES globals only
// where a trace gave none).
func (b *Builder) HasCaseValue(col int, c int32) bool {
	ids := b.caseCols[col].ids
	return int(c) < len(ids) && ids[c] >= 0
}

// HasEventValue reports whether event ev has a value in column col.
func (b *Builder) HasEventValue(col, ev int) bool {
	ids := b.evCols[col].ids
	return ev < len(ids) && ids[ev] >= 0
}

func (c *rawColumn) set(i int, text []byte) {
	for len(c.ids) <= i {
		c.ids = append(c.ids, -1)
	}
	c.ids[i] = c.dict.InternBytes(text)
}

// SetMeta records what the source said about the whole log.
func (b *Builder) SetMeta(m Meta) { b.log.Meta = m }

// BuildOptions steer the typing of attributes.
type BuildOptions struct {
	// LiftCaseAttributes moves an event attribute to the case level when it has the same value on
	// every event of every case (a CSV repeats a case's attributes on each of its rows), provided
	// some case has two events or more.
	LiftCaseAttributes bool
}

// Build groups, orders and types what was added and returns the Log (see the package doc).
func (b *Builder) Build(opt BuildOptions) (*Log, error) {
	l := b.log
	n := len(b.act)
	nc := l.Cases.Len()
	if nc >= math.MaxInt32 {
		return nil, ErrTooLarge
	}

	// Group by case: a counting sort keeps file order within each case.
	start := make([]int32, nc+1)
	for _, c := range b.evCase {
		start[c+1]++
	}
	for c := 0; c < nc; c++ {
		start[c+1] += start[c]
	}
	perm := make([]int32, n)
	next := slices.Clone(start[:nc])
	for i, c := range b.evCase {
		perm[next[c]] = int32(i)
		next[c]++
	}
	next = nil
	evCase := b.evCase // kept for constantPerCase
	b.evCase = nil

	// Order each case by time. An event without a timestamp sorts with the one before it. The
	// times are laid out in case order first, so that each case's are read side by side, not
	// picked from the whole column, and sorted along with the case's events.
	times := permute(b.time, perm)
	var keys []int64
	for c := 0; c < nc; c++ {
		seg, ts := perm[start[c]:start[c+1]], times[start[c]:start[c+1]]
		sorted := true
		last := NoTime
		for _, t := range ts {
			if t == NoTime {
				continue
			}
			if t < last {
				sorted = false
				break
			}
			last = t
		}
		if sorted {
			continue
		}
		untimed := slices.Contains(ts, NoTime)
		key := ts
		if untimed {
			keys = keys[:0]
			k := NoTime
			for _, t := range ts {
				if t != NoTime {
					k = t
				}
				keys = append(keys, k)
			}
			key = keys
		}
		if len(seg) <= 32 {
			// insertion sort: stable, and the fastest for the few events of a typical case
			for i := 1; i < len(seg); i++ {
				for j := i; j > 0 && key[j] < key[j-1]; j-- {
					key[j], key[j-1] = key[j-1], key[j]
					seg[j], seg[j-1] = seg[j-1], seg[j]
					if untimed {
						ts[j], ts[j-1] = ts[j-1], ts[j]
					}
				}
			}
		} else {
			if !untimed {
				key = append(keys[:0], ts...)
				keys = key
			}
			sort.Stable(byKey{seg, key})
			for i, e := range seg {
				ts[i] = b.time[e]
			}
		}
	}

	l.CaseStart = start
	l.Time = times
	// The other columns are independent: permute them side by side (natively on all cores).
	var wg sync.WaitGroup
	wg.Go(func() { l.Act = permute(b.act, perm) })
	wg.Go(func() { l.Res = permute(b.res, perm) })
	wg.Go(func() { l.Life = permute(b.life, perm) })
	wg.Go(func() { l.Row = permute(b.row, perm) })
	wg.Wait()
	b.act, b.time, b.res, b.life, b.row = nil, nil, nil, nil, nil
	for _, t := range l.Time {
		if t == NoTime {
			l.Untimed++
		}
	}

	l.pairInstances()
	l.groupVariants()

	for _, rc := range b.caseCols {
		l.CaseAttrs = append(l.CaseAttrs, rc.finish(nc, nil))
	}
	// Attribute columns are typed side by side too; the results keep the columns' order.
	lifted := make([]*Column, len(b.evCols))
	kept := make([]*Column, len(b.evCols))
	for i, rc := range b.evCols {
		wg.Go(func() {
			if opt.LiftCaseAttributes {
				if ids, ok := l.constantPerCase(rc, evCase); ok {
					cc := &rawColumn{key: rc.key, level: CaseLevel, declared: rc.declared, mixed: rc.mixed, ids: ids, dict: rc.dict}
					lifted[i] = cc.finish(nc, nil)
					return
				}
			}
			kept[i] = rc.finish(n, perm)
		})
	}
	wg.Wait()
	for i := range b.evCols {
		if lifted[i] != nil {
			l.CaseAttrs = append(l.CaseAttrs, lifted[i])
		} else {
			l.EventAttrs = append(l.EventAttrs, kept[i])
		}
	}
	b.log = nil
	return l, nil
}

// byKey sorts a case's event indices by their effective times, moving both slices together.
type byKey struct {
	ev  []int32
	key []int64
}

func (s byKey) Len() int           { return len(s.ev) }
func (s byKey) Less(i, j int) bool { return s.key[i] < s.key[j] }
func (s byKey) Swap(i, j int) {
	s.ev[i], s.ev[j] = s.ev[j], s.ev[i]
	s.key[i], s.key[j] = s.key[j], s.key[i]
}

func permute[T any](src []T, perm []int32) []T {
	out := make([]T, len(perm))
	for i, p := range perm {
		out[i] = src[p]
	}
	return out
}

// constantPerCase reports whether rc holds one value per case, and returns that value per case.
// It reads the events in the Builder's order, evCase giving each one's case: straight through
// the column rather than case by case through the permutation, which would jump about the column
// (in wasm that walk took five times as long as natively).
func (l *Log) constantPerCase(rc *rawColumn, evCase []int32) ([]int32, bool) {
	const unset = -2 // values are ids or -1 (none)
	ids := make([]int32, l.NumCases())
	for c := range ids {
		ids[c] = unset
	}
	for e, c := range evCase {
		v := int32(-1)
		if e < len(rc.ids) {
			v = rc.ids[e]
		}
		switch ids[c] {
		case v:
		case unset:
			ids[c] = v
		default:
			return nil, false
		}
	}
	multi := false
	for c := range ids {
		if ids[c] == unset {
			ids[c] = -1 // a case without events
		}
		if l.CaseStart[c+1]-l.CaseStart[c] > 1 {
			multi = true
		}
	}
	return ids, multi
}

// finish types the column and lays its values out in the Log's order (perm maps the Log's
// order to the Builder's; nil keeps the order).
func (rc *rawColumn) finish(size int, perm []int32) *Column {
	ids := make([]int32, size)
	for i := range ids {
		src := i
		if perm != nil {
			src = int(perm[i])
		}
		if src < len(rc.ids) {
			ids[i] = rc.ids[src]
		} else {
			ids[i] = -1
		}
	}
	col := &Column{Key: rc.key, Level: rc.level, Dict: rc.dict, Kind: KindString}
	kind := rc.declared
	if rc.mixed {
		kind = KindString
	}
	names := rc.dict.Names()
	parse := ParseNumber
	switch kind {
	case KindUnknown:
		var comma bool
		if kind, comma = inferKind(names); comma {
			parse = parseDecimalComma
		}
	case KindNumber:
		if !all(names, func(s string) bool { _, ok := ParseNumber(s); return ok }) {
			kind = KindString
		}
	case KindBool:
		if !all(names, func(s string) bool { _, ok := ParseBool(s); return ok }) {
			kind = KindString
		}
	case KindTime:
		if !all(names, func(s string) bool { _, ok := xsDateTime.ParseString(s); return ok }) {
			kind = KindString
		}
	}
	col.Kind = kind
	switch kind {
	case KindString, KindNested:
		col.Str = ids
	case KindNumber:
		table := make([]float64, len(names))
		for i, s := range names {
			table[i], _ = parse(s)
		}
		col.Num = make([]float64, size)
		for i, id := range ids {
			if id < 0 {
				col.Num[i] = math.NaN()
			} else {
				col.Num[i] = table[id]
			}
		}
		col.Raw = ids
	case KindBool:
		col.Bool = make([]int8, size)
		for i, id := range ids {
			col.Bool[i] = -1
			if id >= 0 {
				if v, _ := ParseBool(names[id]); v {
					col.Bool[i] = 1
				} else {
					col.Bool[i] = 0
				}
			}
		}
		col.Raw = ids
	case KindTime:
		f := xsDateTime
		if rc.declared == KindUnknown {
			f = timestamp.Infer(names).Format
		}
		table := make([]int64, len(names))
		for i, s := range names {
			table[i], _ = f.ParseString(s)
		}
		col.Time = make([]int64, size)
		for i, id := range ids {
			if id < 0 {
				col.Time[i] = NoTime
			} else {
				col.Time[i] = table[id]
			}
		}
		col.Raw = ids
	}
	return col
}

var xsDateTime = mustFormat("YYYY-MM-DDThh:mm[:ss[.f]][Z]")

func mustFormat(layout string) *timestamp.Format {
	f, err := timestamp.ParseFormat(layout)
	if err != nil {
		panic(fmt.Sprintf("eventlog: %v", err))
	}
	return f
}

func all(names []string, ok func(string) bool) bool {
	for _, s := range names {
		if !ok(s) {
			return false
		}
	}
	return true
}

// inferKind types a column read without declared types from its distinct values: number when
// every value is a number and none is written with a leading zero (an account or postal code is
// an identifier, not a quantity), bool for true/false, time when one timestamp layout reads every
// value, text otherwise. Numbers may have a decimal comma (comma is then true) when every value is
// a whole number or digits, one comma, digits, and some value has other than three digits after
// its comma: 1,250 alone could be a thousand and a quarter or one and a quarter, and stays text.
func inferKind(names []string) (kind Kind, comma bool) {
	if len(names) == 0 {
		return KindString, false
	}
	noLeadingZero := func(s string, point byte) bool {
		d := strings.TrimLeft(s, "+-")
		return !(len(d) > 1 && d[0] == '0' && d[1] != point)
	}
	number := all(names, func(s string) bool {
		if _, ok := ParseNumber(s); !ok {
			return false
		}
		return noLeadingZero(s, '.')
	})
	if number {
		return KindNumber, false
	}
	decided := false
	if all(names, func(s string) bool {
		if _, ok := parseDecimalComma(s); !ok || !noLeadingZero(s, ',') {
			return false
		}
		if i := strings.IndexByte(s, ','); i >= 0 && len(s)-i-1 != 3 {
			decided = true
		}
		return true
	}) && decided {
		return KindNumber, true
	}
	if all(names, func(s string) bool {
		switch strings.ToLower(s) {
		case "true", "false":
			return true
		}
		return false
	}) {
		return KindBool, false
	}
	if inf := timestamp.Infer(names); inf.Format != nil && inf.Parsed == inf.Total {
		return KindTime, false
	}
	return KindString, false
}

// lifecycle roles, after the standard transactional model (IEEE 1849-2016, lifecycle extension).
const (
	roleOwn    = iota // forms an instance of its own
	roleStart         // opens an instance
	roleClose         // closes the oldest open instance of its activity, or stands alone
	roleAttach        // belongs to an instance but does not form one
)

func lifecycleRole(s string) int {
	switch strings.ToLower(s) {
	case "start":
		return roleStart
	case "complete", "ate_abort", "pi_abort", "autoskip", "manualskip", "withdraw":
		return roleClose
	case "schedule", "assign", "reassign", "suspend", "resume":
		return roleAttach
	}
	return roleOwn
}

// pairInstances pairs lifecycle events into activity instances. Within a case, a start opens an
// instance of its activity; a complete (or an abort, skip or withdraw) closes the oldest open
// instance of the same activity (first in, first out), or forms an instance alone when none is
// open; schedule, assign, reassign, suspend and resume events belong to the work but form no
// instance; an event with no or an unknown transition is an instance of its own. A start never
// closed stays an instance that has begun and not ended (InstLast = InstFirst). Instances are
// ordered by their first event, so a trace lists activities in the order they began.
func (l *Log) pairInstances() {
	roles := make([]int, l.Lifecycles.Len())
	identity := true
	for i, s := range l.Lifecycles.Names() {
		roles[i] = lifecycleRole(s)
	}
	for _, lc := range l.Life {
		if r := roles[lc]; r == roleStart || r == roleAttach {
			identity = false
			break
		}
	}
	nc := l.NumCases()
	if identity {
		l.InstStart = l.CaseStart
		l.InstAct = l.Act
		return
	}
	l.InstStart = make([]int32, nc+1)
	type open struct{ act, inst int32 }
	var pending []open
	for c := 0; c < nc; c++ {
		pending = pending[:0]
		from, to := l.Events(c)
		for e := from; e < to; e++ {
			a := l.Act[e]
			switch roles[l.Life[e]] {
			case roleAttach:
				continue
			case roleClose:
				found := -1
				for k, p := range pending {
					if p.act == a {
						found = k
						break
					}
				}
				if found >= 0 {
					l.InstLast[pending[found].inst] = int32(e)
					pending = slices.Delete(pending, found, found+1)
					continue
				}
			case roleStart:
				pending = append(pending, open{a, int32(len(l.InstAct))})
			}
			l.InstAct = append(l.InstAct, a)
			l.InstFirst = append(l.InstFirst, int32(e))
			l.InstLast = append(l.InstLast, int32(e))
		}
		l.InstStart[c+1] = int32(len(l.InstAct))
	}
}

// groupVariants finds the distinct traces. Keys are the traces' bytes, so a lookup allocates
// nothing and only a new variant copies its key.
func (l *Log) groupVariants() {
	nc := l.NumCases()
	idx := map[string]int32{}
	l.CaseVariant = make([]int32, nc)
	var key []byte
	for c := 0; c < nc; c++ {
		tr := l.Trace(c)
		key = key[:0]
		for _, a := range tr {
			key = binary.LittleEndian.AppendUint32(key, uint32(a))
		}
		v, ok := idx[string(key)]
		if !ok {
			v = int32(len(l.Variants))
			idx[string(key)] = v
			l.Variants = append(l.Variants, Variant{Activities: tr})
		}
		l.Variants[v].Cases = append(l.Variants[v].Cases, int32(c))
		l.CaseVariant[c] = v
	}
	order := make([]int32, len(l.Variants))
	for i := range order {
		order[i] = int32(i)
	}
	// Most cases first; ties by the first case, so the order depends only on the input.
	slices.SortStableFunc(order, func(a, b int32) int {
		return len(l.Variants[b].Cases) - len(l.Variants[a].Cases)
	})
	rank := make([]int32, len(order))
	sorted := make([]Variant, len(order))
	for r, v := range order {
		rank[v] = int32(r)
		sorted[r] = l.Variants[v]
	}
	l.Variants = sorted
	for c, v := range l.CaseVariant {
		l.CaseVariant[c] = rank[v]
	}
}

// HasCase reports whether a case id was interned already.
func (b *Builder) HasCase(id string) bool {
	_, ok := b.log.Cases.Lookup(id)
	return ok
}
