package conformance

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"slices"
	"strings"
	"time"

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
	Log   map[string]int `json:"log,omitempty"`
	Model map[string]int `json:"model,omitempty"`
}

// Check refuses costs below 0 or above 1000 (a cost of 0 makes a move free; far larger ones only
// slow the search without changing which moves are chosen over unit ones).
func (c Costs) Check() error {
	for kind, m := range map[string]map[string]int{"log": c.Log, "model": c.Model} {
		for a, v := range m {
			if v < 0 || v > 1000 {
				return fmt.Errorf("the %s-move cost of %q is %d: costs run from 0 to 1000", kind, a, v)
			}
		}
	}
	return nil
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
	// Solves counts the marking-equation programs solved; the other states took their bound
	// from their parent's solution.
	Solves int `json:"programs_solved"`
}

// Bound limits the work spent on one trace: at most States expanded search states and, when Time
// is above zero, at most that long. A trace over the bound is reported as not aligned (ErrBound).
type Bound struct {
	States int
	Time   time.Duration
}

// Align finds an optimal alignment of trace on the net by A* over the synchronous product
// (Adriansyah, van Dongen and van der Aalst, "Conformance checking using cost-based fitness
// analysis", EDOC 2011), with the marking-equation heuristic of that paper: from a state (marking
// m, events from i on still to explain), the cheapest solution x ≥ 0 of the linear program
//
//	m + C·(z + s) = final,  Σ_{λ(t)=a} s_t + w_a = n_a for every label a,
//	cost = Σ_t c_model(t)·z_t + Σ_a c_log(a)·w_a
//
// (z_t: model moves of t, s_t: synchronous moves of t, w_a: log moves of label a, n_a: the
// remaining events with label a; C the incidence matrix), rounded up, plus the cost of the
// remaining events no transition carries, is a lower bound on the remaining cost: admissible and
// consistent. The program relaxes the product net's own marking equation only by merging the
// events of one label, which the relaxation cannot tell apart anyway.
//
// The solution is reused as the paper does: a move whose variable is at least 1 in the parent's
// solution leaves a solution for the child (that variable less 1) whose cost is exactly the
// parent's less the move's cost, so the child's bound is known without solving. Other children
// get the parent's bound less the move's cost (a lower bound, because the heuristic is consistent)
// and are solved only when they come first in the queue; if the bound then rises, they are queued
// again (the lazy evaluation of van Dongen, "Efficiently computing alignments", BPM 2018). The
// programs are solved by our dual simplex (lp.go), warm-started from the previous basis.
//
// Cost: each expanded state costs O(|T|·|P|) for its successors and, when solved, O(m²) plus
// O(m² + |T|) per pivot with m = |P| + |labels|. Memory is O(|P|) per state reached.
func Align(n *petri.Net, trace []string, costs Costs, bound Bound) (*Alignment, error) {
	al, err := newAligner(n, costs)
	if err != nil {
		return nil, err
	}
	return al.align(trace, bound)
}

// aligner holds what every alignment on one net shares: the net as index lists, the labels,
// and the marking-equation program with its warm basis. It is not safe for concurrent use.
type aligner struct {
	n              *petri.Net
	costs          Costs
	places         int
	need           [][]placeCount // per transition: input places with how many tokens
	delta          [][]placeCount // per transition: the change it makes to each place it touches
	label          []int32        // per transition: its label's number, −1 if silent
	labelOf        map[string]int32
	modelCost      []int // per transition
	logCost        []int // per label
	initial, final []uint8
	prog           *lp
	keep           []int // the program's rows (places, then labels) that stayed
	colZ, colS     []int // per transition; colS is −1 for silent ones
	colW           []int // per label
	rhs            []float64
	search         *search // kept from one trace to the next
}

type placeCount struct {
	p int32
	k int32
}

