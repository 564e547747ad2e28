package layout

import (
	"math"
	"slices"
)

// dagEdge is an edge of the acyclic graph used for ranking (possibly reversed, merged).
type dagEdge struct {
	from, to int
	weight   int
	minLen   int // the least rank difference from..to: 1 for ranking, a separation for x
}

// breakCycles reverses the back edges of a depth-first search that starts from the nodes in
// their input order (Gansner et al. 1993, section 2.1), so that a graph whose first node is where
// cases start keeps its forward flow and turns only the edges that close loops. It returns the
// edges as a DAG (parallel edges merged, self-loops dropped) and how many input edges it turned.
// (Measured against the greedy heuristic of Eades, Lin and Smyth on directly-follows-like graphs
// in BenchmarkAgainstDot: 7.7 against 9.3 crossings at 100 nodes, 12.7 against 20 at 200.)
func breakCycles(n int, edges []Edge) ([]dagEdge, int) {
	succ := make([][]int, n)
	for _, e := range edges {
		if e.From != e.To {
			succ[e.From] = append(succ[e.From], e.To)
		}
	}
	order := dfsOrder(n, succ)
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
		dag = append(dag, dagEdge{k[0], k[1], w, 1})
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
func rankNodes(n int, dag []dagEdge) []int { return networkSimplex(n, dag, true, nil) }

// networkSimplex solves min Σ weight·(rank[to] − rank[from]) subject to rank[to] − rank[from] ≥
// minLen for every edge, per weakly connected component, each component's least rank 0; with
// balance, nodes free to move go to the least crowded rank. start, when given, is a feasible
// solution to begin from (else the longest paths from the sources are): a good start leaves
// fewer exchanges.
func networkSimplex(n int, dag []dagEdge, balance bool, start []int) []int {
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
	nodesOf := make([][]int, nc)
	for v := 0; v < n; v++ {
		nodesOf[comp[v]] = append(nodesOf[comp[v]], v)
	}
	edgesOf := make([][]int, nc)
	for i, e := range dag {
		edgesOf[comp[e.from]] = append(edgesOf[comp[e.from]], i)
	}
	r := &ranker{dag: dag, adj: adj, rank: rank, n: n, start: start}
	r.scratch()
	for c := 0; c < nc; c++ {
		r.simplex(nodesOf[c], edgesOf[c])
		if balance {
			r.balance(nodesOf[c])
		}
	}
	return rank
}

// balance moves each node whose incoming and outgoing edges weigh the same (so that its rank
// does not change the total edge length) to the least crowded rank it may take, which keeps
// ranks narrow and leaves fewer edges to cross (Gansner et al. 1993, end of section 2.4).
func (r *ranker) balance(nodes []int) {
	count := map[int]int{}
	for _, v := range nodes {
		count[r.rank[v]]++
	}
	for _, v := range nodes {
		in, out := 0, 0
		lo, hi := math.MinInt, math.MaxInt
		for _, ei := range r.adj[v] {
			e := r.dag[ei]
			if e.to == v {
				in += e.weight
				lo = max(lo, r.rank[e.from]+e.minLen)
			} else {
				out += e.weight
				hi = min(hi, r.rank[e.to]-e.minLen)
			}
		}
		if in != out || lo == math.MinInt || hi == math.MaxInt {
			continue
		}
		best := r.rank[v]
		for k := lo; k <= hi; k++ {
			if count[k] < count[best] {
				best = k
			}
		}
		if best != r.rank[v] {
			count[r.rank[v]]--
			count[best]++
			r.rank[v] = best
		}
	}
}

// ranker holds network simplex's arrays, indexed by node or by edge and shared by the
// components: a tree edge set, a rooted tree with postorder numbers (low, lim), and per node the
// balance f(v) of its edges, so that every cut value comes from one postorder pass.
type ranker struct {
	dag      []dagEdge
	adj      [][]int
	rank     []int
	n        int
	inTree   []bool // per edge
	treeNode []bool // per node
	parent   []int  // the tree edge to the parent, −1 at the root
	low, lim []int
	f, d     []int
	post     []int
	stack    []int
	frames   []frame
	start    []int // a feasible solution to begin from, or nil
}

// frame is a node on the depth-first stack of number, with the next of its edges to look at.
type frame struct{ v, next int }

func (r *ranker) scratch() {
	r.inTree = make([]bool, len(r.dag))
	r.treeNode = make([]bool, r.n)
	r.parent = make([]int, r.n)
	r.low, r.lim = make([]int, r.n), make([]int, r.n)
	r.f, r.d = make([]int, r.n), make([]int, r.n)
}

func (r *ranker) slack(ei int) int { e := r.dag[ei]; return r.rank[e.to] - r.rank[e.from] - e.minLen }

// simplex ranks one connected component. Each exchange costs O(V + E): the cut value of the tree
// edge above node v is ± Σ_{x below v} f(x), where f(x) is the weight of x's outgoing edges less
// its incoming ones (edges inside the subtree cancel), and which side of a tree edge a node lies
// on is read from the postorder numbers (Gansner et al. 1993, section 2.4).
func (r *ranker) simplex(nodes, edges []int) {
	dag, adj, rank := r.dag, r.adj, r.rank
	if r.start != nil {
		for _, v := range nodes {
			rank[v] = r.start[v]
		}
		r.feasibleTree(nodes, edges)
		r.exchange(nodes, edges)
		return
	}
	// initial ranks: longest path from the sources, in topological order
	indeg := r.d // scratch
	for _, v := range nodes {
		indeg[v], rank[v] = 0, 0
	}
	for _, ei := range edges {
		indeg[dag[ei].to]++
	}
	queue := r.stack[:0]
	for _, v := range nodes {
		if indeg[v] == 0 {
			queue = append(queue, v)
		}
	}
	for k := 0; k < len(queue); k++ {
		v := queue[k]
		for _, ei := range adj[v] {
			e := dag[ei]
			if e.from != v {
				continue
			}
			rank[e.to] = max(rank[e.to], rank[v]+e.minLen)
			if indeg[e.to]--; indeg[e.to] == 0 {
				queue = append(queue, e.to)
			}
		}
	}
	r.stack = queue
	if len(nodes) == 1 {
		rank[nodes[0]] = 0
		return
	}
	r.feasibleTree(nodes, edges)
	r.exchange(nodes, edges)
}

// feasibleTree grows a tree of tight edges from nodes[0], pulling in the closest node (shifting
// the tree by the least slack) until the tree spans the component.
func (r *ranker) feasibleTree(nodes, edges []int) {
	dag, adj, rank := r.dag, r.adj, r.rank
	for {
		for _, v := range nodes {
			r.treeNode[v] = false
		}
		for _, ei := range edges {
			r.inTree[ei] = false
		}
		r.treeNode[nodes[0]] = true
		count := 1
		stack := append(r.stack[:0], nodes[0])
		for len(stack) > 0 {
			v := stack[len(stack)-1]
			stack = stack[:len(stack)-1]
			for _, ei := range adj[v] {
				e := dag[ei]
				w := e.from + e.to - v
				if !r.treeNode[w] && r.slack(ei) == 0 {
					r.treeNode[w], r.inTree[ei] = true, true
					count++
					stack = append(stack, w)
				}
			}
		}
		r.stack = stack
		if count == len(nodes) {
			break
		}
		best, bestSlack := -1, 0
		for _, ei := range edges {
			e := dag[ei]
			if r.treeNode[e.from] != r.treeNode[e.to] {
				if s := r.slack(ei); best < 0 || s < bestSlack {
					best, bestSlack = ei, s
				}
			}
		}
		delta := bestSlack
		if r.treeNode[dag[best].to] { // the tree holds the head: move the tree up
			delta = -delta
		}
		for _, v := range nodes {
			if r.treeNode[v] {
				rank[v] += delta
			}
		}
	}
}

// exchange swaps negative-cut tree edges for the tightest edges across their cuts until no cut
// value is negative, then shifts the component's least rank to 0.
func (r *ranker) exchange(nodes, edges []int) {
	dag, rank := r.dag, r.rank
	if len(nodes) == 1 {
		rank[nodes[0]] = 0
		return
	}
	for _, v := range nodes {
		r.f[v] = 0
	}
	for _, ei := range edges {
		e := dag[ei]
		r.f[e.from] += e.weight
		r.f[e.to] -= e.weight
	}
	root := nodes[0]
	for iter := 0; iter < 10*len(nodes)+100; iter++ {
		r.number(root)
		leave, leaveAt, cutv := -1, -1, 0
		for _, v := range r.post {
			r.d[v] = r.f[v]
		}
		for _, v := range r.post { // children come before their parent
			ei := r.parent[v]
			if ei < 0 {
				continue
			}
			e := dag[ei]
			r.d[e.from+e.to-v] += r.d[v]
			cv := r.d[v]
			if e.to == v {
				cv = -cv
			}
			if cv < 0 && (leave < 0 || cv < cutv) {
				leave, leaveAt, cutv = ei, v, cv
			}
		}
		if leave < 0 {
			break
		}
		// the tail side of the leaving edge is the subtree below leaveAt when leaveAt is its
		// tail, else everything else
		lo, hi := r.low[leaveAt], r.lim[leaveAt]
		below := func(x int) bool { return lo <= r.lim[x] && r.lim[x] <= hi }
		tailBelow := dag[leave].from == leaveAt
		enter, best := -1, 0
		for _, ei := range edges {
			if r.inTree[ei] {
				continue
			}
			e := dag[ei]
			if below(e.from) != tailBelow && below(e.to) == tailBelow { // head side to tail side
				if s := r.slack(ei); enter < 0 || s < best {
					enter, best = ei, s
				}
			}
		}
		if enter < 0 {
			break
		}
		r.inTree[leave], r.inTree[enter] = false, true
		r.setRanks(root) // every tree edge tight again
	}
	lo := rank[nodes[0]]
	for _, v := range nodes {
		lo = min(lo, rank[v])
	}
	for _, v := range nodes {
		rank[v] -= lo
	}
}

// number roots the tree at root and gives each node its postorder number lim and the smallest
// number below it, low; post lists the nodes in postorder.
func (r *ranker) number(root int) {
	r.post = r.post[:0]
	r.parent[root] = -1
	stack := append(r.frames[:0], frame{root, 0})
	defer func() { r.frames = stack[:0] }()
	r.low[root] = -1
	for len(stack) > 0 {
		top := &stack[len(stack)-1]
		v := top.v
		if r.low[v] < 0 {
			r.low[v] = len(r.post)
		}
		if top.next < len(r.adj[v]) {
			ei := r.adj[v][top.next]
			top.next++
			if !r.inTree[ei] || ei == r.parent[v] {
				continue
			}
			e := r.dag[ei]
			w := e.from + e.to - v
			r.parent[w] = ei
			r.low[w] = -1
			stack = append(stack, frame{w, 0})
			continue
		}
		r.lim[v] = len(r.post)
		r.post = append(r.post, v)
		stack = stack[:len(stack)-1]
	}
}

// setRanks makes every tree edge tight, walking the tree from root.
func (r *ranker) setRanks(root int) {
	r.number(root)
	for k := len(r.post) - 1; k >= 0; k-- { // parents before children
		v := r.post[k]
		ei := r.parent[v]
		if ei < 0 {
			continue
		}
		e := r.dag[ei]
		if v == e.to {
			r.rank[v] = r.rank[e.from] + e.minLen
		} else {
			r.rank[v] = r.rank[e.to] - e.minLen
		}
	}
}

// dfsOrder is a depth-first post-order reversed (a topological order when there are no cycles),
// starting from nodes in their input order and following each node's edges in their input order,
// as dot's acyclic pass does: edges against it are the depth-first back edges.
func dfsOrder(n int, succ [][]int) []int {
	seen := make([]bool, n)
	var post []int
	var visit func(v int)
	visit = func(v int) {
		seen[v] = true
		for _, w := range succ[v] {
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
