package conformance

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"
	gonumlp "gonum.org/v1/gonum/optimize/convex/lp"
)

// TestMarkingEquationAgainstGonum: the marking-equation programs of generated nets, for reachable
// markings and remaining events drawn at random, have the same optimum under our warm-started
// dual simplex as under gonum's primal simplex (optimize/convex/lp, a general-purpose reference
// library) solving each from scratch. The order of the programs is random, so the warm start
// moves between distant right-hand sides as well as near ones.
func TestMarkingEquationAgainstGonum(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 12))
	compared := 0
	for _, acts := range []int{8, 11, 14, 20, 25} {
		g := newGeneratedModel(uint64(acts), acts)
		a, err := newAligner(g.net, Costs{})
		require.NoError(t, err)
		p := a.prog
		dense := mat.NewDense(p.m, p.n, nil)
		for j, col := range p.cols {
			for _, e := range col {
				dense.Set(e.i, j, e.v)
			}
		}
		traces, _ := g.variants(uint64(acts), 60, 0.2)
		for k := 0; k < 60; k++ {
			// a reachable marking: a random run of the net from the initial marking
			m := append([]uint8(nil), a.initial...)
			for steps := r.IntN(12); steps > 0; steps-- {
				var on []int
				for tr := range a.need {
					if enabled(m, a.need[tr]) {
						on = append(on, tr)
					}
				}
				if len(on) == 0 {
					break
				}
				tr := on[r.IntN(len(on))]
				for _, d := range a.delta[tr] {
					m[d.p] = uint8(int(m[d.p]) + int(d.k))
				}
			}
			trace := traces[r.IntN(len(traces))]
			s := &search{a: a, trace: make([]int32, len(trace)), b: make([]float64, len(a.keep))}
			for i, x := range trace {
				s.trace[i] = a.labelOf[x]
			}
			i := r.IntN(len(trace) + 1)
			got, _, ok := s.bound(m, i)
			require.True(t, ok || math.IsInf(got, 1))
			b := make([]float64, len(a.keep))
			for q, row := range a.keep {
				b[q] = a.rhs[row]
			}
			want, _, err := gonumlp.Simplex(p.c, dense, b, 1e-10, nil)
			if errors.Is(err, gonumlp.ErrInfeasible) {
				assert.True(t, math.IsInf(got, 1), "%d activities, program %d: gonum finds it infeasible, we found %v", acts, k, got)
				continue
			}
			require.NoError(t, err)
			assert.InDelta(t, want, got, 1e-6, "%d activities, program %d", acts, k)
			compared++
		}
	}
	assert.Greater(t, compared, 200, "most programs are feasible (the markings are reachable)")
}
