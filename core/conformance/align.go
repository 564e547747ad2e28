package conformance

import (
	"container/heap"
	"errors"
	"fmt"
	"strconv"
	"strings"

	"tracewright/core/petri"
)

// Move is one step of an alignment: a synchronous move (the event and a transition with its
// label), a log move (an event the model does not allow there) or a model move (a transition
// the log does not show; silent transitions are model moves of cost 0).
type Move struct {
	Kind       string `json:"kind"` // "sync", "log" or "model"
	Activity   string `json:"activity,omitempty"`
	Transition string `json:"transition,omitempty"`
	Silent     bool   `json:"silent,omitempty"`
	Cost       int    `json:"cost"`
}

// Costs is the cost function: log and model moves of visible activities cost 1 unless set here
// per activity; synchronous and silent moves cost 0 (the standard cost function of Adriansyah et
// al. 2011).
type Costs struct {
	Log, Model map[string]int
}

func (c Costs) logCost(a string) int {
	if v, ok := c.Log[a]; ok {
		return v
	}
	return 1
}

func (c Costs) modelCost(a string) int {
	if v, ok := c.Model[a]; ok {
		return v
	}
	return 1
}

// ErrBound is returned when the search met its state bound: the trace is reported as not
// aligned, never with a guessed alignment.
var ErrBound = errors.New("alignment search exceeded its bound")

// Alignment is an optimal alignment of one trace.
type Alignment struct {
	Moves  []Move `json:"moves"`
	Cost   int    `json:"cost"`
	States int    `json:"states_explored"`
}

type searchNode struct {
	m      petri.Marking
	i      int // events of the trace consumed
	g, f   int
	parent int
	move   Move
	index  int
}

type queue []*searchNode

func (q queue) Len() int { return len(q) }
func (q queue) Less(a, b int) bool {
	if q[a].f != q[b].f {
		return q[a].f < q[b].f
	}
	return q[a].i > q[b].i // deeper in the trace first: fewer ties to expand
}
func (q queue) Swap(a, b int) { q[a], q[b] = q[b], q[a]; q[a].index = a; q[b].index = b }
func (q *queue) Push(x any)   { n := x.(*searchNode); n.index = len(*q); *q = append(*q, n) }
func (q *queue) Pop() any {
	old := *q
	n := old[len(old)-1]
	*q = old[:len(old)-1]
	return n
}

// Align finds an optimal alignment of trace on the net by A* over the synchronous product
// (Adriansyah, van Dongen and van der Aalst, "Conformance checking using cost-based fitness
// analysis", EDOC 2011). The heuristic is ours and cheap: the remaining events no transition
// carries must be log moves (u), and a model that needs d more visible steps to finish can match
// at most r of the r remaining labelled events, so at least max(0, d − r) model moves remain:
// h = u + max(0, d − r), admissible and consistent with unit costs (d comes from the net's
// reachability graph, explored once; with custom costs, or a graph over the bound, d is left
// out). The marking-equation heuristic of that paper (and its extension by van Dongen 2018)
// would explore fewer states still; it is still to come. At most maxStates states are expanded.
func Align(n *petri.Net, trace []string, costs Costs, maxStates int) (*Alignment, error) {
	return newAligner(n, costs).align(trace, maxStates)
}

// aligner holds what every alignment on one net shares: the distances to the final marking.
type aligner struct {
	n     *petri.Net
	costs Costs
	dist  map[string]int
}

func newAligner(n *petri.Net, costs Costs) *aligner {
	a := &aligner{n: n, costs: costs}
	if n.Initial != nil && n.Final != nil {
		a.dist = distanceToFinal(n, costs)
	}
	return a
}

