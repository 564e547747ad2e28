package layout

import (
	"cmp"
	"math/rand/v2"
	"slices"
	"sort"
)

// layered is the graph with ranks, dummy nodes and an order within each rank.
type layered struct {
	n      int // nodes, real ones first
	real   int // how many are real
	rank   []int
	layers [][]int // node ids by rank, in order
	pos    []int   // index of each node within its layer
	up     [][]int // neighbours one rank up, with multiplicity
	down   [][]int
	segs   [][2]int // every segment between adjacent ranks
	chains [][]int  // per input edge: its nodes from the upper end to the lower end
	flip   []bool   // per input edge: drawn against the DAG's direction
	width  []float64
	// scratch of crossings and medianSweep
	byRank  [][][2]int
	tree    []int
	med     []float64
	ps      []int
	movable []int
}

// build adds dummy chains for every input edge (self-loops get none).
func build(g Graph, rank []int, dagOf func(e Edge) (int, int, bool)) *layered {
	L := &layered{real: len(g.Width), rank: slices.Clone(rank), width: slices.Clone(g.Width)}
	L.n = L.real
	L.chains = make([][]int, len(g.Edges))
	L.flip = make([]bool, len(g.Edges))
	for i, e := range g.Edges {
		if e.From == e.To {
			continue
		}
		a, b, flipped := dagOf(e)
		L.flip[i] = flipped
		chain := []int{a}
		for r := L.rank[a] + 1; r < L.rank[b]; r++ {
			L.rank = append(L.rank, r)
			L.width = append(L.width, 0)
			chain = append(chain, L.n)
			L.n++
		}
		chain = append(chain, b)
		L.chains[i] = chain
	}
	L.up = make([][]int, L.n)
	L.down = make([][]int, L.n)
	for _, c := range L.chains {
		for k := 1; k < len(c); k++ {
			L.down[c[k-1]] = append(L.down[c[k-1]], c[k])
			L.up[c[k]] = append(L.up[c[k]], c[k-1])
			L.segs = append(L.segs, [2]int{c[k-1], c[k]})
		}
	}
	maxRank := 0
	for _, r := range L.rank {
		maxRank = max(maxRank, r)
	}
	L.layers = make([][]int, maxRank+1)
	L.pos = make([]int, L.n)
	return L
}

// initialOrder places nodes by a breadth-first walk from the top rank (Gansner et al. 1993,
// init_order), or, when seeds are given, by the seed position of each node that has one.
func (L *layered) initialOrder(seed []float64) {
	for r := range L.layers {
		L.layers[r] = L.layers[r][:0]
	}
	seen := make([]bool, L.n)
	var queue []int
	for v := 0; v < L.n; v++ {
		if len(L.up[v]) == 0 && v < L.real {
			queue = append(queue, v)
		}
	}
	var order []int
	for len(queue) > 0 || len(order) < L.n {
		if len(queue) == 0 {
			for v := 0; v < L.n; v++ {
				if !seen[v] {
					queue = append(queue, v)
					break
				}
			}
		}
		v := queue[0]
		queue = queue[1:]
		if seen[v] {
			continue
		}
		seen[v] = true
		order = append(order, v)
		queue = append(queue, L.down[v]...)
	}
	for _, v := range order {
		L.layers[L.rank[v]] = append(L.layers[L.rank[v]], v)
	}
	if seed != nil {
		for r := range L.layers {
			// nodes with a seed keep their old relative order; the others stay where BFS put them
			layer := L.layers[r]
			key := make(map[int]float64, len(layer))
			for i, v := range layer {
				key[v] = float64(i)
				if v < len(seed) && seed[v] >= 0 {
					key[v] = seed[v] * float64(len(layer))
				}
			}
			sort.SliceStable(layer, func(i, j int) bool { return key[layer[i]] < key[layer[j]] })
		}
	}
	L.reindex()
}

func (L *layered) reindex() {
	for _, layer := range L.layers {
		for i, v := range layer {
			L.pos[v] = i
		}
	}
}

