package petri

import (
	"errors"
	"fmt"
)

// Reachability is the explored state space of a net from its initial marking.
type Reachability struct {
	Markings []Marking
	Edges    [][]Edge // per marking, the transitions that fire and where they lead
	Complete bool     // false when the bound stopped the exploration
}

// Edge is one firing in the reachability graph.
type Edge struct{ Transition, To int }

// Explore builds the reachability graph breadth first, stopping at limit markings. It also stops
// with Complete false as soon as a marking covers an earlier one on its path with more tokens
// somewhere (the net is then unbounded: Karp and Miller 1969).
func (n *Net) Explore(limit int) (*Reachability, error) {
	if n.Initial == nil {
		return nil, errors.New("petri: the net has no initial marking")
	}
	r := &Reachability{Complete: true}
	index := map[string]int{}
	parent := []int{-1}
	add := func(m Marking, from int) int {
		k := m.Key()
		if i, ok := index[k]; ok {
			return i
		}
		index[k] = len(r.Markings)
		r.Markings = append(r.Markings, m)
		r.Edges = append(r.Edges, nil)
		if from >= 0 {
			parent = append(parent, from)
		}
		return len(r.Markings) - 1
	}
	add(n.Initial, -1)
	for i := 0; i < len(r.Markings); i++ {
		for _, t := range n.EnabledSet(r.Markings[i]) {
			next := n.Fire(r.Markings[i], t)
			for a := i; a >= 0; a = parent[a] {
				if strictlyCovers(next, r.Markings[a]) {
					return r, fmt.Errorf("%w: firing %s can repeat and add tokens without end", ErrUnbounded, n.Transitions[t].ID)
				}
			}
			if len(r.Markings) >= limit {
				r.Complete = false
				return r, nil
			}
			j := add(next, i)
			r.Edges[i] = append(r.Edges[i], Edge{t, j})
		}
	}
	return r, nil
}

func strictlyCovers(a, b Marking) bool {
	more := false
	for i := range a {
		if a[i] < b[i] {
			return false
		}
		if a[i] > b[i] {
			more = true
		}
	}
	return more
}

// Reasons a net is not a sound workflow net.
var (
	ErrNoSource     = errors.New("no single source place (a place without incoming arcs)")
	ErrNoSink       = errors.New("no single sink place (a place without outgoing arcs)")
	ErrNotConnected = errors.New("a node is not on a path from the source to the sink")
	ErrUnbounded    = errors.New("unbounded")
	ErrDead         = errors.New("a transition can never fire")
	ErrStuck        = errors.New("a reachable marking cannot reach the final marking")
	ErrImproper     = errors.New("a reachable marking puts a token in the sink with tokens left elsewhere")
	ErrTooLarge     = errors.New("the state space is larger than the bound")
)

// WorkflowNet checks the structure of a workflow net and returns its source and sink places.
func (n *Net) WorkflowNet() (source, sink int, err error) {
	hasIn := make([]bool, len(n.Places))
	hasOut := make([]bool, len(n.Places))
	for _, t := range n.Transitions {
		for _, p := range t.In {
			hasOut[p] = true
		}
		for _, p := range t.Out {
			hasIn[p] = true
		}
	}
	source, sink = -1, -1
	for p := range n.Places {
		if !hasIn[p] {
			if source >= 0 {
				return -1, -1, fmt.Errorf("%w: %s and %s", ErrNoSource, n.Places[source].ID, n.Places[p].ID)
			}
			source = p
		}
		if !hasOut[p] {
			if sink >= 0 {
				return -1, -1, fmt.Errorf("%w: %s and %s", ErrNoSink, n.Places[sink].ID, n.Places[p].ID)
			}
			sink = p
		}
	}
	if source < 0 {
		return -1, -1, ErrNoSource
	}
	if sink < 0 {
		return -1, -1, ErrNoSink
	}
	// every node on a path from source to sink: forward from source and backward from sink
	fwdP, fwdT := n.walk(source, true)
	bwdP, bwdT := n.walk(sink, false)
	for p := range n.Places {
		if !fwdP[p] || !bwdP[p] {
			return -1, -1, fmt.Errorf("%w: place %s", ErrNotConnected, n.Places[p].ID)
		}
	}
	for t := range n.Transitions {
		if !fwdT[t] || !bwdT[t] {
			return -1, -1, fmt.Errorf("%w: transition %s", ErrNotConnected, n.Transitions[t].ID)
		}
	}
	return source, sink, nil
}

func (n *Net) walk(start int, forward bool) (places, trans []bool) {
	places = make([]bool, len(n.Places))
	trans = make([]bool, len(n.Transitions))
	places[start] = true
	for changed := true; changed; {
		changed = false
		for t, tr := range n.Transitions {
			from, to := tr.In, tr.Out
			if !forward {
				from, to = tr.Out, tr.In
			}
			if trans[t] {
				continue
			}
			for _, p := range from {
				if places[p] {
					trans[t] = true
					changed = true
					for _, q := range to {
						places[q] = true
					}
					break
				}
			}
		}
	}
	return places, trans
}

// Sound decides soundness of a workflow net by its reachability graph from one token in the
// source, up to limit markings. It returns nil for a sound net, or the first reason it is not.
func (n *Net) Sound(limit int) error {
	source, sink, err := n.WorkflowNet()
	if err != nil {
		return err
	}
	m := *n
	m.Initial = n.Marking(source)
	final := n.Marking(sink)
	r, err := m.Explore(limit)
	if err != nil {
		return err
	}
	if !r.Complete {
		return fmt.Errorf("%w (%d markings)", ErrTooLarge, limit)
	}
	fired := make([]bool, len(n.Transitions))
	// backward reachability of the final marking
	pred := make([][]int, len(r.Markings))
	finalIdx := -1
	for i, es := range r.Edges {
		if r.Markings[i].Equal(final) {
			finalIdx = i
		} else if r.Markings[i][sink] > 0 {
			return fmt.Errorf("%w: %v", ErrImproper, n.describe(r.Markings[i]))
		}
		for _, e := range es {
			fired[e.Transition] = true
			pred[e.To] = append(pred[e.To], i)
		}
	}
	for t, f := range fired {
		if !f {
			return fmt.Errorf("%w: %s", ErrDead, n.Transitions[t].ID)
		}
	}
	if finalIdx < 0 {
		return fmt.Errorf("%w: the final marking is never reached", ErrStuck)
	}
	can := make([]bool, len(r.Markings))
	can[finalIdx] = true
	queue := []int{finalIdx}
	for len(queue) > 0 {
		x := queue[0]
		queue = queue[1:]
		for _, p := range pred[x] {
			if !can[p] {
				can[p] = true
				queue = append(queue, p)
			}
		}
	}
	for i, ok := range can {
		if !ok {
			return fmt.Errorf("%w: %s", ErrStuck, n.describe(r.Markings[i]))
		}
	}
	return nil
}

func (n *Net) describe(m Marking) string {
	var parts []string
	for p, k := range m {
		if k > 0 {
			parts = append(parts, fmt.Sprintf("%d in %s", k, n.Places[p].ID))
		}
	}
	return fmt.Sprint(parts)
}
