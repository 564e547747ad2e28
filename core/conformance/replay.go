package conformance

import (
	"slices"
	"strconv"

	"tracewright/core/eventlog"
	"tracewright/core/petri"
)

// Tokens are the four counts of token replay.
type Tokens struct {
	Produced  int `json:"produced"`
	Consumed  int `json:"consumed"`
	Missing   int `json:"missing"`
	Remaining int `json:"remaining"`
}

// Fitness is ½(1 − m/c) + ½(1 − r/p) (Rozinat and van der Aalst 2008, definition 3).
func (t Tokens) Fitness() float64 {
	f := 1.0
	if t.Consumed > 0 {
		f -= 0.5 * float64(t.Missing) / float64(t.Consumed)
	}
	if t.Produced > 0 {
		f -= 0.5 * float64(t.Remaining) / float64(t.Produced)
	}
	return f
}

func (t *Tokens) add(o Tokens, n int) {
	t.Produced += n * o.Produced
	t.Consumed += n * o.Consumed
	t.Missing += n * o.Missing
	t.Remaining += n * o.Remaining
}

// VariantReplay is the replay of one variant.
type VariantReplay struct {
	Trace    []string `json:"trace"`
	Cases    int      `json:"cases"`
	Tokens   Tokens   `json:"tokens"`
	Fitness  float64  `json:"fitness"`
	Unplayed int      `json:"unplayed_events"` // events without a transition for their activity
}

// ReplayResult is the replay of a log.
type ReplayResult struct {
	Tokens    Tokens          `json:"tokens"`
	Fitness   float64         `json:"fitness"`
	Variants  []VariantReplay `json:"variants"`
	Unmatched Matching        `json:"unmatched"`
}

// Matching lists the activities no transition carries and the labels no activity has.
type Matching struct {
	Activities []string `json:"activities"`
	Labels     []string `json:"labels"`
}

// Match compares the log's activities with the net's visible labels.
func Match(l *eventlog.Log, n *petri.Net) Matching {
	labels := map[string]bool{}
	for _, t := range n.Transitions {
		if !t.Silent() {
			labels[t.Label] = true
		}
	}
	acts := map[string]bool{}
	m := Matching{Activities: []string{}, Labels: []string{}}
	for _, a := range l.Activities.Names() {
		acts[a] = true
		if !labels[a] {
			m.Activities = append(m.Activities, a)
		}
	}
	for lb := range labels {
		if !acts[lb] {
			m.Labels = append(m.Labels, lb)
		}
	}
	slices.Sort(m.Activities)
	slices.Sort(m.Labels)
	return m
}

// silentLimit bounds the markings explored when looking for silent firings.
const silentLimit = 10000

// Replay replays every variant of the log on the net, which must have initial and final markings.
func Replay(l *eventlog.Log, n *petri.Net) ReplayResult {
	res := ReplayResult{Unmatched: Match(l, n)}
	byLabel := map[string][]int{}
	for t, tr := range n.Transitions {
		if !tr.Silent() {
			byLabel[tr.Label] = append(byLabel[tr.Label], t)
		}
	}
	cones := &silentCones{}
	for _, v := range l.Variants {
		var trace []string
		for _, a := range v.Activities {
			trace = append(trace, l.Activities.Name(a))
		}
		tok, unplayed := replayTrace(n, byLabel, trace, cones)
		res.Variants = append(res.Variants, VariantReplay{Trace: trace, Cases: len(v.Cases), Tokens: tok, Fitness: tok.Fitness(), Unplayed: unplayed})
		res.Tokens.add(tok, len(v.Cases))
	}
	res.Fitness = res.Tokens.Fitness()
	return res
}

// ReplayTrace replays one trace (activity names). byLabel maps labels to transitions (nil builds
// it).
func ReplayTrace(n *petri.Net, byLabel map[string][]int, trace []string) (Tokens, int) {
	if byLabel == nil {
		byLabel = map[string][]int{}
		for t, tr := range n.Transitions {
			if !tr.Silent() {
				byLabel[tr.Label] = append(byLabel[tr.Label], t)
			}
		}
	}
	return replayTrace(n, byLabel, trace, &silentCones{})
}

func replayTrace(n *petri.Net, byLabel map[string][]int, trace []string, cones *silentCones) (Tokens, int) {
	var tok Tokens
	m := slices.Clone(n.Initial)
	for _, k := range m {
		tok.Produced += k
	}
	unplayed := 0
	for _, a := range trace {
		ts := byLabel[a]
		if len(ts) == 0 {
			unplayed++
			continue
		}
		// an enabled transition first; else one that silent firings can enable; else the one
		// missing the fewest tokens
		t := -1
		for _, c := range ts {
			if n.Enabled(m, c) {
				t = c
				break
			}
		}
		if t < 0 {
			for _, c := range ts {
				if seq, ok := cones.path(n, m, c); ok {
					for _, s := range seq {
						m = fire(n, m, s, &tok)
					}
					t = c
					break
				}
			}
		}
		if t < 0 {
			best, bestMiss := ts[0], 1<<30
			for _, c := range ts {
				if k := missing(n, m, c); k < bestMiss {
					best, bestMiss = c, k
				}
			}
			t = best
			need := map[int]int{}
			for _, p := range n.Transitions[t].In {
				need[p]++
			}
			for p, k := range need {
				if m[p] < k {
					tok.Missing += k - m[p]
					m[p] = k
				}
			}
		}
		m = fire(n, m, t, &tok)
	}
	// let silent transitions reach the final marking if they can
	if n.Final != nil && !m.Equal(n.Final) {
		if seq, ok := cones.path(n, m, -1); ok {
			for _, s := range seq {
				m = fire(n, m, s, &tok)
			}
		}
	}
	for p, k := range n.Final {
		tok.Consumed += k
		if m[p] < k {
			tok.Missing += k - m[p]
			m[p] = 0
		} else {
			m[p] -= k
		}
	}
	for _, k := range m {
		tok.Remaining += k
	}
	return tok, unplayed
}

