package layout

import (
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
)

// pairwiseCrossings counts the pairs of edge segments that cross between adjacent ranks of a layered
// drawing (each long edge counted once per segment) by trying every pair: the definition, which
// the accumulator tree of layered.crossings must match.
func pairwiseCrossings(layers [][]int, pos []int, segs [][2]int, rank []int) int {
	// group segments by upper rank
	by := map[int][][2]int{}
	for _, s := range segs {
		a, b := s[0], s[1]
		if rank[a] > rank[b] {
			a, b = b, a
		}
		by[rank[a]] = append(by[rank[a]], [2]int{a, b})
	}
	total := 0
	for _, list := range by {
		for i := 0; i < len(list); i++ {
			for j := i + 1; j < len(list); j++ {
				a, b := list[i], list[j]
				u := pos[a[0]] - pos[b[0]]
				l := pos[a[1]] - pos[b[1]]
				if u*l < 0 {
					total++
				}
			}
		}
	}
	return total
}

// TestCrossingsAgainstPairwise: the accumulator-tree count equals the plain count over every pair
// of segments (the definition) on generated graphs, in their first order and after shuffling each
// rank.
func TestCrossingsAgainstPairwise(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 6))
	for k := 0; k < 40; k++ {
		g := directlyFollowsLike(r, 10+r.IntN(60))
		dag, _ := breakCycles(len(g.Width), g.Edges)
		rank := rankNodes(len(g.Width), dag)
		L := build(g, rank, func(e Edge) (int, int, bool) {
			if rank[e.From] < rank[e.To] {
				return e.From, e.To, false
			}
			return e.To, e.From, true
		})
		L.initialOrder(nil)
		for shuffle := 0; shuffle < 3; shuffle++ {
			assert.Equal(t, pairwiseCrossings(L.layers, L.pos, L.segs, L.rank), L.crossings())
			for _, layer := range L.layers {
				r.Shuffle(len(layer), func(i, j int) { layer[i], layer[j] = layer[j], layer[i] })
			}
			L.reindex()
		}
	}
}
