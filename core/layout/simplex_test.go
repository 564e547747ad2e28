package layout

import (
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/optimize/convex/lp"
)

// TestRanksAreOptimal compares network simplex with gonum's simplex LP solver on the ranking
// problem of Gansner et al. (1993, section 2): minimise Σ w(u,v)·(r(v) − r(u)) subject to
// r(v) − r(u) ≥ 1; and, in the second half of the trials, with a least difference of 1 to 60 per
// edge, as the x-coordinates ask (section 4.2). The constraint matrix is totally unimodular, so
// the LP optimum is the integer optimum and the two totals must agree.
func TestRanksAreOptimal(t *testing.T) {
	r := rand.New(rand.NewPCG(8, 8))
	for trial := 0; trial < 80; trial++ {
		minLen := func() int {
			if trial < 40 {
				return 1
			}
			return 1 + r.IntN(60)
		}
		n := 3 + r.IntN(12)
		seen := map[[2]int]bool{}
		var dag []dagEdge
		for v := 1; v < n; v++ { // connected: each node gets an edge from an earlier one
			u := r.IntN(v)
			seen[[2]int{u, v}] = true
			dag = append(dag, dagEdge{u, v, 1 + r.IntN(9), minLen()})
		}
		for k := 0; k < n; k++ {
			u, v := r.IntN(n), r.IntN(n)
			if u < v && !seen[[2]int{u, v}] {
				seen[[2]int{u, v}] = true
				dag = append(dag, dagEdge{u, v, 1 + r.IntN(9), minLen()})
			}
		}
		rank := networkSimplex(n, dag, false, nil)
		ours := 0.0
		for _, e := range dag {
			require.GreaterOrEqual(t, rank[e.to]-rank[e.from], e.minLen, "feasible")
			ours += float64(e.weight * (rank[e.to] - rank[e.from]))
		}
		require.InDelta(t, lpOptimum(n, dag), ours, 1e-6, "trial %d: %d nodes, %d edges", trial, n, len(dag))
		// from a feasible start far from the optimum (every difference of the solution tripled,
		// so still at least minLen) the same optimum comes out
		start := make([]int, n)
		for v := range start {
			start[v] = 3 * rank[v]
		}
		again := networkSimplex(n, dag, false, start)
		total := 0.0
		for _, e := range dag {
			require.GreaterOrEqual(t, again[e.to]-again[e.from], e.minLen, "feasible from a start")
			total += float64(e.weight * (again[e.to] - again[e.from]))
		}
		require.InDelta(t, ours, total, 1e-6, "trial %d from a start", trial)
	}
}

// lpOptimum solves the ranking LP in standard form: ranks r = p − q with p, q ≥ 0, one slack
// s ≥ 0 per edge: r(v) − r(u) − s = minLen.
func lpOptimum(n int, dag []dagEdge) float64 {
	m := len(dag)
	cols := 2*n + m
	c := make([]float64, cols)
	A := mat.NewDense(m, cols, nil)
	b := make([]float64, m)
	for i, e := range dag {
		w := float64(e.weight)
		c[e.to] += w
		c[n+e.to] -= w
		c[e.from] -= w
		c[n+e.from] += w
		A.Set(i, e.to, 1)
		A.Set(i, n+e.to, -1)
		A.Set(i, e.from, -1)
		A.Set(i, n+e.from, 1)
		A.Set(i, 2*n+i, -1)
		b[i] = float64(e.minLen)
	}
	opt, _, err := lp.Simplex(c, A, b, 1e-10, nil)
	if err != nil {
		panic(err)
	}
	return opt
}
