package discovery

import (
	"slices"

	"tracewright/core/eventlog"
)

// Log is what discovery needs of an event log: the distinct traces as activity ids with how
// often each occurs, and the activity names.
type Log struct {
	Names  []string
	Traces [][]int32
	Counts []int
}

// FromEventLog takes the variants of an event log (activity instances, in order).
func FromEventLog(l *eventlog.Log) Log {
	out := Log{Names: l.Activities.Names()}
	for _, v := range l.Variants {
		out.Traces = append(out.Traces, v.Activities)
		out.Counts = append(out.Counts, len(v.Cases))
	}
	return out
}

// Frequent keeps the most frequent distinct traces until they cover share of all traces (0 < share
// ≤ 1; 1 or more keeps everything), ties going to the trace seen first. Leaving out the rarest
// variants before discovery is common practice for logs whose noise scatters over many
// variants: on 100,000 generated events with 5% noise (random extra, missing and swapped events),
// IMf found the generator's process tree from the variants covering 90% of the cases and a
// model with most steps in parallel from all of them (TestFrequentRediscovers).
func (l Log) Frequent(share float64) Log {
	if share >= 1 || share <= 0 {
		return l
	}
	total := 0
	order := make([]int, len(l.Traces))
	for i := range order {
		order[i] = i
		total += l.Counts[i]
	}
	slices.SortStableFunc(order, func(a, b int) int { return l.Counts[b] - l.Counts[a] })
	out := Log{Names: l.Names}
	kept := 0
	for _, i := range order {
		if float64(kept) >= share*float64(total) {
			break
		}
		out.Traces = append(out.Traces, l.Traces[i])
		out.Counts = append(out.Counts, l.Counts[i])
		kept += l.Counts[i]
	}
	return out
}

// FromStrings builds a Log from traces of names (each trace once per occurrence), for tests and
// small examples.
func FromStrings(traces ...[]string) Log {
	var l Log
	ids := map[string]int32{}
	for _, t := range traces {
		tr := make([]int32, 0, len(t))
		for _, a := range t {
			id, ok := ids[a]
			if !ok {
				id = int32(len(l.Names))
				ids[a] = id
				l.Names = append(l.Names, a)
			}
			tr = append(tr, id)
		}
		l.add(tr, 1)
	}
	return l
}

// add appends a trace, merging it with an equal one already present.
func (l *Log) add(t []int32, n int) {
	for i, u := range l.Traces {
		if slices.Equal(t, u) {
			l.Counts[i] += n
			return
		}
	}
	l.Traces = append(l.Traces, t)
	l.Counts = append(l.Counts, n)
}

// builder collects sublog traces with their counts, merging equal traces through a map.
type builder struct {
	names []string
	idx   map[string]int
	log   Log
}

func newBuilder(names []string) *builder {
	return &builder{names: names, idx: map[string]int{}, log: Log{Names: names}}
}

func (b *builder) add(t []int32, n int) {
	key := make([]byte, 0, 4*len(t))
	for _, a := range t {
		key = append(key, byte(a), byte(a>>8), byte(a>>16), byte(a>>24))
	}
	if i, ok := b.idx[string(key)]; ok {
		b.log.Counts[i] += n
		return
	}
	b.idx[string(key)] = len(b.log.Traces)
	b.log.Traces = append(b.log.Traces, slices.Clone(t))
	b.log.Counts = append(b.log.Counts, n)
}

// Graph is the directly-follows graph of a log: how often one activity directly follows another
// within a trace, how often each starts and ends a trace, and how many traces are empty.
type Graph struct {
	Acts  []int32 // the activities that occur, ascending
	Edges map[[2]int32]int
	Start map[int32]int
	End   map[int32]int
	Empty int
	Total int // traces
}

// graphOf counts the directly-follows graph of a log.
func graphOf(l Log) *Graph {
	g := &Graph{Edges: map[[2]int32]int{}, Start: map[int32]int{}, End: map[int32]int{}}
	seen := map[int32]bool{}
	for i, t := range l.Traces {
		n := l.Counts[i]
		g.Total += n
		if len(t) == 0 {
			g.Empty += n
			continue
		}
		g.Start[t[0]] += n
		g.End[t[len(t)-1]] += n
		for k, a := range t {
			seen[a] = true
			if k > 0 {
				g.Edges[[2]int32{t[k-1], a}] += n
			}
		}
	}
	for a := range seen {
		g.Acts = append(g.Acts, a)
	}
	slices.Sort(g.Acts)
	return g
}

func (g *Graph) has(a, b int32) bool { return g.Edges[[2]int32{a, b}] > 0 }

// filtered returns the graph without edges rarer than f times the most frequent outgoing edge of
// their source, and without start and end activities rarer than f times the most frequent one
// (IMf's filter).
func (g *Graph) filtered(f float64) *Graph {
	out := &Graph{Acts: g.Acts, Edges: map[[2]int32]int{}, Start: map[int32]int{}, End: map[int32]int{}, Empty: g.Empty, Total: g.Total}
	maxOut := map[int32]int{}
	for e, n := range g.Edges {
		maxOut[e[0]] = max(maxOut[e[0]], n)
	}
	for e, n := range g.Edges {
		if float64(n) >= f*float64(maxOut[e[0]]) {
			out.Edges[e] = n
		}
	}
	keep := func(src, dst map[int32]int) {
		m := 0
		for _, n := range src {
			m = max(m, n)
		}
		for a, n := range src {
			if float64(n) >= f*float64(m) {
				dst[a] = n
			}
		}
	}
	keep(g.Start, out.Start)
	keep(g.End, out.End)
	return out
}
