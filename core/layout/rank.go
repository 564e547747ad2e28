package layout

import "slices"

// dagEdge is an edge of the acyclic graph used for ranking (possibly reversed, merged).
type dagEdge struct {
	from, to int
	weight   int
}

// breakCycles reverses the back edges of a depth-first search that starts from the nodes in
// their input order (Gansner et al. 1993, section 2.1), so that a graph whose first node is where
// cases start keeps its forward flow and turns only the edges that close loops. It returns the
// edges as a DAG (parallel edges merged, self-loops dropped) and how many input edges it turned.
// (Measured against the greedy heuristic of Eades, Lin and Smyth on directly-follows-like graphs
// in BenchmarkAgainstDot: 7.7 against 9.3 crossings at 100 nodes, 12.7 against 20 at 200.)
func breakCycles(n int, edges []Edge) ([]dagEdge, int) {
	out := make([]map[int]int, n)
	for i := range out {
		out[i] = map[int]int{}
	}
	for _, e := range edges {
		if e.From != e.To {
			out[e.From][e.To] += max(1, e.Weight)
		}
	}
	order := dfsOrder(n, out)
	pos := make([]int, n)
	for i, v := range order {
		pos[v] = i
	}
	merged := map[[2]int]int{}
	reversed := 0
	for _, e := range edges {
		if e.From == e.To {
			continue
		}
		a, b := e.From, e.To
		if pos[a] > pos[b] {
			a, b = b, a
			reversed++
		}
		merged[[2]int{a, b}] += max(1, e.Weight)
	}
	var dag []dagEdge
	for k, w := range merged {
		dag = append(dag, dagEdge{k[0], k[1], w})
	}
	slices.SortFunc(dag, func(x, y dagEdge) int {
		if x.from != y.from {
			return x.from - y.from
		}
		return x.to - y.to
	})
	return dag, reversed
}

// rankNodes assigns ranks minimising the weighted total edge length subject to every edge
// pointing at least one rank down, by network simplex (Gansner et al. 1993, section 2), each
// weakly connected component on its own, each starting at rank 0.
func rankNodes(n int, dag []dagEdge) []int {
	rank := make([]int, n)
	comp := make([]int, n)
	for i := range comp {
		comp[i] = -1
	}
	adj := make([][]int, n) // edge indices
	for i, e := range dag {
		adj[e.from] = append(adj[e.from], i)
		adj[e.to] = append(adj[e.to], i)
	}
	nc := 0
	for s := 0; s < n; s++ {
		if comp[s] >= 0 {
			continue
		}
		stack := []int{s}
		comp[s] = nc
		for len(stack) > 0 {
			v := stack[len(stack)-1]
			stack = stack[:len(stack)-1]
			for _, ei := range adj[v] {
				e := dag[ei]
				w := e.from + e.to - v
				if comp[w] < 0 {
					comp[w] = nc
					stack = append(stack, w)
				}
			}
		}
		nc++
	}
	for c := 0; c < nc; c++ {
		var nodes []int
		for v := 0; v < n; v++ {
			if comp[v] == c {
				nodes = append(nodes, v)
			}
		}
		var edges []int
		for i, e := range dag {
			if comp[e.from] == c {
				edges = append(edges, i)
			}
		}
		simplex(nodes, edges, dag, adj, rank)
	}
	return rank
}