// crossings counts the crossings between adjacent ranks by the accumulator tree of Barth, Jünger
// and Mutzel ("Simple and efficient bilayer cross counting", JGAA 8(2), 2004): the segments of a
// rank pair, sorted by upper then lower position, cross exactly as often as the sequence of their
// lower positions has inversions, which a binary tree over the lower rank counts in
// O(E log V). The median sweeps call it after every sweep, and the order search thousands of
// times, so it reuses its buffers.
func (L *layered) crossings() int {
	if L.byRank == nil {
		L.byRank = make([][][2]int, len(L.layers))
		for _, sg := range L.segs {
			a, b := sg[0], sg[1]
			if L.rank[a] > L.rank[b] {
				a, b = b, a
			}
			L.byRank[L.rank[a]] = append(L.byRank[L.rank[a]], [2]int{a, b})
		}
	}
	total := 0
	for r, list := range L.byRank {
		if len(list) < 2 || r+1 >= len(L.layers) {
			continue
		}
		slices.SortFunc(list, func(x, y [2]int) int {
			if d := L.pos[x[0]] - L.pos[y[0]]; d != 0 {
				return d
			}
			return L.pos[x[1]] - L.pos[y[1]]
		})
		q := len(L.layers[r+1])
		first := 1
		for first < q {
			first *= 2
		}
		tree := L.tree[:0]
		for range 2*first - 1 {
			tree = append(tree, 0)
		}
		first--
		for _, sg := range list {
			i := L.pos[sg[1]] + first
			tree[i]++
			for i > 0 {
				if i%2 == 1 {
					total += tree[i+1]
				}
				i = (i - 1) / 2
				tree[i]++
			}
		}
		L.tree = tree
	}
	return total
}

// medianValue is the weighted median of the neighbours' positions (Gansner et al. 1993, figure
// 3-2), or -1 for a node without neighbours there.
func medianValue(ps []int) float64 {
	slices.Sort(ps)
	m := len(ps) / 2
	switch {
	case len(ps) == 0:
		return -1
	case len(ps)%2 == 1:
		return float64(ps[m])
	case len(ps) == 2:
		return float64(ps[0]+ps[1]) / 2
	}
	left := float64(ps[m-1] - ps[0])
	right := float64(ps[len(ps)-1] - ps[m])
	if left+right == 0 {
		return float64(ps[m-1]+ps[m]) / 2
	}
	return (float64(ps[m-1])*right + float64(ps[m])*left) / (left + right)
}

// order runs median sweeps with transposition and keeps the order with the fewest crossings. As
// dot does, it starts twice when there is no seed (from the breadth-first order and from a
// depth-first one) and lets transposition swap on ties every other sweep, to leave plateaus. Each
// start ends with sifting, which keeps improving where median sweeps stall. Then, as an iterated
// local search, the best order is shaken a few times (one rank's nodes shuffled with a seeded
// source, so the result depends on the graph alone) and polished again; a shaken order that ends
// with fewer crossings replaces the best.
func (L *layered) order(sweeps int, seeded bool) {
	starts := [][][]int{cloneLayers(L.layers)}
	if !seeded {
		starts = append(starts, L.depthFirstOrder())
	}
	best := -1
	var bestLayers [][]int
	polish := func(start [][]int, sweeps int) {
		L.layers = cloneLayers(start)
		L.reindex()
		if c := L.crossings(); best < 0 || c < best {
			best, bestLayers = c, cloneLayers(L.layers)
		}
		for it := 0; it < sweeps && best > 0; it++ {
			L.medianSweep(it%2 == 0)
			L.transpose(it%4 >= 2)
			if c := L.crossings(); c < best {
				best, bestLayers = c, cloneLayers(L.layers)
			}
		}
		L.layers = cloneLayers(bestLayers)
		L.reindex()
		for round := 0; round < 8 && best > 0; round++ {
			L.sift()
			c := L.crossings()
			if c >= best {
				break
			}
			best, bestLayers = c, cloneLayers(L.layers)
		}
	}
	for _, start := range starts {
		polish(start, sweeps)
	}
	r := rand.New(rand.NewPCG(uint64(L.n), uint64(len(L.segs))))
	for shake, since := 0, 0; shake < shakes && since < patience && best > 0 && !seeded; shake++ {
		before := best
		start := cloneLayers(bestLayers)
		layer := start[r.IntN(len(start))]
		if len(layer) > 6 { // shuffle a window of six, so the kick stays local
			at := r.IntN(len(layer) - 5)
			layer = layer[at : at+6]
		}
		r.Shuffle(len(layer), func(i, j int) { layer[i], layer[j] = layer[j], layer[i] })
		polish(start, sweeps/2)
		if since++; best < before {
			since = 0
		}
	}
	L.layers = bestLayers
	L.reindex()
}

// shakes is how many times at most the best order is shaken and polished again, and patience
// how many shakes in a row may bring nothing before the search stops (BenchmarkAgainstDot: 40
// shakes against none took the share of graphs crossed no more than by dot from 80-40% to
// 100-80%; most graphs stop improving well before).
const (
	shakes   = 60
	patience = 60
)

