package discovery

import (
	"errors"
	"fmt"
	"math/bits"
	"slices"
	"strings"

	"tracewright/core/petri"
)

// Relation is one cell of a log's footprint (van der Aalst, Process Mining, 2011, section 5.2;
// section numbers from memory): how two activities are related by the directly-follows
// relation >.
type Relation uint8

// The four footprint relations: a → b (a > b, not b > a), b ← a, a ∥ b (both), a # b (neither).
const (
	Choice   Relation = iota // #
	Causal                   // →
	Reverse                  // ←
	Parallel                 // ∥
)

func (r Relation) String() string { return [...]string{"#", "→", "←", "∥"}[r] }

// Footprint is the matrix of relations between a log's activities, in the order of Names.
type Footprint struct {
	Names []string
	Rel   [][]Relation
}

// FootprintOf computes the footprint of a log.
func FootprintOf(l Log) Footprint {
	g := graphOf(l)
	f := Footprint{}
	for _, a := range g.Acts {
		f.Names = append(f.Names, l.Names[a])
	}
	f.Rel = make([][]Relation, len(g.Acts))
	for i, a := range g.Acts {
		f.Rel[i] = make([]Relation, len(g.Acts))
		for j, b := range g.Acts {
			ab, ba := g.has(a, b), g.has(b, a)
			switch {
			case ab && ba:
				f.Rel[i][j] = Parallel
			case ab:
				f.Rel[i][j] = Causal
			case ba:
				f.Rel[i][j] = Reverse
			}
		}
	}
	return f
}

// String prints the footprint as a table, one row per activity.
func (f Footprint) String() string {
	var b strings.Builder
	for i, row := range f.Rel {
		b.WriteString(f.Names[i])
		for _, r := range row {
			b.WriteString(" " + r.String())
		}
		b.WriteByte('\n')
	}
	return b.String()
}

// AlphaPlace is a place of the alpha algorithm's net: tokens come from any activity of In and go
// to any activity of Out. The source place has no In, the sink place no Out.
type AlphaPlace struct {
	In, Out []string
}

// AlphaNet is the alpha algorithm's result: a Petri net whose transitions are the activities.
type AlphaNet struct {
	Transitions []string
	Places      []AlphaPlace
}

// ErrAlphaSize is returned for logs with more than 64 activities: the algorithm enumerates sets
// of activities, kept here as 64-bit masks.
var ErrAlphaSize = errors.New("the alpha algorithm takes at most 64 activities")

// Alpha runs the alpha algorithm (van der Aalst, Weijters and Măruşter 2004, definition 4.3,
// from memory): the pairs (A, B) of sets of
// activities with every a in A causally before every b in B and no two members of A, or of B,
// ever directly following each other, kept where maximal, become places, plus a source and a
// sink place. Its cost grows with the number of such pairs, at worst exponentially in the
// number of activities.
func Alpha(l Log) (AlphaNet, error) {
	f := FootprintOf(l)
	n := len(f.Names)
	if n > 64 {
		return AlphaNet{}, ErrAlphaSize
	}
	g := graphOf(l)
	pos := map[int32]int{}
	for i, a := range g.Acts {
		pos[a] = i
	}
	choice := func(mask uint64, x int) bool { // x # every member of mask, and x # x
		if f.Rel[x][x] != Choice {
			return false
		}
		for m := mask; m != 0; m &= m - 1 {
			if f.Rel[x][bits.TrailingZeros64(m)] != Choice {
				return false
			}
		}
		return true
	}
	causal := func(a, b uint64) bool {
		for m := a; m != 0; m &= m - 1 {
			for k := b; k != 0; k &= k - 1 {
				if f.Rel[bits.TrailingZeros64(m)][bits.TrailingZeros64(k)] != Causal {
					return false
				}
			}
		}
		return true
	}
	type pair struct{ a, b uint64 }
	seen := map[pair]bool{}
	var queue []pair
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			if f.Rel[i][j] == Causal && choice(0, i) && choice(0, j) {
				p := pair{1 << i, 1 << j}
				if !seen[p] {
					seen[p] = true
					queue = append(queue, p)
				}
			}
		}
	}
	// grow pairs one activity at a time; every pair of X_L is reached this way
	for k := 0; k < len(queue); k++ {
		p := queue[k]
		for x := 0; x < n; x++ {
			bit := uint64(1) << x
			if p.a&bit == 0 && choice(p.a, x) && causal(bit, p.b) {
				q := pair{p.a | bit, p.b}
				if !seen[q] {
					seen[q] = true
					queue = append(queue, q)
				}
			}
			if p.b&bit == 0 && choice(p.b, x) && causal(p.a, bit) {
				q := pair{p.a, p.b | bit}
				if !seen[q] {
					seen[q] = true
					queue = append(queue, q)
				}
			}
		}
	}
	names := func(m uint64) []string {
		var out []string
		for ; m != 0; m &= m - 1 {
			out = append(out, f.Names[bits.TrailingZeros64(m)])
		}
		slices.Sort(out)
		return out
	}
	net := AlphaNet{Transitions: slices.Clone(f.Names)}
	slices.Sort(net.Transitions)
	var starts, ends []string
	for a := range g.Start {
		starts = append(starts, l.Names[a])
	}
	for a := range g.End {
		ends = append(ends, l.Names[a])
	}
	slices.Sort(starts)
	slices.Sort(ends)
	net.Places = append(net.Places, AlphaPlace{Out: starts})
	var maximal []pair
	for _, p := range queue {
		isMax := true
		for _, q := range queue {
			if q != p && q.a&p.a == p.a && q.b&p.b == p.b {
				isMax = false
				break
			}
		}
		if isMax {
			maximal = append(maximal, p)
		}
	}
	var places []AlphaPlace
	for _, p := range maximal {
		places = append(places, AlphaPlace{In: names(p.a), Out: names(p.b)})
	}
	slices.SortFunc(places, func(x, y AlphaPlace) int {
		return strings.Compare(strings.Join(x.In, ",")+"|"+strings.Join(x.Out, ","), strings.Join(y.In, ",")+"|"+strings.Join(y.Out, ","))
	})
	net.Places = append(net.Places, places...)
	net.Places = append(net.Places, AlphaPlace{In: ends})
	return net, nil
}

// PetriNet builds the alpha net as a Petri net: a transition per activity, the places as found,
// one token in the source place initially and in the sink place at the end.
func (a AlphaNet) PetriNet() *petri.Net {
	n := &petri.Net{Name: "alpha"}
	tr := map[string]int{}
	for i, t := range a.Transitions {
		tr[t] = n.AddTransition(fmt.Sprintf("t%d", i+1), t, nil, nil)
	}
	var source, sink int
	for i, p := range a.Places {
		id := n.AddPlace(fmt.Sprintf("p%d", i+1), "")
		if len(p.In) == 0 {
			source = id
		}
		if len(p.Out) == 0 {
			sink = id
		}
		for _, x := range p.In {
			n.Transitions[tr[x]].Out = append(n.Transitions[tr[x]].Out, id)
		}
		for _, x := range p.Out {
			n.Transitions[tr[x]].In = append(n.Transitions[tr[x]].In, id)
		}
	}
	n.Initial = n.Marking(source)
	n.Final = n.Marking(sink)
	return n
}
