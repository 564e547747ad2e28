// Package overview computes the first figures a user sees of a log: how many cases, events,
// activities and variants; where cases start and end; the time span; how long cases take and
// how many events they hold; how often each activity and resource occurs.
//
// All counts come from one pass over the columns (O(events + cases), memory O(cases) for the
// distributions). Case durations run from a case's first to its last timestamp, in seconds; a
// case with fewer than two timed events has duration 0, and a case with none is left out of the
// duration figures (Untimed cases).
package overview

import (
	"slices"

	"tracewright/core/eventlog"
	"tracewright/core/summary"
	"tracewright/core/timestamp"
)

// Overview is the log at a glance. Its JSON keys are the command-line tool's `inspect --json`
// output and the page's figures; they are a documented interface (DEVELOPERS.md).
type Overview struct {
	Cases      int `json:"cases"`
	Events     int `json:"events"`
	Activities int `json:"activities"`
	Variants   int `json:"variants"`
	Resources  int `json:"resources"`
	// Instances counts activity instances when lifecycle start and complete events were paired;
	// it equals Events otherwise.
	Instances int `json:"activity_instances"`

	First string `json:"first,omitempty"` // earliest timestamp, RFC 3339
	Last  string `json:"last,omitempty"`  // latest timestamp
	// SpanSeconds is Last - First in seconds.
	SpanSeconds float64 `json:"span_seconds"`

	StartActivities []Count `json:"start_activities"`
	EndActivities   []Count `json:"end_activities"`

	CaseDuration     summary.Dist  `json:"case_duration_seconds"`
	DurationBins     []summary.Bin `json:"case_duration_histogram"`
	EventsPerCase    summary.Dist  `json:"events_per_case"`
	UntimedCases     int           `json:"untimed_cases,omitempty"`
	UntimedEvents    int           `json:"untimed_events,omitempty"`
	ActivityCounts   []Count       `json:"activity_counts"`
	ResourceCounts   []Count       `json:"resource_counts,omitempty"`
	TopVariants      []VariantRow  `json:"top_variants"`
	CaseAttributes   []Attribute   `json:"case_attributes,omitempty"`
	EventAttributes  []Attribute   `json:"event_attributes,omitempty"`
	VariantsCoverage float64       `json:"top_variants_share"` // share of cases in TopVariants
}

// Count is how often a name occurs: in Events events and in Cases distinct cases.
type Count struct {
	Name   string `json:"name"`
	Events int    `json:"events"`
	Cases  int    `json:"cases"`
	// Instances counts activity instances (a start and its complete are one); it is set for
	// activities only.
	Instances int `json:"instances,omitempty"`
}

// VariantRow is one variant: its activities, its cases and their share of all cases.
type VariantRow struct {
	Activities []string `json:"activities"`
	Cases      int      `json:"cases"`
	Share      float64  `json:"share"`
}

// Attribute names an attribute and its kind.
type Attribute struct {
	Key  string        `json:"key"`
	Kind eventlog.Kind `json:"kind"`
}

// Options bound the lists an Overview carries.
type Options struct {
	TopVariants int `json:"top_variants"` // default 10
	Bins        int `json:"bins"`         // histogram bins, default 20
}