// simplex ranks one connected component.
func simplex(nodes, edges []int, dag []dagEdge, adj [][]int, rank []int) {
	// initial ranks: longest path from the sources, in topological order
	indeg := map[int]int{}
	for _, ei := range edges {
		indeg[dag[ei].to]++
	}
	var queue []int
	for _, v := range nodes {
		rank[v] = 0
		if indeg[v] == 0 {
			queue = append(queue, v)
		}
	}
	for len(queue) > 0 {
		v := queue[0]
		queue = queue[1:]
		for _, ei := range adj[v] {
			e := dag[ei]
			if e.from != v {
				continue
			}
			rank[e.to] = max(rank[e.to], rank[v]+1)
			if indeg[e.to]--; indeg[e.to] == 0 {
				queue = append(queue, e.to)
			}
		}
	}
	if len(nodes) == 1 {
		rank[nodes[0]] = 0
		return
	}
	slack := func(ei int) int { e := dag[ei]; return rank[e.to] - rank[e.from] - 1 }
	inTree := map[int]bool{} // edge indices
	// feasible tree: grow tight edges from nodes[0]; pull in the closest node until spanning
	treeNode := map[int]bool{}
	for {
		clear(treeNode)
		clear(inTree)
		treeNode[nodes[0]] = true
		stack := []int{nodes[0]}
		for len(stack) > 0 {
			v := stack[len(stack)-1]
			stack = stack[:len(stack)-1]
			for _, ei := range adj[v] {
				e := dag[ei]
				w := e.from + e.to - v
				if !treeNode[w] && slack(ei) == 0 {
					treeNode[w] = true
					inTree[ei] = true
					stack = append(stack, w)
				}
			}
		}
		if len(treeNode) == len(nodes) {
			break
		}
		best, bestSlack := -1, 0
		for _, ei := range edges {
			e := dag[ei]
			if treeNode[e.from] != treeNode[e.to] {
				if s := slack(ei); best < 0 || s < bestSlack {
					best, bestSlack = ei, s
				}
			}
		}
		delta := bestSlack
		if treeNode[dag[best].to] { // the tree holds the head: move the tree up
			delta = -delta
		}
		for v := range treeNode {
			rank[v] += delta
		}
	}
	// exchanges
	for iter := 0; iter < 10*len(nodes)+100; iter++ {
		leave, cutv := -1, 0
		var tailSide map[int]bool
		for _, ei := range edges {
			if !inTree[ei] {
				continue
			}
			side := treeSide(ei, dag, adj, inTree)
			if cv := cutValue(side, edges, dag); cv < 0 && (leave < 0 || cv < cutv) {
				leave, cutv, tailSide = ei, cv, side
			}
		}
		if leave < 0 {
			break
		}
		enter, best := -1, 0
		for _, ei := range edges {
			e := dag[ei]
			if inTree[ei] || ei == leave {
				continue
			}
			if !tailSide[e.from] && tailSide[e.to] { // from the head component to the tail
				if s := slack(ei); enter < 0 || s < best {
					enter, best = ei, s
				}
			}
		}
		if enter < 0 {
			break
		}
		delete(inTree, leave)
		inTree[enter] = true
		// re-derive ranks from the tree: every tree edge tight
		setRanks(nodes[0], dag, adj, inTree, rank)
	}
	lo := rank[nodes[0]]
	for _, v := range nodes {
		lo = min(lo, rank[v])
	}
	for _, v := range nodes {
		rank[v] -= lo
	}
}

// treeSide marks the nodes on the tail side of tree edge ei (the side of its source).
func treeSide(ei int, dag []dagEdge, adj [][]int, inTree map[int]bool) map[int]bool {
	side := map[int]bool{dag[ei].from: true}
	stack := []int{dag[ei].from}
	for len(stack) > 0 {
		v := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		for _, ej := range adj[v] {
			if ej == ei || !inTree[ej] {
				continue
			}
			e := dag[ej]
			w := e.from + e.to - v
			if !side[w] {
				side[w] = true
				stack = append(stack, w)
			}
		}
	}
	return side
}

// cutValue sums the weights of edges from the tail side to the head side, minus those back.
func cutValue(tail map[int]bool, edges []int, dag []dagEdge) int {
	cv := 0
	for _, ei := range edges {
		e := dag[ei]
		switch {
		case tail[e.from] && !tail[e.to]:
			cv += e.weight
		case !tail[e.from] && tail[e.to]:
			cv -= e.weight
		}
	}
	return cv
}

func setRanks(root int, dag []dagEdge, adj [][]int, inTree map[int]bool, rank []int) {
	seen := map[int]bool{root: true}
	stack := []int{root}
	for len(stack) > 0 {
		v := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		for _, ei := range adj[v] {
			if !inTree[ei] {
				continue
			}
			e := dag[ei]
			w := e.from + e.to - v
			if seen[w] {
				continue
			}
			seen[w] = true
			if w == e.to {
				rank[w] = rank[v] + 1
			} else {
				rank[w] = rank[v] - 1
			}
			stack = append(stack, w)
		}
	}
}

// dfsOrder is a depth-first post-order reversed (a topological order when there are no cycles),
// starting from nodes in their input order: edges against it are the depth-first back edges.
func dfsOrder(n int, out []map[int]int) []int {
	seen := make([]bool, n)
	var post []int
	var visit func(v int)
	visit = func(v int) {
		seen[v] = true
		var next []int
		for w := range out[v] {
			next = append(next, w)
		}
		slices.Sort(next)
		for _, w := range next {
			if !seen[w] {
				visit(w)
			}
		}
		post = append(post, v)
	}
	for v := 0; v < n; v++ {
		if !seen[v] {
			visit(v)
		}
	}
	slices.Reverse(post)
	return post
}
