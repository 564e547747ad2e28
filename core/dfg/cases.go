package dfg

import (
	"cmp"
	"slices"

	"tracewright/core/eventlog"
)

// CaseRef names a case with the figure that ranked it.
type CaseRef struct {
	Case    string  `json:"case"`
	Seconds float64 `json:"seconds"`
}

// TopCases lists up to k cases behind a node or an edge of the graph Build makes with opt: for an
// edge (from → to, activity ids, -1 for start, -2 for end) the cases that waited longest on it;
// for a node (to < -2, from the activity) the cases whose instances of it took longest. Cost:
// one pass over the log's instances.
func TopCases(l *eventlog.Log, opt Options, from, to int32, k int) []CaseRef {
	if opt.Activities <= 0 || opt.Activities > 1 {
		opt.Activities = 1
	}
	inst := make([]int, l.Activities.Len())
	for _, a := range l.InstAct {
		inst[a]++
	}
	keep := keepActivities(inst, opt.Activities)
	var out []CaseRef
	for c := 0; c < l.NumCases(); c++ {
		best, found := 0.0, false
		prev, prevEnd := int32(-1), eventlog.NoTime
		lo, hi := int(l.InstStart[c]), int(l.InstStart[c+1])
		for i := lo; i < hi; i++ {
			a := l.InstAct[i]
			if !keep[a] {
				continue
			}
			first, last := l.InstanceEvents(i)
			if to < -2 { // a node: its own duration
				if a == from {
					d := secs(l.Time[first], l.Time[last])
					if !found || d > best {
						best, found = d, true
					}
				}
			} else if prev == from && a == to {
				d := 0.0
				if prev >= 0 {
					d = secs(prevEnd, l.Time[first])
				}
				if !found || d > best {
					best, found = d, true
				}
			}
			prev, prevEnd = a, l.Time[last]
		}
		if to == -2 && prev == from && prev != -1 {
			best, found = 0, true
		}
		if found {
			out = append(out, CaseRef{Case: l.CaseID(c), Seconds: best})
		}
	}
	slices.SortStableFunc(out, func(a, b CaseRef) int { return cmp.Compare(b.Seconds, a.Seconds) })
	if len(out) > k {
		out = out[:k]
	}
	return out
}

func secs(a, b int64) float64 {
	if a == eventlog.NoTime || b == eventlog.NoTime {
		return 0
	}
	return float64(b-a) / 1e6
}
