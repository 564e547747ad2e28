package layout

import "math"

// extent is the span of node boxes.
func (L *layered) extent(xs []float64) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for v, x := range xs {
		lo = min(lo, x-L.width[v]/2)
		hi = max(hi, x+L.width[v]/2)
	}
	return lo, hi
}

func (L *layered) dummy(v int) bool { return v >= L.real }

// positions assigns x coordinates as dot does (Gansner et al. 1993, section 4.2): in an
// auxiliary graph, each segment (u, v) between adjacent ranks gets a node n with edges n→u and
// n→v of weight ω·Ω, where ω is the input edge's weight and Ω is 1, 2 or 8 as neither, one or
// both ends are dummies (so long edges pull hardest towards straight), and each pair of
// neighbours a, b in a rank gets an edge a→b whose least length is their half widths plus the
// separation. Network simplex on that graph minimises Σ ω·Ω·|x(u) − x(v)| with the separations
// kept, the shortest straightest drawing for the order. weights holds ω per input edge.
//
// Brandes and Köpf's coordinates are the start: rounded and pushed right where rounding broke a
// separation, they are a feasible solution close to the optimum, so network simplex needs few
// exchanges. A graph whose auxiliary graph would exceed simplexLimit nodes keeps them as they are
// (they are computed in linear time).
func (L *layered) positions(nodeSep float64, weights []int) []float64 {
	bk := L.brandesKoepf(nodeSep)
	segments := len(L.segs)
	if L.n+segments > simplexLimit {
		return bk
	}
	sep := func(a, b int) int { return int(math.Ceil((L.width[a]+L.width[b])/2 + nodeSep)) }
	start := make([]int, L.n, L.n+segments)
	for _, layer := range L.layers {
		for i, v := range layer {
			x := int(math.Round(bk[v]))
			if i > 0 {
				x = max(x, start[layer[i-1]]+sep(layer[i-1], v))
			}
			start[v] = x
		}
	}
	var dag []dagEdge
	aux := L.n
	for i, chain := range L.chains {
		w := max(1, weights[i])
		for k := 1; k < len(chain); k++ {
			u, v := chain[k-1], chain[k]
			start = append(start, min(start[u], start[v]))
			omega := 1
			switch {
			case L.dummy(u) && L.dummy(v):
				omega = 8
			case L.dummy(u) || L.dummy(v):
				omega = 2
			}
			dag = append(dag, dagEdge{aux, u, w * omega, 0}, dagEdge{aux, v, w * omega, 0})
			aux++
		}
	}
	for _, layer := range L.layers {
		for i := 0; i+1 < len(layer); i++ {
			a, b := layer[i], layer[i+1]
			dag = append(dag, dagEdge{a, b, 0, sep(a, b)})
		}
	}
	x := networkSimplex(aux, dag, false, start)
	out := make([]float64, L.n)
	for v := range out {
		out[v] = float64(x[v])
	}
	return out
}

// simplexLimit bounds the auxiliary graph that network simplex places; beyond it Brandes and
// Köpf's coordinates are used alone.
const simplexLimit = 20000
