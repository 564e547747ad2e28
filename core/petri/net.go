// Package petri holds place/transition nets (Petri nets) with their markings: the models that
// conformance checking replays logs on, read from and written to PNML (ISO/IEC 15909-2).
//
// A workflow net (van der Aalst 1997) has one source place, one sink place, and every node on a
// path from the source to the sink. It is sound when from every marking reachable from one token
// in the source, one token in the sink can be reached, that marking is the only one with a token
// in the sink, and every transition can fire somewhere. Soundness is decided here on the
// reachability graph, which is explored up to a bound on the number of markings: a net whose
// graph exceeds the bound is reported as such, never guessed.
//
// A transition with an empty label is silent (τ): it moves tokens but stands for no activity.
package petri

import (
	"encoding/binary"
	"fmt"
	"slices"
)

// Net is a Petri net. Places and transitions are numbered from 0; arcs carry weight 1 (PNML
// arc inscriptions above 1 are read as that many arcs).
type Net struct {
	ID, Name    string
	Places      []Place
	Transitions []Transition
	Initial     Marking
	Final       Marking
}

// Place is a place of the net.
type Place struct {
	ID, Name string
}

// Transition is a transition with the places it consumes from and produces to (a place listed
// twice takes or gives two tokens).
type Transition struct {
	ID, Label string
	In, Out   []int
}

// Silent reports whether the transition stands for no activity.
func (t *Transition) Silent() bool { return t.Label == "" }

// Marking counts the tokens of each place, indexed like Net.Places.
type Marking []int

// Key is the marking as a short binary string (place and count of each marked place, as
// varints), for use as a map key; searches over markings build millions of them.
func (m Marking) Key() string {
	b := make([]byte, 0, 16)
	for i, n := range m {
		if n != 0 {
			b = binary.AppendUvarint(b, uint64(i))
			b = binary.AppendUvarint(b, uint64(n))
		}
	}
	return string(b)
}

// Equal reports whether two markings are the same.
func (m Marking) Equal(o Marking) bool { return slices.Equal(m, o) }

// AddPlace adds a place and returns its index.
func (n *Net) AddPlace(id, name string) int {
	n.Places = append(n.Places, Place{ID: id, Name: name})
	if n.Initial != nil {
		n.Initial = append(n.Initial, 0)
	}
	if n.Final != nil {
		n.Final = append(n.Final, 0)
	}
	return len(n.Places) - 1
}

// AddTransition adds a transition and returns its index.
func (n *Net) AddTransition(id, label string, in, out []int) int {
	n.Transitions = append(n.Transitions, Transition{ID: id, Label: label, In: in, Out: out})
	return len(n.Transitions) - 1
}

// Enabled reports whether transition t can fire in marking m. It allocates nothing: searches
// call it for every transition in every marking.
func (n *Net) Enabled(m Marking, t int) bool {
	in := n.Transitions[t].In
	for _, p := range in {
		if m[p] == 0 {
			return false
		}
		if m[p] < len(in) { // a place listed several times needs as many tokens
			k := 0
			for _, q := range in {
				if q == p {
					k++
				}
			}
			if m[p] < k {
				return false
			}
		}
	}
	return true
}

// EnabledSet lists the transitions enabled in m.
func (n *Net) EnabledSet(m Marking) []int {
	var out []int
	for t := range n.Transitions {
		if n.Enabled(m, t) {
			out = append(out, t)
		}
	}
	return out
}

// Fire returns the marking after t fires in m. It panics if t is not enabled: callers check
// Enabled first, so a violation is a programming error.
func (n *Net) Fire(m Marking, t int) Marking {
	out := slices.Clone(m)
	for _, p := range n.Transitions[t].In {
		out[p]--
		if out[p] < 0 {
			panic(fmt.Sprintf("petri: transition %s fired while not enabled", n.Transitions[t].ID))
		}
	}
	for _, p := range n.Transitions[t].Out {
		out[p]++
	}
	return out
}

// TransitionIndex maps each transition's ID to its index, for results (alignments, PNML) that
// name transitions by ID.
func (n *Net) TransitionIndex() map[string]int {
	index := make(map[string]int, len(n.Transitions))
	for t, tr := range n.Transitions {
		index[tr.ID] = t
	}
	return index
}

// Marking returns a marking with one token in each of the given places.
func (n *Net) Marking(places ...int) Marking {
	m := make(Marking, len(n.Places))
	for _, p := range places {
		m[p]++
	}
	return m
}