func (al *aligner) align(trace []string, maxStates int) (*Alignment, error) {
	n, costs := al.n, al.costs
	if n.Initial == nil || n.Final == nil {
		return nil, errors.New("the net needs an initial and a final marking")
	}
	labels := map[string]bool{}
	for _, t := range n.Transitions {
		if !t.Silent() {
			labels[t.Label] = true
		}
	}
	// u[i]: the cost of the events from i on that can only be log moves; r[i]: how many of them
	// have a label (at most that many model moves can be synchronous)
	u := make([]int, len(trace)+1)
	r := make([]int, len(trace)+1)
	for i := len(trace) - 1; i >= 0; i-- {
		u[i], r[i] = u[i+1], r[i+1]
		if labels[trace[i]] {
			r[i]++
		} else {
			u[i] += costs.logCost(trace[i])
		}
	}
	dist := al.dist
	hOf := func(m petri.Marking, i int) int {
		h := u[i]
		if dist != nil {
			if d, ok := dist[m.Key()]; ok && d > r[i] {
				h += d - r[i]
			}
		}
		return h
	}
	key := func(m petri.Marking, i int) string { return strconv.Itoa(i) + "|" + m.Key() }
	nodes := []*searchNode{{m: n.Initial, i: 0, g: 0, f: hOf(n.Initial, 0), parent: -1}}
	best := map[string]int{key(n.Initial, 0): 0}
	closed := map[string]bool{}
	q := &queue{}
	heap.Push(q, nodes[0])
	idOf := map[*searchNode]int{nodes[0]: 0}
	expanded := 0
	push := func(from *searchNode, m petri.Marking, i, cost int, mv Move) {
		g := from.g + cost
		k := key(m, i)
		if old, ok := best[k]; ok && old <= g {
			return
		}
		best[k] = g
		nd := &searchNode{m: m, i: i, g: g, f: g + hOf(m, i), parent: idOf[from], move: mv}
		idOf[nd] = len(nodes)
		nodes = append(nodes, nd)
		heap.Push(q, nd)
	}
	for q.Len() > 0 {
		cur := heap.Pop(q).(*searchNode)
		k := key(cur.m, cur.i)
		if closed[k] {
			continue
		}
		closed[k] = true
		if cur.i == len(trace) && cur.m.Equal(n.Final) {
			res := &Alignment{Cost: cur.g, States: expanded}
			for j := idOf[cur]; nodes[j].parent >= 0; j = nodes[j].parent {
				res.Moves = append(res.Moves, nodes[j].move)
			}
			for a, b := 0, len(res.Moves)-1; a < b; a, b = a+1, b-1 {
				res.Moves[a], res.Moves[b] = res.Moves[b], res.Moves[a]
			}
			return res, nil
		}
		expanded++
		if expanded > maxStates {
			return nil, fmt.Errorf("%w (%d states)", ErrBound, maxStates)
		}
		if cur.i < len(trace) {
			a := trace[cur.i]
			push(cur, cur.m, cur.i+1, costs.logCost(a), Move{Kind: "log", Activity: a, Cost: costs.logCost(a)})
		}
		for t, tr := range n.Transitions {
			if !n.Enabled(cur.m, t) {
				continue
			}
			next := n.Fire(cur.m, t)
			if tr.Silent() {
				push(cur, next, cur.i, 0, Move{Kind: "model", Transition: tr.ID, Silent: true})
				continue
			}
			c := costs.modelCost(tr.Label)
			push(cur, next, cur.i, c, Move{Kind: "model", Activity: tr.Label, Transition: tr.ID, Cost: c})
			if cur.i < len(trace) && trace[cur.i] == tr.Label {
				push(cur, next, cur.i+1, 0, Move{Kind: "sync", Activity: tr.Label, Transition: tr.ID})
			}
		}
	}
	return nil, errors.New("the final marking cannot be reached: the net is not a sound workflow net")
}

// ShortestRun is the cost of the cheapest run of the model from initial to final marking (model
// moves only), the denominator's second term in alignment fitness.
func ShortestRun(n *petri.Net, costs Costs, maxStates int) (int, error) {
	return newAligner(n, costs).shortestRun(maxStates)
}

func (a *aligner) shortestRun(maxStates int) (int, error) {
	al, err := a.align(nil, maxStates)
	if err != nil {
		return 0, err
	}
	return al.Cost, nil
}

// TraceText writes an alignment as two rows, the log's and the model's, for reports.
func (a *Alignment) TraceText() string {
	var top, bottom []string
	for _, m := range a.Moves {
		switch m.Kind {
		case "sync":
			top, bottom = append(top, m.Activity), append(bottom, m.Activity)
		case "log":
			top, bottom = append(top, m.Activity), append(bottom, "≫")
		default:
			if m.Silent {
				top, bottom = append(top, "≫"), append(bottom, "τ")
			} else {
				top, bottom = append(top, "≫"), append(bottom, m.Activity)
			}
		}
	}
	return strings.Join(top, " ") + "\n" + strings.Join(bottom, " ")
}

// distanceToFinal gives, for every reachable marking, the fewest visible transitions to the final
// marking (silent ones are free), by a backward 0-1 breadth-first search over the reachability
// graph. It returns nil when costs are not the default or the graph is larger than its bound.
func distanceToFinal(n *petri.Net, costs Costs) map[string]int {
	if len(costs.Log) > 0 || len(costs.Model) > 0 {
		return nil
	}
	rg, err := n.Explore(200000)
	if err != nil || !rg.Complete {
		return nil
	}
	pred := make([][]petri.Edge, len(rg.Markings))
	final := -1
	for i, es := range rg.Edges {
		if rg.Markings[i].Equal(n.Final) {
			final = i
		}
		for _, e := range es {
			pred[e.To] = append(pred[e.To], petri.Edge{Transition: e.Transition, To: i})
		}
	}
	if final < 0 {
		return nil
	}
	const inf = 1 << 30
	d := make([]int, len(rg.Markings))
	for i := range d {
		d[i] = inf
	}
	d[final] = 0
	deque := []int{final}
	for len(deque) > 0 {
		x := deque[0]
		deque = deque[1:]
		for _, p := range pred[x] {
			w := 1
			if n.Transitions[p.Transition].Silent() {
				w = 0
			}
			if d[x]+w < d[p.To] {
				d[p.To] = d[x] + w
				if w == 0 {
					deque = append([]int{p.To}, deque...)
				} else {
					deque = append(deque, p.To)
				}
			}
		}
	}
	out := make(map[string]int, len(d))
	for i, v := range d {
		if v < inf {
			out[rg.Markings[i].Key()] = v
		}
	}
	return out
}
