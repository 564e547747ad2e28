package conformance

import (
	"context"
	"fmt"
	"math/rand/v2"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/graph/path"
	"gonum.org/v1/gonum/graph/simple"

	"tracewright/core/eventlog"
	"tracewright/core/intake"
	"tracewright/core/petri"
	"tracewright/core/tree"
)

func logOf(t *testing.T, traces ...string) *eventlog.Log {
	var b strings.Builder
	b.WriteString("case,activity,time\n")
	for c, tr := range traces {
		for i, a := range strings.Split(tr, ",") {
			fmt.Fprintf(&b, "%d,%s,2024-01-01T00:%02d:00Z\n", c, a, i)
		}
	}
	l, _, err := intake.Read(context.Background(), strings.NewReader(b.String()), intake.Options{})
	require.NoError(t, err)
	return l
}

func netOf(t *testing.T, s string) *petri.Net {
	tr, err := tree.Parse(s)
	require.NoError(t, err)
	return petri.FromTree(tr)
}

// TestAlignmentFitnessByHand: on a → b → c the trace ⟨a, c⟩ needs one model move (b): cost 1;
// its fitness is 1 − 1 / (2 log moves + 3, the shortest model run) = 0.8. The log
// [⟨a, c⟩, ⟨a, b, c⟩] has fitness 1 − (1 + 0) / (5 + 6) = 1 − 1/11, not the mean of 0.8 and 1
// (worked by hand from the definition of Adriansyah et al. 2011).
func TestAlignmentFitnessByHand(t *testing.T) {
	n := netOf(t, "→(a, b, c)")
	res, err := AlignLog(logOf(t, "a,c"), n, Costs{}, Bound{States: 10000})
	require.NoError(t, err)
	assert.Equal(t, 3, res.ShortestRun)
	assert.InDelta(t, 0.8, res.Fitness, 1e-12)
	assert.Equal(t, 1, res.Variants[0].Cost)
	res, err = AlignLog(logOf(t, "a,c", "a,b,c"), n, Costs{}, Bound{States: 10000})
	require.NoError(t, err)
	assert.InDelta(t, 1-1.0/11, res.Fitness, 1e-12)
	assert.Equal(t, 1, res.FittingCases)
}

// TestPrecisionByHand: escaping edges on a → ×(b, c) → d. With the log [⟨a, b, d⟩] the states
// are ⟨⟩ (allows a, shows a), ⟨a⟩ (allows b and c, shows b: c escapes), ⟨a, b⟩ (allows d,
// shows d) and ⟨a, b, d⟩ (allows nothing): precision = 1 − 1/4 = 0.75. Adding ⟨a, c, d⟩ nothing
// escapes: 1.0. A flower model over the same activities allows everything everywhere: lower.
func TestPrecisionByHand(t *testing.T) {
	n := netOf(t, "→(a, ×(b, c), d)")
	res, err := AlignLog(logOf(t, "a,b,d"), n, Costs{}, Bound{States: 10000})
	require.NoError(t, err)
	assert.InDelta(t, 0.75, res.Precision, 1e-12)
	res, err = AlignLog(logOf(t, "a,b,d", "a,c,d"), n, Costs{}, Bound{States: 10000})
	require.NoError(t, err)
	assert.InDelta(t, 1.0, res.Precision, 1e-12)
	flower := netOf(t, "↺(τ, ×(a, b, c, d))")
	res, err = AlignLog(logOf(t, "a,b,d", "a,c,d"), flower, Costs{}, Bound{States: 10000})
	require.NoError(t, err)
	assert.Equal(t, 1.0, res.Fitness)
	assert.Less(t, res.Precision, 0.5)
}

// syncProductCost builds the synchronous product's reachable state space explicitly and finds the
// cheapest path to the goal with gonum's Dijkstra (graph/path), the reference for our A*.
func syncProductCost(t *testing.T, n *petri.Net, trace []string) float64 {
	g := simple.NewWeightedDirectedGraph(0, 0)
	ids := map[string]int64{}
	var marks []petri.Marking
	var idx []int
	node := func(m petri.Marking, i int) (int64, bool) {
		k := fmt.Sprintf("%d|%s", i, m.Key())
		if id, ok := ids[k]; ok {
			return id, false
		}
		id := int64(len(ids))
		ids[k] = id
		g.AddNode(simple.Node(id))
		marks = append(marks, m)
		idx = append(idx, i)
		return id, true
	}
	edge := func(a, b int64, w float64) {
		if e := g.WeightedEdge(a, b); e != nil && e.Weight() <= w {
			return
		}
		g.SetWeightedEdge(simple.WeightedEdge{F: simple.Node(a), T: simple.Node(b), W: w})
	}
	start, _ := node(n.Initial, 0)
	for q := []int64{start}; len(q) > 0; q = q[1:] {
		id := q[0]
		m, i := marks[id], idx[id]
		if len(ids) > 40000 {
			return -1 // too large for the reference
		}
		if i < len(trace) {
			to, fresh := node(m, i+1)
			edge(id, to, 1)
			if fresh {
				q = append(q, to)
			}
		}
		for tr, tt := range n.Transitions {
			if !n.Enabled(m, tr) {
				continue
			}
			next := n.Fire(m, tr)
			w := 1.0
			if tt.Silent() {
				w = 0
			}
			to, fresh := node(next, i)
			edge(id, to, w)
			if fresh {
				q = append(q, to)
			}
			if i < len(trace) && trace[i] == tt.Label {
				to, fresh := node(next, i+1)
				edge(id, to, 0)
				if fresh {
					q = append(q, to)
				}
			}
		}
	}
	goal, ok := ids[fmt.Sprintf("%d|%s", len(trace), n.Final.Key())]
	require.True(t, ok, "the goal is reachable")
	sp := path.DijkstraFrom(simple.Node(start), g)
	return sp.WeightTo(goal)
}

