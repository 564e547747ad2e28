package discovery

import (
	"slices"

	"tracewright/core/tree"
)

// Options choose the Inductive Miner's variant.
type Options struct {
	// Noise is IMf's threshold f in [0, 1]; 0 is the base algorithm IM.
	Noise float64
}

// InductiveMiner returns a process tree of the log by IM (Noise 0) or IMf (Noise > 0). Its cost
// is O(d·(n·(n+e) + m)) for recursion depth d (at most the number of activities n), e
// directly-follows edges and m events in the distinct traces.
func InductiveMiner(l Log, opt Options) *tree.Node {
	m := &miner{names: l.Names, noise: opt.Noise}
	return m.mine(l).Canonical()
}

type miner struct {
	names []string
	noise float64
}

func (m *miner) leaf(a int32) *tree.Node { return tree.Leaf(m.names[a]) }

func (m *miner) mine(l Log) *tree.Node {
	g := graphOf(l)
	// base cases: only empty traces; a single activity once per trace
	if len(g.Acts) == 0 {
		return tree.Silent()
	}
	if g.Empty > 0 {
		if m.noise > 0 && float64(g.Empty) < m.noise*float64(g.Total) {
			return m.mine(withoutEmpty(l))
		}
		return tree.New(tree.Xor, tree.Silent(), m.mine(withoutEmpty(l)))
	}
	if len(g.Acts) == 1 {
		if len(g.Edges) == 0 {
			return m.leaf(g.Acts[0])
		}
		// IMf's filtered base case: the activity repeats in a few traces only, rarer than f
		if m.noise > 0 {
			once := 0
			for i, t := range l.Traces {
				if len(t) == 1 {
					once += l.Counts[i]
				}
			}
			if float64(g.Total-once) < m.noise*float64(g.Total) {
				return m.leaf(g.Acts[0])
			}
		}
	}
	if c, ok := findCut(g); ok {
		return m.apply(l, c)
	}
	if m.noise > 0 {
		if c, ok := findCut(g.filtered(m.noise)); ok {
			return m.apply(l, c)
		}
	}
	return m.fallThrough(l, g)
}

func withoutEmpty(l Log) Log {
	out := Log{Names: l.Names}
	for i, t := range l.Traces {
		if len(t) > 0 {
			out.Traces = append(out.Traces, t)
			out.Counts = append(out.Counts, l.Counts[i])
		}
	}
	return out
}

// apply splits the log by the cut and mines each part.
func (m *miner) apply(l Log, c cut) *tree.Node {
	subs := split(l, c)
	var kids []*tree.Node
	for _, s := range subs {
		kids = append(kids, m.mine(s))
	}
	if c.op == tree.Loop {
		return tree.New(tree.Loop, kids[0], kids[1])
	}
	return tree.New(c.op, kids...)
}

// fallThrough applies, in the paper's order, the first fall-through that fits: an activity that
// occurs once in every trace runs in parallel with the rest; an activity whose removal leaves a
// cut runs in parallel with the rest; traces that end and start again are iterations of a loop
// (strict τ loop, then τ loop at every start activity); and, last, the flower model.
func (m *miner) fallThrough(l Log, g *Graph) *tree.Node {
	if len(g.Acts) > 1 {
		for _, a := range g.Acts {
			if onceInEvery(l, a) {
				return tree.New(tree.And, m.leaf(a), m.mine(removeActivity(l, a)))
			}
		}
		for _, a := range g.Acts {
			rest := removeActivity(l, a)
			if _, ok := findCut(graphOf(rest)); ok && graphOf(rest).Empty == 0 {
				return tree.New(tree.And, m.leaf(a), m.mine(rest))
			}
		}
	}
	if sub, ok := splitAt(l, func(prev, next int32) bool { return g.End[prev] > 0 && g.Start[next] > 0 }); ok {
		return tree.New(tree.Loop, m.mine(sub), tree.Silent())
	}
	if sub, ok := splitAt(l, func(_, next int32) bool { return g.Start[next] > 0 }); ok {
		return tree.New(tree.Loop, m.mine(sub), tree.Silent())
	}
	var leaves []*tree.Node
	for _, a := range g.Acts {
		leaves = append(leaves, m.leaf(a))
	}
	var redo *tree.Node
	if len(leaves) == 1 {
		redo = leaves[0]
	} else {
		redo = tree.New(tree.Xor, leaves...)
	}
	return tree.New(tree.Loop, tree.Silent(), redo)
}

func onceInEvery(l Log, a int32) bool {
	for _, t := range l.Traces {
		n := 0
		for _, x := range t {
			if x == a {
				n++
			}
		}
		if n != 1 {
			return false
		}
	}
	return true
}

func removeActivity(l Log, a int32) Log {
	b := newBuilder(l.Names)
	for i, t := range l.Traces {
		var out []int32
		for _, x := range t {
			if x != a {
				out = append(out, x)
			}
		}
		b.add(out, l.Counts[i])
	}
	return b.log
}

