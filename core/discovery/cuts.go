package discovery

import (
	"slices"

	"tracewright/core/tree"
)

// cut is a partition of a graph's activities under an operator. For Seq the parts are in order;
// for Loop the first part is the body and the second the redo part.
type cut struct {
	op    tree.Op
	parts [][]int32
}

// findCut tries the four cuts in the order of the paper: exclusive choice, sequence, parallel,
// loop. It costs O(n·(n+e)) for n activities and e edges (the sequence cut's reachability).
func findCut(g *Graph) (cut, bool) {
	if len(g.Acts) < 2 {
		if len(g.Acts) == 1 && g.has(g.Acts[0], g.Acts[0]) {
			return cut{}, false
		}
		return cut{}, false
	}
	if p := xorCut(g); len(p) > 1 {
		return cut{tree.Xor, p}, true
	}
	if p := seqCut(g); len(p) > 1 {
		return cut{tree.Seq, p}, true
	}
	if p := andCut(g); len(p) > 1 {
		return cut{tree.And, p}, true
	}
	if p := loopCut(g); len(p) > 1 {
		return cut{tree.Loop, p}, true
	}
	return cut{}, false
}

// unionFind over activity ids.
type unionFind map[int32]int32

func (u unionFind) find(a int32) int32 {
	for u[a] != a {
		u[a] = u[u[a]]
		a = u[a]
	}
	return a
}

func (u unionFind) union(a, b int32) { u[u.find(a)] = u.find(b) }

func newUnionFind(acts []int32) unionFind {
	u := unionFind{}
	for _, a := range acts {
		u[a] = a
	}
	return u
}

// groups lists the classes of u, each sorted, ordered by their smallest member.
func (u unionFind) groups(acts []int32) [][]int32 {
	by := map[int32][]int32{}
	var roots []int32
	for _, a := range acts {
		r := u.find(a)
		if _, ok := by[r]; !ok {
			roots = append(roots, r)
		}
		by[r] = append(by[r], a)
	}
	var out [][]int32
	for _, r := range roots {
		out = append(out, by[r])
	}
	return out
}

// xorCut: the connected components of the graph taken as undirected.
func xorCut(g *Graph) [][]int32 {
	u := newUnionFind(g.Acts)
	for e := range g.Edges {
		u.union(e[0], e[1])
	}
	return u.groups(g.Acts)
}

// reach computes for each activity the set of activities reachable by one or more edges.
func reach(g *Graph) map[int32]map[int32]bool {
	succ := map[int32][]int32{}
	for e := range g.Edges {
		succ[e[0]] = append(succ[e[0]], e[1])
	}
	r := map[int32]map[int32]bool{}
	for _, a := range g.Acts {
		seen := map[int32]bool{}
		stack := slices.Clone(succ[a])
		for len(stack) > 0 {
			x := stack[len(stack)-1]
			stack = stack[:len(stack)-1]
			if seen[x] {
				continue
			}
			seen[x] = true
			stack = append(stack, succ[x]...)
		}
		r[a] = seen
	}
	return r
}

// seqCut: activities that reach each other (a strongly connected component) or that cannot reach
// each other in either direction belong to the same part; the parts must then form a chain in
// which every activity of an earlier part reaches every activity of a later one and not back.
func seqCut(g *Graph) [][]int32 {
	r := reach(g)
	u := newUnionFind(g.Acts)
	for i, a := range g.Acts {
		for _, b := range g.Acts[i+1:] {
			ab, ba := r[a][b], r[b][a]
			if ab == ba {
				u.union(a, b)
			}
		}
	}
	// merging can make new pairs of parts equivalent; repeat until stable
	for changed := true; changed; {
		changed = false
		parts := u.groups(g.Acts)
		for i := range parts {
			for j := i + 1; j < len(parts); j++ {
				ij := reachesAll(r, parts[i], parts[j])
				ji := reachesAll(r, parts[j], parts[i])
				if ij == ji {
					u.union(parts[i][0], parts[j][0])
					changed = true
				}
			}
		}
	}
	parts := u.groups(g.Acts)
	slices.SortFunc(parts, func(p, q []int32) int {
		if reachesAll(r, p, q) {
			return -1
		}
		return 1
	})
	for i := range parts {
		for j := i + 1; j < len(parts); j++ {
			if !reachesAll(r, parts[i], parts[j]) || reachesAny(r, parts[j], parts[i]) {
				return nil
			}
		}
	}
	return parts
}