func newAligner(n *petri.Net, costs Costs) (*aligner, error) {
	if n.Initial == nil || n.Final == nil {
		return nil, errors.New("the net needs an initial and a final marking")
	}
	P := len(n.Places)
	a := &aligner{n: n, costs: costs, places: P, labelOf: map[string]int32{}}
	a.initial, a.final = make([]uint8, P), make([]uint8, P)
	for p := 0; p < P; p++ {
		if n.Initial[p] > 255 || n.Final[p] > 255 || n.Initial[p] < 0 || n.Final[p] < 0 {
			return nil, fmt.Errorf("place %s holds more than 255 tokens", n.Places[p].ID)
		}
		a.initial[p], a.final[p] = uint8(n.Initial[p]), uint8(n.Final[p])
	}
	var cols [][]lpEntry
	var c []float64
	for _, tr := range n.Transitions {
		counts := map[int]int{}
		for _, p := range tr.In {
			counts[p]--
		}
		var need, delta []placeCount
		for _, p := range tr.In {
			if counts[p] < 0 && !slices.ContainsFunc(need, func(x placeCount) bool { return int(x.p) == p }) {
				need = append(need, placeCount{int32(p), int32(-counts[p])})
			}
		}
		for _, p := range tr.Out {
			counts[p]++
		}
		var col []lpEntry
		for p := 0; p < P; p++ {
			if v := counts[p]; v != 0 {
				delta = append(delta, placeCount{int32(p), int32(v)})
				col = append(col, lpEntry{p, float64(v)})
			}
		}
		a.need, a.delta = append(a.need, need), append(a.delta, delta)
		a.colZ = append(a.colZ, len(cols))
		cols = append(cols, col)
		if tr.Silent() {
			a.label = append(a.label, -1)
			a.modelCost = append(a.modelCost, 0)
			c = append(c, 0)
			continue
		}
		id, ok := a.labelOf[tr.Label]
		if !ok {
			id = int32(len(a.logCost))
			a.labelOf[tr.Label] = id
			a.logCost = append(a.logCost, costs.logCost(tr.Label))
		}
		a.label = append(a.label, id)
		a.modelCost = append(a.modelCost, costs.modelCost(tr.Label))
		c = append(c, float64(costs.modelCost(tr.Label)))
	}
	// synchronous columns: the transition's effect plus one event of its label
	for t := range n.Transitions {
		a.colS = append(a.colS, -1)
		if a.label[t] < 0 {
			continue
		}
		a.colS[t] = len(cols)
		col := append(slices.Clone(cols[a.colZ[t]]), lpEntry{P + int(a.label[t]), 1})
		cols = append(cols, col)
		c = append(c, 0)
	}
	for l := range a.logCost {
		a.colW = append(a.colW, len(cols))
		cols = append(cols, []lpEntry{{P + l, 1}})
		c = append(c, float64(a.logCost[l]))
	}
	a.prog, a.keep = newLP(P+len(a.logCost), cols, c)
	a.rhs = make([]float64, P+len(a.logCost))
	return a, nil
}

// searchNode is one state of the synchronous product reached by the search: a marking (kept in
// the search's pool at the node's index) and the number of events explained.
type searchNode struct {
	g, h   int32
	i      int32
	parent int32
	kind   uint8 // moveLog, moveModel, moveSync; 0 for the start
	exact  bool  // h is the program's own value, not a bound inherited from the parent
	closed bool
	t      int32  // the transition of a model or synchronous move
	sol    solRef // the program's solution when known, for reuse
}

// solRef is a solution of the marking equation kept in the search's arena of (column, value)
// entries: n entries from off, or none when n is −1. Nodes hold no pointers, so the garbage
// collector does not walk the search's node table.
type solRef struct {
	off, n int32
}

var noSol = solRef{n: -1}

const (
	moveLog = iota + 1
	moveModel
	moveSync
)

// queueEntry is a node in the priority queue with the f it was queued with; an entry whose node
// has since been closed or requeued with another f is stale and passed over.
type queueEntry struct {
	f, i, g int32
	node    int32
}

// before orders the queue: lowest f first; among equals the state deeper in the trace, then the
// one with more cost behind it (closer to a goal), which keeps ties from being explored widely.
func (e queueEntry) before(o queueEntry) bool {
	if e.f != o.f {
		return e.f < o.f
	}
	if e.i != o.i {
		return e.i > o.i
	}
	return e.g > o.g
}

type search struct {
	a      *aligner
	names  []string
	trace  []int32 // each event's label number, −1 for activities no transition carries
	cost   []int32 // each event's log-move cost
	u      []int32 // u[i]: the cost of the events from i on that no transition carries
	nodes  []searchNode
	marks  []uint8
	index  map[string]int32
	key    []byte
	heap   []queueEntry
	sols   []lpEntry // the arena of solutions (see solRef)
	b      []float64 // the program's right-hand side, scratch
	solves int
}

// reset readies the search for another trace, keeping its memory: an aligner aligns thousands
// of variants one after the other.
func (s *search) reset(trace []string) {
	s.names = trace
	s.trace = slices.Grow(s.trace[:0], len(trace))[:len(trace)]
	s.cost = slices.Grow(s.cost[:0], len(trace))[:len(trace)]
	s.u = slices.Grow(s.u[:0], len(trace)+1)[:len(trace)+1]
	s.u[len(trace)] = 0
	s.nodes, s.marks, s.heap, s.sols = s.nodes[:0], s.marks[:0], s.heap[:0], s.sols[:0]
	s.solves = 0
	clear(s.index)
}

