package layout

import (
	"math"
	"slices"
)

// brandesKoepf assigns x coordinates within ranks by Brandes and Köpf, "Fast and simple
// horizontal coordinate assignment" (Graph Drawing 2001): type 1 conflicts
// (a segment between two dummies crossed by another segment) are marked so that long edges stay
// straight; four vertical alignments (to upper or lower medians, from the left or the right) are
// compacted horizontally; the result is the average of the two middle candidates per node, after
// aligning the four to the narrowest.
func (L *layered) brandesKoepf(nodeSep float64) []float64 {
	conflicts := L.type1Conflicts()
	var xss [4][]float64
	k := 0
	for _, vert := range []bool{true, false} { // true: align with the rank above
		for _, right := range []bool{false, true} {
			layers := cloneLayers(L.layers)
			if !vert {
				slices.Reverse(layers)
			}
			if right {
				for _, l := range layers {
					slices.Reverse(l)
				}
			}
			pos := make([]int, L.n)
			for _, l := range layers {
				for i, v := range l {
					pos[v] = i
				}
			}
			nb := L.up
			if !vert {
				nb = L.down
			}
			root, align := L.verticalAlignment(layers, pos, nb, conflicts)
			xs := L.compact(layers, root, align, nodeSep)
			if right {
				for i := range xs {
					xs[i] = -xs[i]
				}
			}
			xss[k] = xs
			k++
		}
	}
	// align to the narrowest layout
	minW, best := math.Inf(1), 0
	for i, xs := range xss {
		lo, hi := L.extent(xs)
		if hi-lo < minW {
			minW, best = hi-lo, i
		}
	}
	blo, bhi := L.extent(xss[best])
	for i, xs := range xss {
		lo, hi := L.extent(xs)
		delta := blo - lo
		if i%2 == 1 { // aligned from the right
			delta = bhi - hi
		}
		for v := range xs {
			xs[v] += delta
		}
	}
	out := make([]float64, L.n)
	for v := range out {
		c := []float64{xss[0][v], xss[1][v], xss[2][v], xss[3][v]}
		slices.Sort(c)
		out[v] = (c[1] + c[2]) / 2
	}
	return out
}

// type1Conflicts marks segments (u above, v below) that cross an inner segment.
func (L *layered) type1Conflicts() map[[2]int]bool {
	conf := map[[2]int]bool{}
	for r := 1; r < len(L.layers); r++ {
		prev, layer := L.layers[r-1], L.layers[r]
		k0, scan := 0, 0
		for i, v := range layer {
			w := -1
			if L.dummy(v) {
				for _, u := range L.up[v] {
					if L.dummy(u) {
						w = u
					}
				}
			}
			k1 := len(prev)
			if w >= 0 {
				k1 = L.pos[w]
			}
			if w >= 0 || i == len(layer)-1 {
				for _, s := range layer[scan : i+1] {
					for _, u := range L.up[s] {
						if p := L.pos[u]; (p < k0 || k1 < p) && !(L.dummy(u) && L.dummy(s)) {
							conf[[2]int{u, s}] = true
						}
					}
				}
				scan, k0 = i+1, k1
			}
		}
	}
	return conf
}

func hasConflict(conf map[[2]int]bool, a, b int) bool {
	return conf[[2]int{a, b}] || conf[[2]int{b, a}]
}

func (L *layered) verticalAlignment(layers [][]int, pos []int, nb [][]int, conf map[[2]int]bool) (root, align []int) {
	root, align = make([]int, L.n), make([]int, L.n)
	for v := range root {
		root[v], align[v] = v, v
	}
	for _, layer := range layers {
		prevIdx := -1
		for _, v := range layer {
			ws := slices.Clone(nb[v])
			if len(ws) == 0 {
				continue
			}
			slices.SortFunc(ws, func(a, b int) int { return pos[a] - pos[b] })
			ws = slices.Compact(ws)
			mp := float64(len(ws)-1) / 2
			for i := int(math.Floor(mp)); i <= int(math.Ceil(mp)); i++ {
				w := ws[i]
				if align[v] == v && prevIdx < pos[w] && !hasConflict(conf, v, w) {
					align[w] = v
					root[v] = root[w]
					align[v] = root[v]
					prevIdx = pos[w]
				}
			}
		}
	}
	return root, align
}

// compact places blocks (nodes sharing a root) as far left as separation allows, then pulls each
// block right towards its successors where it can, by longest paths over the block graph.
func (L *layered) compact(layers [][]int, root, align []int, nodeSep float64) []float64 {
	type edge struct {
		to  int
		sep float64
	}
	succ := map[int][]edge{}
	pred := map[int][]edge{}
	blocks := map[int]bool{}
	for _, layer := range layers {
		for i, v := range layer {
			blocks[root[v]] = true
			if i == 0 {
				continue
			}
			u := layer[i-1]
			sep := (L.width[u]+L.width[v])/2 + nodeSep
			if L.dummy(u) && L.dummy(v) {
				sep = nodeSep / 2
			}
			a, b := root[u], root[v]
			succ[a] = append(succ[a], edge{b, sep})
			pred[b] = append(pred[b], edge{a, sep})
		}
	}
	// topological order of the block graph (it is acyclic: blocks keep the rank orders)
	indeg := map[int]int{}
	for b := range blocks {
		indeg[b] += 0
		for _, e := range succ[b] {
			indeg[e.to]++
		}
	}
	var ids []int
	for b := range blocks {
		ids = append(ids, b)
	}
	slices.Sort(ids)
	var queue, topo []int
	for _, b := range ids {
		if indeg[b] == 0 {
			queue = append(queue, b)
		}
	}
	for len(queue) > 0 {
		b := queue[0]
		queue = queue[1:]
		topo = append(topo, b)
		for _, e := range succ[b] {
			if indeg[e.to]--; indeg[e.to] == 0 {
				queue = append(queue, e.to)
			}
		}
	}
	xb := map[int]float64{}
	for _, b := range topo {
		x := 0.0
		for _, e := range pred[b] {
			x = max(x, xb[e.to]+e.sep)
		}
		xb[b] = x
	}
	for i := len(topo) - 1; i >= 0; i-- {
		b := topo[i]
		m := math.Inf(1)
		for _, e := range succ[b] {
			m = min(m, xb[e.to]-e.sep)
		}
		if !math.IsInf(m, 1) && m > xb[b] {
			xb[b] = m
		}
	}
	xs := make([]float64, L.n)
	for v := range xs {
		xs[v] = xb[root[v]]
	}
	return xs
}