// Of computes the overview of l.
func Of(l *eventlog.Log, opt Options) *Overview {
	if opt.TopVariants <= 0 {
		opt.TopVariants = 10
	}
	if opt.Bins <= 0 {
		opt.Bins = 20
	}
	nc := l.NumCases()
	o := &Overview{
		Cases: nc, Events: l.NumEvents(), Activities: l.Activities.Len(), Variants: len(l.Variants),
		Resources: l.Resources.Len(), Instances: l.NumInstances(), UntimedEvents: l.Untimed,
	}
	nAct := l.Activities.Len()
	actEvents := make([]int, nAct)
	actCases := make([]int, nAct)
	lastCase := make([]int32, nAct)
	for i := range lastCase {
		lastCase[i] = -1
	}
	resEvents := make([]int, l.Resources.Len())
	resCases := make([]int, l.Resources.Len())
	resLast := make([]int32, l.Resources.Len())
	for i := range resLast {
		resLast[i] = -1
	}
	startCount := make([]int, nAct)
	endCount := make([]int, nAct)
	durations := make([]float64, 0, nc)
	sizes := make([]float64, 0, nc)
	first, last := eventlog.NoTime, eventlog.NoTime
	for c := 0; c < nc; c++ {
		from, to := l.Events(c)
		sizes = append(sizes, float64(to-from))
		for e := from; e < to; e++ {
			a := l.Act[e]
			actEvents[a]++
			if lastCase[a] != int32(c) {
				lastCase[a] = int32(c)
				actCases[a]++
			}
			if r := l.Res[e]; r >= 0 {
				resEvents[r]++
				if resLast[r] != int32(c) {
					resLast[r] = int32(c)
					resCases[r]++
				}
			}
		}
		if tr := l.Trace(c); len(tr) > 0 {
			startCount[tr[0]]++
			endCount[tr[len(tr)-1]]++
		}
		f, la, ok := l.CaseSpan(c)
		if !ok {
			o.UntimedCases++
			continue
		}
		durations = append(durations, float64(la-f)/1e6)
		if first == eventlog.NoTime || f < first {
			first = f
		}
		if last == eventlog.NoTime || la > last {
			last = la
		}
	}
	if first != eventlog.NoTime {
		o.First, o.Last = timestamp.FormatRFC3339(first), timestamp.FormatRFC3339(last)
		o.SpanSeconds = float64(last-first) / 1e6
	}
	o.CaseDuration = summary.Of(durations) // sorts durations
	o.DurationBins = summary.Histogram(durations, opt.Bins)
	o.EventsPerCase = summary.Of(sizes)
	names := l.Activities.Names()
	o.ActivityCounts = counts(names, actEvents, actCases)
	inst := make([]int, nAct)
	for _, a := range l.InstAct {
		inst[a]++
	}
	for i := range o.ActivityCounts {
		id, _ := l.Activities.Lookup(o.ActivityCounts[i].Name)
		o.ActivityCounts[i].Instances = inst[id]
	}
	o.StartActivities = counts(names, startCount, startCount)
	o.EndActivities = counts(names, endCount, endCount)
	o.ResourceCounts = counts(l.Resources.Names(), resEvents, resCases)
	covered := 0
	for i, v := range l.Variants {
		if i == opt.TopVariants {
			break
		}
		row := VariantRow{Cases: len(v.Cases), Share: float64(len(v.Cases)) / float64(max(1, nc))}
		for _, a := range v.Activities {
			row.Activities = append(row.Activities, names[a])
		}
		covered += len(v.Cases)
		o.TopVariants = append(o.TopVariants, row)
	}
	o.VariantsCoverage = float64(covered) / float64(max(1, nc))
	for _, c := range l.CaseAttrs {
		o.CaseAttributes = append(o.CaseAttributes, Attribute{c.Key, c.Kind})
	}
	for _, c := range l.EventAttrs {
		o.EventAttributes = append(o.EventAttributes, Attribute{c.Key, c.Kind})
	}
	return o
}

// counts lists the names with a non-zero count, most events first, ties by name.
func counts(names []string, events, cases []int) []Count {
	out := []Count{}
	for i, n := range events {
		if n > 0 {
			out = append(out, Count{Name: names[i], Events: n, Cases: cases[i]})
		}
	}
	slices.SortStableFunc(out, func(a, b Count) int {
		if a.Events != b.Events {
			return b.Events - a.Events
		}
		if a.Name < b.Name {
			return -1
		}
		if a.Name > b.Name {
			return 1
		}
		return 0
	})
	return out
}