// splitAt cuts traces between two events where cut(prev, next) holds; ok is false if no trace
// was cut.
func splitAt(l Log, cutHere func(prev, next int32) bool) (Log, bool) {
	b := newBuilder(l.Names)
	did := false
	for i, t := range l.Traces {
		start := 0
		for k := 1; k < len(t); k++ {
			if cutHere(t[k-1], t[k]) {
				b.add(t[start:k], l.Counts[i])
				start = k
				did = true
			}
		}
		b.add(t[start:], l.Counts[i])
	}
	return b.log, did
}

// split divides the log into one sublog per part of the cut. Events that fit no part (only
// under IMf's filtered cuts) are removed, as few as possible.
func split(l Log, c cut) []Log {
	part := map[int32]int{}
	for i, p := range c.parts {
		for _, a := range p {
			part[a] = i
		}
	}
	subs := make([]*builder, len(c.parts))
	for i := range subs {
		subs[i] = newBuilder(l.Names)
	}
	for ti, t := range l.Traces {
		n := l.Counts[ti]
		switch c.op {
		case tree.Xor:
			// the part with most of the trace's events takes it
			count := make([]int, len(c.parts))
			for _, a := range t {
				if p, ok := part[a]; ok {
					count[p]++
				}
			}
			best := 0
			for i := range count {
				if count[i] > count[best] {
					best = i
				}
			}
			subs[best].add(keep(t, part, best), n)
		case tree.And:
			for i := range c.parts {
				subs[i].add(keep(t, part, i), n)
			}
		case tree.Seq:
			for i, seg := range seqSplit(t, part, len(c.parts)) {
				subs[i].add(seg, n)
			}
		case tree.Loop:
			body, redo := loopSplit(t, part)
			for _, s := range body {
				subs[0].add(s, n)
			}
			for _, s := range redo {
				subs[1].add(s, n)
			}
		}
	}
	out := make([]Log, len(subs))
	for i, s := range subs {
		out[i] = s.log
	}
	return out
}

func keep(t []int32, part map[int32]int, p int) []int32 {
	var out []int32
	for _, a := range t {
		if q, ok := part[a]; ok && q == p {
			out = append(out, a)
		}
	}
	return out
}

// seqSplit cuts a trace into k consecutive segments, the i-th keeping the events of part i,
// choosing the cut points that remove the fewest events (a dynamic programme over positions; for
// a trace that fits the cut nothing is removed).
func seqSplit(t []int32, part map[int32]int, k int) [][]int32 {
	n := len(t)
	// inPart[i][j] = events of part i among t[:j]
	inPart := make([][]int, k)
	for i := range inPart {
		inPart[i] = make([]int, n+1)
		for j, a := range t {
			inPart[i][j+1] = inPart[i][j]
			if p, ok := part[a]; ok && p == i {
				inPart[i][j+1]++
			}
		}
	}
	const inf = 1 << 30
	// best[i][j]: fewest removed events when parts 0..i-1 cover t[:j]; from[i][j]: where part
	// i-1 began
	best := make([][]int, k+1)
	from := make([][]int, k+1)
	for i := range best {
		best[i] = make([]int, n+1)
		from[i] = make([]int, n+1)
		for j := range best[i] {
			best[i][j] = inf
		}
	}
	best[0][0] = 0
	for i := 1; i <= k; i++ {
		for j := 0; j <= n; j++ {
			for s := 0; s <= j; s++ {
				if best[i-1][s] == inf {
					continue
				}
				removed := best[i-1][s] + (j - s) - (inPart[i-1][j] - inPart[i-1][s])
				if removed < best[i][j] {
					best[i][j], from[i][j] = removed, s
				}
			}
		}
	}
	segs := make([][]int32, k)
	j := n
	for i := k; i >= 1; i-- {
		s := from[i][j]
		segs[i-1] = keep(t[s:j], part, i-1)
		j = s
	}
	return segs
}

// loopSplit cuts a trace into body and redo segments: a segment ends where the trace moves from
// body to redo activities or back, and where, within the body, an activity comes again that the
// current body segment already holds (another iteration, with an empty redo between). A trace
// that begins or ends in the redo part gets an empty body there.
func loopSplit(t []int32, part map[int32]int) (body, redo [][]int32) {
	isBody := func(a int32) bool { p, ok := part[a]; return !ok || p == 0 }
	var cur []int32
	inBody := true
	for _, a := range t {
		b := isBody(a)
		switch {
		case b && !inBody:
			redo = append(redo, cur)
			cur = nil
			inBody = true
		case !b && inBody:
			body = append(body, cur)
			cur = nil
			inBody = false
		case b && inBody && slices.Contains(cur, a):
			body = append(body, cur)
			redo = append(redo, nil)
			cur = nil
		}
		cur = append(cur, a)
	}
	if inBody {
		body = append(body, cur)
	} else {
		redo = append(redo, cur)
		body = append(body, nil)
	}
	return body, redo
}