func (al *aligner) align(trace []string, bound Bound) (*Alignment, error) {
	a := al
	if a.search == nil {
		a.search = &search{a: a, index: map[string]int32{}, b: make([]float64, len(a.keep))}
	}
	s := a.search
	s.reset(trace)
	for i := len(trace) - 1; i >= 0; i-- {
		s.cost[i] = int32(a.costs.logCost(trace[i]))
		s.u[i] = s.u[i+1]
		if id, ok := a.labelOf[trace[i]]; ok {
			s.trace[i] = id
		} else {
			s.trace[i] = -1
			s.u[i] += s.cost[i]
		}
	}
	var deadline time.Time
	if bound.Time > 0 {
		deadline = time.Now().Add(bound.Time)
	}
	P := a.places
	s.add(-1, a.initial, 0, 0, s.u[0], false, noSol, 0, 0)
	expanded := 0
	next := make([]uint8, P)
	for len(s.heap) > 0 {
		e := s.pop()
		k := e.node
		nd := &s.nodes[k]
		if nd.closed || e.f != nd.g+nd.h {
			continue
		}
		mk := s.marks[int(k)*P : int(k+1)*P]
		if int(nd.i) == len(trace) && bytes.Equal(mk, a.final) {
			return s.result(k, expanded), nil
		}
		if !nd.exact {
			h, sol, ok := s.bound(mk, int(nd.i))
			if math.IsInf(h, 1) {
				nd.closed = true // the final marking cannot be reached from here
				continue
			}
			nd.exact = true
			if ok {
				hv := s.u[nd.i] + int32(math.Ceil(h-1e-6))
				nd.sol = sol
				if hv > nd.h {
					nd.h = hv
					s.push(k)
					continue
				}
			}
		}
		nd.closed = true
		expanded++
		if expanded > bound.States {
			return nil, fmt.Errorf("%w (%d states)", ErrBound, bound.States)
		}
		if !deadline.IsZero() && expanded%256 == 0 && time.Now().After(deadline) {
			return nil, fmt.Errorf("%w (%v)", ErrBound, bound.Time)
		}
		g, h, i, sol := nd.g, nd.h, int(nd.i), nd.sol
		if i < len(trace) {
			c := s.cost[i]
			if l := s.trace[i]; l < 0 {
				s.add(k, mk, i+1, g+c, h-c, sol.n >= 0, sol, moveLog, -1)
			} else {
				child, ok := s.reuse(sol, a.colW[l])
				s.add(k, mk, i+1, g+c, h-c, ok, child, moveLog, -1)
			}
		}
		for t := range a.need {
			if !enabled(mk, a.need[t]) {
				continue
			}
			copy(next, mk)
			for _, d := range a.delta[t] {
				v := int(next[d.p]) + int(d.k)
				if v > 255 {
					return nil, fmt.Errorf("place %s holds more than 255 tokens: the net is not bounded", a.n.Places[d.p].ID)
				}
				next[d.p] = uint8(v)
			}
			c := int32(a.modelCost[t])
			child, ok := s.reuse(sol, a.colZ[t])
			s.add(k, next, i, g+c, h-c, ok, child, moveModel, int32(t))
			if i < len(trace) && a.label[t] >= 0 && a.label[t] == s.trace[i] {
				child, ok := s.reuse(sol, a.colS[t])
				s.add(k, next, i+1, g, h, ok, child, moveSync, int32(t))
			}
		}
	}
	return nil, errors.New("the final marking cannot be reached: the net is not a sound workflow net")
}

func enabled(m []uint8, need []placeCount) bool {
	for _, x := range need {
		if int32(m[x.p]) < x.k {
			return false
		}
	}
	return true
}

// reuse returns the parent's solution with one less of column col, if the solution has it.
func (s *search) reuse(sol solRef, col int) (solRef, bool) {
	if sol.n < 0 {
		return noSol, false
	}
	at := -1
	for k := int32(0); k < sol.n; k++ {
		if e := s.sols[sol.off+k]; e.i == col {
			if e.v < 1-1e-6 {
				return noSol, false
			}
			at = int(k)
			break
		}
	}
	if at < 0 {
		return noSol, false
	}
	out := solRef{off: int32(len(s.sols))}
	for k := int32(0); k < sol.n; k++ {
		e := s.sols[sol.off+k]
		if int(k) == at {
			if e.v -= 1; e.v < 1e-6 {
				continue
			}
		}
		s.sols = append(s.sols, e)
		out.n++
	}
	return out, true
}