// TestAlignmentsAgainstDijkstra: on small nets from process trees and a few hundred traces of
// their languages with injected noise (events dropped, doubled, swapped or foreign), A* finds the
// same optimal cost as a plain Dijkstra over the explicit synchronous product.
func TestAlignmentsAgainstDijkstra(t *testing.T) {
	r := rand.New(rand.NewPCG(2, 3))
	for _, model := range []string{
		"→(a, ×(b, c), d)", "→(a, ∧(b, c), d)", "→(a, ↺(→(b, c), e), d)", "→(a, ↺(→(∧(×(b, c), d), e), f), ×(g, h))",
	} {
		tr, err := tree.Parse(model)
		require.NoError(t, err)
		n := petri.FromTree(tr)
		lang := tr.Language(1)
		for k := 0; k < 60; k++ {
			trace := strings.Split(lang[r.IntN(len(lang))], ",")
			for noise := r.IntN(3); noise > 0 && len(trace) > 1; noise-- {
				i := r.IntN(len(trace))
				switch r.IntN(4) {
				case 0:
					trace = append(trace[:i], trace[i+1:]...)
				case 1:
					trace = append(trace[:i+1], trace[i:]...)
				case 2:
					j := r.IntN(len(trace))
					trace[i], trace[j] = trace[j], trace[i]
				default:
					trace = append(trace[:i], append([]string{"z"}, trace[i:]...)...)
				}
			}
			al, err := Align(n, trace, Costs{}, Bound{States: 200000})
			require.NoError(t, err)
			assert.Equal(t, syncProductCost(t, n, trace), float64(al.Cost), "%s on %v", model, trace)
		}
	}
}

// TestGeneratedAlignmentsAgainstDijkstra: the same check on generated models of 6 to 12
// activities (sequences, choices, parallel blocks, loops, optional steps) and about 400 distinct traces played
// out from them with 10-30% of the events dropped, inserted or swapped (ground truth: a trace
// with no noise has cost 0).
func TestGeneratedAlignmentsAgainstDijkstra(t *testing.T) {
	checked := 0
	for acts := 6; acts <= 12; acts++ {
		g := newGeneratedModel(uint64(100+acts), acts)
		al, err := newAligner(g.net, Costs{})
		require.NoError(t, err)
		clean, _ := g.variants(uint64(acts), 20, 0)
		for _, tr := range clean {
			res, err := al.align(tr, Bound{States: 200000})
			require.NoError(t, err)
			assert.Zero(t, res.Cost, "%v fits %s", tr, g.tree)
		}
		noisy, _ := g.variants(uint64(acts), 100, 0.1+0.2*float64(acts%2))
		for _, tr := range noisy {
			want := syncProductCost(t, g.net, tr)
			if want < 0 {
				continue
			}
			res, err := al.align(tr, Bound{States: 200000})
			require.NoError(t, err)
			assert.Equal(t, want, float64(res.Cost), "%s on %v", g.tree, tr)
			checked++
		}
	}
	assert.Greater(t, checked, 250)
}

// TestBenchmarkModelsAgainstDijkstra: the same check on the two smaller models of
// BenchmarkAlignVariants (21 and 41 transitions), 40 cases each at 10% noise, so the optimality
// its figures claim is checked on the very models they are measured on.
func TestBenchmarkModelsAgainstDijkstra(t *testing.T) {
	for _, acts := range []int{14, 25} {
		g := newGeneratedModel(uint64(acts), acts)
		al, err := newAligner(g.net, Costs{})
		require.NoError(t, err)
		noisy, _ := g.variants(7, 40, 0.1)
		for _, tr := range noisy {
			want := syncProductCost(t, g.net, tr)
			require.GreaterOrEqual(t, want, 0.0, "the reference explores the product in full")
			res, err := al.align(tr, Bound{States: 200000})
			require.NoError(t, err)
			assert.Equal(t, want, float64(res.Cost), "%d transitions, %v", len(g.net.Transitions), tr)
		}
	}
}

func TestBoundIsReported(t *testing.T) {
	n := netOf(t, "∧(a, b, c, d, e, f)")
	_, err := Align(n, []string{"x", "y", "z", "x", "y", "z"}, Costs{}, Bound{States: 10})
	assert.ErrorIs(t, err, ErrBound)
}

func TestDeviations(t *testing.T) {
	n := netOf(t, "→(a, b, c)")
	res, err := AlignLog(logOf(t, "a,c", "a,c", "a,b,x,c", "a,b,c"), n, Costs{}, Bound{States: 10000})
	require.NoError(t, err)
	acts, pats := Deviations(res)
	byName := map[string]ActivityDeviation{}
	for _, d := range acts {
		byName[d.Activity] = d
	}
	assert.Equal(t, ActivityDeviation{Activity: "b", Sync: 2, Skipped: 2}, byName["b"])
	assert.Equal(t, ActivityDeviation{Activity: "x", LogMoves: 1}, byName["x"])
	require.Len(t, pats, 2)
	assert.Equal(t, Pattern{Kind: "model", Activity: "b", Cases: 2, Variants: pats[0].Variants}, pats[0])
	assert.Equal(t, "x", pats[1].Activity)
}