func reachesAll(r map[int32]map[int32]bool, from, to []int32) bool {
	for _, a := range from {
		for _, b := range to {
			if !r[a][b] {
				return false
			}
		}
	}
	return true
}

func reachesAny(r map[int32]map[int32]bool, from, to []int32) bool {
	for _, a := range from {
		for _, b := range to {
			if r[a][b] {
				return true
			}
		}
	}
	return false
}

// andCut: the connected components of the negated graph (a and b joined unless each directly
// follows the other); a part without a start or an end activity is merged with another part.
func andCut(g *Graph) [][]int32 {
	u := newUnionFind(g.Acts)
	for i, a := range g.Acts {
		for _, b := range g.Acts[i+1:] {
			if !(g.has(a, b) && g.has(b, a)) {
				u.union(a, b)
			}
		}
	}
	parts := u.groups(g.Acts)
	complete := func(p []int32) bool {
		s, e := false, false
		for _, a := range p {
			s = s || g.Start[a] > 0
			e = e || g.End[a] > 0
		}
		return s && e
	}
	var good, bad [][]int32
	for _, p := range parts {
		if complete(p) {
			good = append(good, p)
		} else {
			bad = append(bad, p)
		}
	}
	if len(good) == 0 {
		return nil
	}
	for _, p := range bad {
		good[0] = append(good[0], p...)
		slices.Sort(good[0])
	}
	return good
}

// loopCut: the body holds the start and end activities; the other activities form redo
// components, each of which must be entered only from end activities, all of them, and left only
// to start activities, all of them; a component that breaks this joins the body.
func loopCut(g *Graph) [][]int32 {
	inBody := map[int32]bool{}
	for a := range g.Start {
		inBody[a] = true
	}
	for a := range g.End {
		inBody[a] = true
	}
	var rest []int32
	for _, a := range g.Acts {
		if !inBody[a] {
			rest = append(rest, a)
		}
	}
	if len(rest) == 0 {
		return nil
	}
	u := newUnionFind(rest)
	for e := range g.Edges {
		if !inBody[e[0]] && !inBody[e[1]] {
			u.union(e[0], e[1])
		}
	}
	var starts, ends []int32
	for _, a := range g.Acts {
		if g.Start[a] > 0 {
			starts = append(starts, a)
		}
		if g.End[a] > 0 {
			ends = append(ends, a)
		}
	}
	var body, redo []int32
	for a := range inBody {
		body = append(body, a)
	}
	for _, comp := range u.groups(rest) {
		in := map[int32]bool{}
		for _, c := range comp {
			in[c] = true
		}
		ok := true
		for e := range g.Edges {
			x, y := e[0], e[1]
			switch {
			case inBody[x] && in[y]: // into the component: only from end activities
				if g.End[x] == 0 {
					ok = false
				}
				for _, end := range ends {
					if !g.has(end, y) {
						ok = false
					}
				}
			case in[x] && inBody[y]: // out of it: only to start activities
				if g.Start[y] == 0 {
					ok = false
				}
				for _, s := range starts {
					if !g.has(x, s) {
						ok = false
					}
				}
			}
		}
		// a redo component must be entered and left at all
		if ok && !enteredAndLeft(g, in, inBody) {
			ok = false
		}
		if ok {
			redo = append(redo, comp...)
		} else {
			body = append(body, comp...)
		}
	}
	if len(redo) == 0 {
		return nil
	}
	slices.Sort(body)
	slices.Sort(redo)
	return [][]int32{body, redo}
}

func enteredAndLeft(g *Graph, in, body map[int32]bool) bool {
	entered, left := false, false
	for e := range g.Edges {
		if body[e[0]] && in[e[1]] {
			entered = true
		}
		if in[e[0]] && body[e[1]] {
			left = true
		}
	}
	return entered && left
}
