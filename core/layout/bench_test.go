package layout

import (
	"fmt"
	"math/rand/v2"
	"testing"
)

// dot's default node size and spacing in points (0.75 by 0.5 inch boxes, nodesep 0.25 inch,
// ranksep 0.5 inch), used for our drawings too when they are compared with dot's.
const (
	dotW, dotH, dotNodeSep, dotRankSep = 54, 36, 18, 36
)

// directlyFollowsLike makes graphs shaped like directly-follows graphs: a main flow with
// branches, some back edges (loops) and a few long jumps.
func directlyFollowsLike(r *rand.Rand, n int) Graph {
	g := Graph{Width: make([]float64, n), Height: make([]float64, n)}
	for i := range g.Width {
		g.Width[i], g.Height[i] = dotW, dotH
	}
	seen := map[[2]int]bool{}
	add := func(a, b, w int) {
		if a != b && !seen[[2]int{a, b}] {
			seen[[2]int{a, b}] = true
			g.Edges = append(g.Edges, Edge{From: a, To: b, Weight: w})
		}
	}
	for v := 1; v < n; v++ {
		add(max(0, v-1-r.IntN(3)), v, 1+r.IntN(20))
	}
	for k := 0; k < n/2; k++ {
		a := r.IntN(n)
		add(a, min(n-1, a+1+r.IntN(4)), 1+r.IntN(5))
	}
	for k := 0; k < n/6; k++ {
		a := r.IntN(n)
		add(a, max(0, a-1-r.IntN(3)), 1+r.IntN(3))
	}
	return g
}

// BenchmarkLayout times our engine alone (this one also runs under GOOS=js GOARCH=wasm, without
// the reference).
func BenchmarkLayout(b *testing.B) {
	for _, n := range []int{20, 50, 100, 200} {
		g := directlyFollowsLike(rand.New(rand.NewPCG(uint64(n), 7)), n)
		b.Run(fmt.Sprintf("nodes=%d", n), func(b *testing.B) {
			for b.Loop() {
				if _, err := Layout(g, Options{}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
