package layout

import (
	"fmt"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func boxes(n int) Graph {
	g := Graph{Width: make([]float64, n), Height: make([]float64, n)}
	for i := range g.Width {
		g.Width[i], g.Height[i] = 60, 30
	}
	return g
}

// randomGraph makes a connected graph with n nodes and about m edges (some backwards, so with
// cycles, as directly-follows graphs have).
func randomGraph(r *rand.Rand, n, m int) Graph {
	g := boxes(n)
	for v := 1; v < n; v++ {
		g.Edges = append(g.Edges, Edge{From: r.IntN(v), To: v, Weight: 1 + r.IntN(5)})
	}
	for len(g.Edges) < m {
		a, b := r.IntN(n), r.IntN(n)
		if a != b {
			g.Edges = append(g.Edges, Edge{From: a, To: b, Weight: 1 + r.IntN(5)})
		}
	}
	return g
}

// TestNetworkSimplexByHand: on a chain a→b→c with a shortcut a→c, every edge's minimum length 1
// and weights 1, the optimum puts a, b, c on ranks 0, 1, 2 (total length 4, computed by hand);
// with the shortcut weighted 10 it is still 0, 1, 2 (b must lie between a and c).
func TestNetworkSimplexByHand(t *testing.T) {
	dag := []dagEdge{{0, 1, 1, 1}, {1, 2, 1, 1}, {0, 2, 10, 1}}
	assert.Equal(t, []int{0, 1, 2}, rankNodes(3, dag))
	// a diamond with a heavy edge to a side node d: d is pulled next to its heavy neighbour
	dag = []dagEdge{{0, 1, 1, 1}, {1, 2, 1, 1}, {2, 3, 1, 1}, {3, 4, 10, 1}}
	r := rankNodes(5, dag)
	assert.Equal(t, 1, r[4]-r[3])
	// a node with one edge into a long chain's end sits right above it, not at rank 0
	dag = []dagEdge{{0, 1, 1, 1}, {1, 2, 1, 1}, {2, 3, 1, 1}, {4, 3, 1, 1}}
	r = rankNodes(5, dag)
	assert.Equal(t, []int{0, 1, 2, 3, 2}, r)
}

// TestLayeredInvariants checks, on random graphs, what every drawing must satisfy: edges that
// were not reversed point down, nodes in a rank do not overlap, every edge has a path from its
// source to its target (ending on the nodes' boxes).
func TestLayeredInvariants(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	for _, size := range []int{2, 5, 20, 50} {
		for trial := 0; trial < 5; trial++ {
			g := randomGraph(r, size, size*2)
			res, err := Layout(g, Options{})
			require.NoError(t, err)
			byRank := map[int][]int{}
			for v := range g.Width {
				byRank[res.Rank[v]] = append(byRank[res.Rank[v]], v)
			}
			for _, vs := range byRank {
				for i := range vs {
					for j := i + 1; j < len(vs); j++ {
						a, b := vs[i], vs[j]
						gap := abs(res.X[a]-res.X[b]) - (g.Width[a]+g.Width[b])/2
						assert.GreaterOrEqual(t, gap, 0.0, "nodes %d and %d overlap", a, b)
					}
				}
			}
			for i, e := range g.Edges {
				p := res.Paths[i]
				require.NotEmpty(t, p)
				if e.From != e.To {
					// ends on the node's box (an edge and its opposite are set a little apart)
					assert.InDelta(t, res.X[e.From], p[0].X, g.Width[e.From]/2, fmt.Sprintf("edge %d starts at its source", i))
					assert.InDelta(t, res.X[e.To], p[len(p)-1].X, g.Width[e.To]/2, "edge %d ends at its target", i)
				}
			}
		}
	}
}

func TestStability(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 6))
	g := randomGraph(r, 30, 50)
	keys := make([]string, 30)
	for i := range keys {
		keys[i] = fmt.Sprint("n", i)
	}
	first, err := Layout(g, Options{Keys: keys})
	require.NoError(t, err)
	again, err := Layout(g, Options{Keys: keys, Previous: first})
	require.NoError(t, err)
	// laid out again from its own order, the same graph keeps every node's rank and side
	same := 0
	for v := range keys {
		if first.Rank[v] == again.Rank[v] && (first.X[v] < first.Width/2) == (again.X[v] < again.Width/2) {
			same++
		}
	}
	assert.GreaterOrEqual(t, same, 27)
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}