// sift moves each node, busiest first, to the place in its rank where it crosses least with the
// ranks on both sides (Matuszewski, Schönfeld and Molitor, "Using sifting for k-layer straightline
// crossing minimization", Graph Drawing 1999): from the leftmost place, passing a neighbour w
// changes the count by c(w, v) - c(v, w).
func (L *layered) sift() {
	for _, layer := range L.layers {
		if len(layer) < 2 {
			continue
		}
		nodes := slices.Clone(layer)
		slices.SortStableFunc(nodes, func(a, b int) int {
			return len(L.up[b]) + len(L.down[b]) - len(L.up[a]) - len(L.down[a])
		})
		for _, v := range nodes {
			// take v out, put it first
			i := L.pos[v]
			copy(layer[1:i+1], layer[:i])
			layer[0] = v
			for k, u := range layer {
				L.pos[u] = k
			}
			cost, bestCost, bestAt := 0, 0, 0
			for k := 1; k < len(layer); k++ {
				w := layer[k]
				wv, vw := L.pairCrossings(w, v)
				cost += wv - vw
				if cost < bestCost {
					bestCost, bestAt = cost, k
				}
			}
			copy(layer[:bestAt], layer[1:bestAt+1])
			layer[bestAt] = v
			for k, u := range layer {
				L.pos[u] = k
			}
		}
	}
}

// depthFirstOrder orders each rank by a depth-first walk from the top nodes.
func (L *layered) depthFirstOrder() [][]int {
	out := make([][]int, len(L.layers))
	seen := make([]bool, L.n)
	var visit func(v int)
	visit = func(v int) {
		if seen[v] {
			return
		}
		seen[v] = true
		out[L.rank[v]] = append(out[L.rank[v]], v)
		for _, w := range L.down[v] {
			visit(w)
		}
	}
	for _, layer := range L.layers {
		for _, v := range layer {
			if len(L.up[v]) == 0 {
				visit(v)
			}
		}
	}
	for _, layer := range L.layers {
		for _, v := range layer {
			visit(v)
		}
	}
	return out
}

func cloneLayers(ls [][]int) [][]int {
	out := make([][]int, len(ls))
	for i, l := range ls {
		out[i] = slices.Clone(l)
	}
	return out
}

func (L *layered) medianSweep(down bool) {
	if L.med == nil {
		L.med = make([]float64, L.n)
	}
	med := L.med
	for k := 1; k < len(L.layers); k++ {
		r := k
		if !down {
			r = len(L.layers) - 1 - k
		}
		layer := L.layers[r]
		for _, v := range layer {
			nb := L.up[v]
			if !down {
				nb = L.down[v]
			}
			ps := L.ps[:0]
			for _, u := range nb {
				ps = append(ps, L.pos[u])
			}
			L.ps = ps
			med[v] = medianValue(ps)
		}
		// nodes without neighbours keep their places; the others are sorted by median
		movable := L.movable[:0]
		for _, v := range layer {
			if med[v] >= 0 {
				movable = append(movable, v)
			}
		}
		slices.SortStableFunc(movable, func(a, b int) int { return cmp.Compare(med[a], med[b]) })
		j := 0
		for i, v := range layer {
			if med[v] >= 0 {
				layer[i] = movable[j]
				j++
			}
		}
		L.movable = movable
		for i, v := range layer {
			L.pos[v] = i
		}
	}
}

// pairCrossings counts crossings between the edges of u and of v with the ranks above and below,
// both ways in one pass: uv with u left of v, vu with v left of u.
func (L *layered) pairCrossings(u, v int) (uv, vu int) {
	pos := L.pos
	for _, nb := range [2][][]int{L.up, L.down} {
		for _, a := range nb[u] {
			pa := pos[a]
			for _, b := range nb[v] {
				if pb := pos[b]; pa > pb {
					uv++
				} else if pa < pb {
					vu++
				}
			}
		}
	}
	return uv, vu
}

// transpose swaps neighbours while that lowers crossings (Gansner et al. 1993, figure 3-3); with
// ties it also swaps pairs whose crossings stay equal (once per pair and call).
func (L *layered) transpose(ties bool) {
	for improved, rounds := true, 0; improved && rounds < 20; rounds++ {
		improved = false
		for _, layer := range L.layers {
			for i := 0; i+1 < len(layer); i++ {
				u, v := layer[i], layer[i+1]
				before, after := L.pairCrossings(u, v)
				if after < before || (ties && rounds == 0 && after == before && after > 0) {
					layer[i], layer[i+1] = v, u
					L.pos[u], L.pos[v] = i+1, i
					if after < before {
						improved = true
					}
				}
			}
		}
	}
}
