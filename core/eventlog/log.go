package eventlog

import "tracewright/core/timestamp"

// NoTime marks an event without a timestamp (allowed in XES, where a trace's order is its file
// order). Such an event keeps its place after the event before it when a case is ordered.
const NoTime = timestamp.NoTime

// Log is an event log in columns. Build makes it; after that it is read-only.
//
// Events are stored case after case (case c owns events CaseStart[c] to CaseStart[c+1]-1), each
// case ordered by time. All event columns have one entry per event; -1 in Res means no resource,
// 0 in Life means no lifecycle transition.
type Log struct {
	Cases      *Dict // case ids, in order of first appearance in the source
	Activities *Dict
	Resources  *Dict
	// Lifecycles holds the lifecycle transitions (IEEE 1849-2016, lifecycle extension); id 0 is
	// the empty string, meaning none was given.
	Lifecycles *Dict

	CaseStart []int32
	Act       []int32
	Time      []int64 // Unix microseconds, or NoTime
	Res       []int32
	Life      []uint8
	// Row is the source position of each event: the 1-based line of a CSV record's start, or of
	// an XES <event> element, so that any analysis can point back into the file.
	Row []int32

	// Activity instances pair a lifecycle start with its complete (see pairInstances). When the
	// log has no start events, instances and events coincide and InstFirst is nil.
	InstStart []int32 // per case, like CaseStart
	InstAct   []int32
	InstFirst []int32 // event index of the instance's first event
	InstLast  []int32 // event index of its last event

	Variants    []Variant // most frequent first
	CaseVariant []int32

	CaseAttrs  []*Column
	EventAttrs []*Column

	// Untimed counts events without a timestamp.
	Untimed int
	// Meta holds log-level facts of the source that a writer needs to reproduce it (XES
	// extensions, globals, classifiers, log attributes). Analyses ignore it.
	Meta Meta
}

// Variant is one distinct sequence of activities (over activity instances) and the cases that
// follow it, in case order.
type Variant struct {
	Activities []int32
	Cases      []int32
}

// Meta is what a source said about the log as a whole.
type Meta struct {
	Format      string       // "csv" or "xes"
	Extensions  []Extension  // XES <extension> elements, in file order
	Classifiers []Classifier // XES <classifier> elements
	Classifier  string       // the classifier that gave the activity names ("" for concept:name)
	Globals     []Global     // XES <global> defaults
	Attrs       []Nested     // XES log-level attributes, as typed trees
}

// Extension is an XES extension declaration.
type Extension struct{ Name, Prefix, URI string }

// Classifier is an XES classifier: the attribute keys whose values, joined, name an event's class.
type Classifier struct {
	Name string
	Keys []string
}

// Global is an XES global attribute: a default for every trace or event that lacks it.
type Global struct {
	Level Level
	Attr  Nested
}

// NumCases is the number of cases.
func (l *Log) NumCases() int { return len(l.CaseStart) - 1 }

// NumEvents is the number of events.
func (l *Log) NumEvents() int { return len(l.Act) }

// NumInstances is the number of activity instances.
func (l *Log) NumInstances() int { return len(l.InstAct) }

// Events returns the index range [from, to) of case c's events.
func (l *Log) Events(c int) (from, to int) { return int(l.CaseStart[c]), int(l.CaseStart[c+1]) }

// Trace returns the activities of case c's instances in order. The slice is shared.
func (l *Log) Trace(c int) []int32 { return l.InstAct[l.InstStart[c]:l.InstStart[c+1]] }

// CaseID returns the id of case c as written in the source.
func (l *Log) CaseID(c int) string { return l.Cases.Name(int32(c)) }

// InstanceEvents returns the first and last event index of instance i.
func (l *Log) InstanceEvents(i int) (first, last int) {
	if l.InstFirst == nil {
		return i, i
	}
	return int(l.InstFirst[i]), int(l.InstLast[i])
}

// Timed reports whether any event has a timestamp.
func (l *Log) Timed() bool { return l.Untimed < len(l.Act) }

// CaseSpan returns the first and last timestamp of case c, and false when it has none.
func (l *Log) CaseSpan(c int) (first, last int64, ok bool) {
	from, to := l.Events(c)
	first, last = NoTime, NoTime
	for i := from; i < to; i++ {
		t := l.Time[i]
		if t == NoTime {
			continue
		}
		if first == NoTime {
			first = t
		}
		last = t // events are time-ordered, so the last timed one is the latest
	}
	return first, last, first != NoTime
}

// EventAttr returns the event attribute column with the key, or nil.
func (l *Log) EventAttr(key string) *Column {
	for _, c := range l.EventAttrs {
		if c.Key == key {
			return c
		}
	}
	return nil
}

// CaseAttr returns the case attribute column with the key, or nil.
func (l *Log) CaseAttr(key string) *Column {
	for _, c := range l.CaseAttrs {
		if c.Key == key {
			return c
		}
	}
	return nil
}

// MemoryBytes estimates what the Log holds: its columns, exactly, and its dictionaries, estimated.
// The first figure is the per-event cost the benchmarks report.
func (l *Log) MemoryBytes() (columns, dicts int) {
	columns = 4*len(l.CaseStart) + 4*len(l.Act) + 8*len(l.Time) + 4*len(l.Res) + len(l.Life) + 4*len(l.Row)
	columns += 4*len(l.InstStart) + 4*len(l.InstFirst) + 4*len(l.InstLast)
	if l.InstFirst != nil {
		columns += 4 * len(l.InstAct) // otherwise InstAct shares Act's array
	}
	columns += 4 * len(l.CaseVariant)
	for _, v := range l.Variants {
		columns += 4*len(v.Activities) + 4*len(v.Cases) + 48
	}
	for _, set := range [][]*Column{l.CaseAttrs, l.EventAttrs} {
		for _, c := range set {
			columns += 4*len(c.Str) + 8*len(c.Num) + 8*len(c.Time) + len(c.Bool) + 4*len(c.Raw)
			dicts += c.Dict.size()
		}
	}
	dicts += l.Cases.size() + l.Activities.size() + l.Resources.size() + l.Lifecycles.size()
	return columns, dicts
}