func fire(n *petri.Net, m petri.Marking, t int, tok *Tokens) petri.Marking {
	tok.Consumed += len(n.Transitions[t].In)
	tok.Produced += len(n.Transitions[t].Out)
	return n.Fire(m, t)
}

func missing(n *petri.Net, m petri.Marking, t int) int {
	need := map[int]int{}
	for _, p := range n.Transitions[t].In {
		need[p]++
	}
	k := 0
	for p, c := range need {
		if m[p] < c {
			k += c - m[p]
		}
	}
	return k
}

// silentCones holds, per transition, the silent transitions that can help enable it: those that
// put tokens into its input places, and, again, into theirs. A silent transition outside the cone
// never adds a token to a place the cone needs, so leaving it out of a firing sequence keeps the
// sequence firable and the target enabled: the shortest enabling sequence uses the cone only, and
// in a net with many concurrent branches the cone is a small part of the search.
//
// It also remembers each search's answer by marking and target: the variants of a log share
// prefixes, so the same search comes back many times, and a search that fails explores up to
// silentLimit markings before it knows.
type silentCones struct {
	byTarget map[int][]int
	memo     map[string]silentAnswer
}

type silentAnswer struct {
	seq []int
	ok  bool
}

// path is silentPath for target (−1: the final marking), remembered.
func (c *silentCones) path(n *petri.Net, m petri.Marking, target int) ([]int, bool) {
	k := strconv.Itoa(target) + "|" + m.Key()
	if a, ok := c.memo[k]; ok {
		return a.seq, a.ok
	}
	if c.memo == nil {
		c.memo = map[string]silentAnswer{}
	}
	var seq []int
	var ok bool
	if target < 0 {
		seq, ok = silentPath(n, m, nil, func(x petri.Marking) bool { return x.Equal(n.Final) })
	} else {
		seq, ok = silentPath(n, m, c.of(n, target), func(x petri.Marking) bool { return n.Enabled(x, target) })
	}
	c.memo[k] = silentAnswer{seq, ok}
	return seq, ok
}

func (c *silentCones) of(n *petri.Net, target int) []int {
	if ts, ok := c.byTarget[target]; ok {
		return ts
	}
	if c.byTarget == nil {
		c.byTarget = map[int][]int{}
	}
	need := map[int]bool{}
	for _, p := range n.Transitions[target].In {
		need[p] = true
	}
	in := make([]bool, len(n.Transitions))
	for grew := true; grew; {
		grew = false
		for t, tr := range n.Transitions {
			if in[t] || !tr.Silent() || !slices.ContainsFunc(tr.Out, func(p int) bool { return need[p] }) {
				continue
			}
			in[t], grew = true, true
			for _, p := range tr.In {
				need[p] = true
			}
		}
	}
	ts := []int{}
	for t, ok := range in {
		if ok {
			ts = append(ts, t)
		}
	}
	c.byTarget[target] = ts
	return ts
}

// silentPath finds the shortest sequence of silent transitions from m to a marking where goal
// holds (breadth first, at most silentLimit markings), firing only the transitions in cone (nil:
// every silent transition).
func silentPath(n *petri.Net, m petri.Marking, cone []int, goal func(petri.Marking) bool) ([]int, bool) {
	if cone == nil {
		cone = []int{}
		for t, tr := range n.Transitions {
			if tr.Silent() {
				cone = append(cone, t)
			}
		}
	}
	type node struct {
		m      petri.Marking
		parent int
		t      int
	}
	nodes := []node{{m, -1, -1}}
	seen := map[string]bool{m.Key(): true}
	for i := 0; i < len(nodes) && len(nodes) < silentLimit; i++ {
		cur := nodes[i]
		if i > 0 && goal(cur.m) {
			var seq []int
			for j := i; j > 0; j = nodes[j].parent {
				seq = append(seq, nodes[j].t)
			}
			slices.Reverse(seq)
			return seq, true
		}
		for _, t := range cone {
			if !n.Enabled(cur.m, t) {
				continue
			}
			next := n.Fire(cur.m, t)
			if k := next.Key(); !seen[k] {
				seen[k] = true
				nodes = append(nodes, node{next, i, t})
			}
		}
	}
	return nil, false
}