// add reaches state (m, i) from node parent with cost g. h is the bound the parent passes on
// (exact when exact is true, with sol the solution behind it), never below u[i].
func (s *search) add(parent int32, m []uint8, i int, g, h int32, exact bool, sol solRef, kind uint8, t int32) {
	h = max(h, s.u[i])
	s.key = append(append(s.key[:0], m...), byte(i), byte(i>>8), byte(i>>16))
	if k, ok := s.index[string(s.key)]; ok {
		nd := &s.nodes[k]
		if nd.closed || nd.g <= g {
			return
		}
		nd.g, nd.parent, nd.kind, nd.t = g, parent, kind, t
		if !nd.exact && (exact || h > nd.h) {
			nd.h, nd.exact, nd.sol = max(h, nd.h), exact, sol
		}
		s.push(k)
		return
	}
	k := int32(len(s.nodes))
	s.index[string(s.key)] = k
	s.marks = append(s.marks, m...)
	s.nodes = append(s.nodes, searchNode{g: g, h: h, i: int32(i), parent: parent, kind: kind, exact: exact, t: t, sol: sol})
	s.push(k)
}

// bound solves the marking equation for marking m with the events from i on still to explain.
// ok is false when the solver gave up (the caller keeps the bound it has).
func (s *search) bound(m []uint8, i int) (float64, solRef, bool) {
	a := s.a
	P := a.places
	rhs := a.rhs
	clear(rhs)
	for p := 0; p < P; p++ {
		rhs[p] = float64(int(a.final[p]) - int(m[p]))
	}
	for _, l := range s.trace[i:] {
		if l >= 0 {
			rhs[P+int(l)]++
		}
	}
	b := s.b
	for k, r := range a.keep {
		b[k] = rhs[r]
	}
	s.solves++
	v := a.prog.solve(b)
	if math.IsInf(v, -1) {
		return 0, noSol, false
	}
	if math.IsInf(v, 1) {
		return v, noSol, false
	}
	sol := solRef{off: int32(len(s.sols))}
	for r, j := range a.prog.basic {
		if x := a.prog.x[r]; j < a.prog.n && x > 1e-6 {
			s.sols = append(s.sols, lpEntry{j, x})
			sol.n++
		}
	}
	return v, sol, true
}

func (s *search) push(k int32) {
	nd := &s.nodes[k]
	e := queueEntry{f: nd.g + nd.h, i: nd.i, g: nd.g, node: k}
	s.heap = append(s.heap, e)
	j := len(s.heap) - 1
	for j > 0 {
		p := (j - 1) / 2
		if !s.heap[j].before(s.heap[p]) {
			break
		}
		s.heap[j], s.heap[p] = s.heap[p], s.heap[j]
		j = p
	}
}

func (s *search) pop() queueEntry {
	h := s.heap
	top := h[0]
	last := len(h) - 1
	h[0] = h[last]
	h = h[:last]
	j := 0
	for {
		l := 2*j + 1
		if l >= len(h) {
			break
		}
		if r := l + 1; r < len(h) && h[r].before(h[l]) {
			l = r
		}
		if !h[l].before(h[j]) {
			break
		}
		h[j], h[l] = h[l], h[j]
		j = l
	}
	s.heap = h
	return top
}

// result walks back from the goal node to the start.
func (s *search) result(goal int32, expanded int) *Alignment {
	a := s.a
	res := &Alignment{Cost: int(s.nodes[goal].g), States: expanded, Solves: s.solves}
	for k := goal; s.nodes[k].parent >= 0; k = s.nodes[k].parent {
		nd := s.nodes[k]
		var mv Move
		switch nd.kind {
		case moveLog:
			mv = Move{Kind: "log", Activity: s.names[s.nodes[nd.parent].i], Cost: int(s.cost[s.nodes[nd.parent].i])}
		case moveSync:
			tr := a.n.Transitions[nd.t]
			mv = Move{Kind: "sync", Activity: tr.Label, Transition: tr.ID}
		default:
			tr := a.n.Transitions[nd.t]
			if tr.Silent() {
				mv = Move{Kind: "model", Transition: tr.ID, Silent: true}
			} else {
				mv = Move{Kind: "model", Activity: tr.Label, Transition: tr.ID, Cost: a.modelCost[nd.t]}
			}
		}
		res.Moves = append(res.Moves, mv)
	}
	slices.Reverse(res.Moves)
	return res
}

// ShortestRun is the cost of the cheapest run of the model from initial to final marking (model
// moves only), the denominator's second term in alignment fitness.
func ShortestRun(n *petri.Net, costs Costs, bound Bound) (int, error) {
	al, err := newAligner(n, costs)
	if err != nil {
		return 0, err
	}
	return al.shortestRun(bound)
}

func (a *aligner) shortestRun(bound Bound) (int, error) {
	al, err := a.align(nil, bound)
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
