package discovery

import (
	"slices"

	"tracewright/core/tree"
)

// InductiveMinerGraph is IMd: the Inductive Miner on the directly-follows graph alone. Each cut's
// parts get the subgraph of their activities; the start activities of a part are those that
// start the whole or are entered from outside the part (for × and ∧ only those that start the
// whole), and likewise for end activities; a part of a sequence that some path can skip becomes
// optional. Its cost does not depend on the number of events once the graph is counted.
//
// With opt.Noise f > 0 it is the paper's infrequent variant (IMfD, from memory): where the
// graph has no cut, IMf's filter (edges, start and end activities rarer than f of their source's
// most frequent) is applied and the cut searched again; a lone activity whose self-loop is rarer than f of its
// occurrences is the activity alone; empty traces rarer than f are dropped. Without it, a large
// log with a little noise, in which nearly every pair of activities follows each other
// somewhere, had no cut at all and gave the flower model.
func InductiveMinerGraph(l Log, opt Options) *tree.Node {
	m := &miner{names: l.Names, noise: opt.Noise}
	return m.mineGraph(graphOf(l)).Canonical()
}

func (m *miner) mineGraph(g *Graph) *tree.Node {
	if len(g.Acts) == 0 {
		return tree.Silent()
	}
	if g.Empty > 0 {
		h := *g
		h.Empty = 0
		if m.noise > 0 && float64(g.Empty) < m.noise*float64(g.Total) {
			return m.mineGraph(&h)
		}
		return tree.New(tree.Xor, tree.Silent(), m.mineGraph(&h))
	}
	if len(g.Acts) == 1 {
		a := g.Acts[0]
		if n := g.Edges[[2]int32{a, a}]; n > 0 {
			// occurrences of a: the edges into it plus the times it starts a trace
			occ := g.Start[a]
			for e, k := range g.Edges {
				if e[1] == a {
					occ += k
				}
			}
			if m.noise == 0 || float64(n) >= m.noise*float64(occ) {
				return tree.New(tree.Loop, m.leaf(a), tree.Silent())
			}
		}
		return m.leaf(a)
	}
	c, ok := findCut(g)
	if !ok && m.noise > 0 {
		c, ok = findCut(g.filtered(m.noise))
	}
	if !ok {
		return m.fallThroughGraph(g)
	}
	var kids []*tree.Node
	for i, p := range c.parts {
		kids = append(kids, m.mineGraph(subgraph(g, c, i, p)))
	}
	if c.op == tree.Loop {
		return tree.New(tree.Loop, kids[0], kids[1])
	}
	return tree.New(c.op, kids...)
}

func (m *miner) fallThroughGraph(g *Graph) *tree.Node {
	var leaves []*tree.Node
	for _, a := range g.Acts {
		leaves = append(leaves, m.leaf(a))
	}
	return tree.New(tree.Loop, tree.Silent(), tree.New(tree.Xor, leaves...))
}

// subgraph is part i of the cut c of g, with the starts, ends and optionality described at
// InductiveMinerGraph.
func subgraph(g *Graph, c cut, i int, p []int32) *Graph {
	in := map[int32]bool{}
	for _, a := range p {
		in[a] = true
	}
	s := &Graph{Acts: slices.Clone(p), Edges: map[[2]int32]int{}, Start: map[int32]int{}, End: map[int32]int{}, Total: g.Total}
	for e, n := range g.Edges {
		if in[e[0]] && in[e[1]] {
			s.Edges[e] = n
		}
	}
	for a, n := range g.Start {
		if in[a] {
			s.Start[a] += n
		}
	}
	for a, n := range g.End {
		if in[a] {
			s.End[a] += n
		}
	}
	if c.op == tree.Xor || c.op == tree.And {
		return s
	}
	for e, n := range g.Edges {
		if !in[e[0]] && in[e[1]] {
			s.Start[e[1]] += n
		}
		if in[e[0]] && !in[e[1]] {
			s.End[e[0]] += n
		}
	}
	if c.op == tree.Seq {
		partOf := map[int32]int{}
		for k, q := range c.parts {
			for _, a := range q {
				partOf[a] = k
			}
		}
		skip := 0
		for e, n := range g.Edges {
			if partOf[e[0]] < i && partOf[e[1]] > i {
				skip += n
			}
		}
		for a, n := range g.Start {
			if partOf[a] > i {
				skip += n
			}
		}
		for a, n := range g.End {
			if partOf[a] < i {
				skip += n
			}
		}
		s.Empty = skip
	}
	return s
}
