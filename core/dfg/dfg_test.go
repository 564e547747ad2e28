package dfg

import (
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"

	"tracewright/core/eventlog"
	"tracewright/core/intake"
	"tracewright/core/internal/logtest"
	"tracewright/core/synth"
)

func read(t *testing.T, csv string) *eventlog.Log { return logtest.FromCSV(t, csv, intake.Options{}) }

func edgeMap(g *Graph) map[string][2]int {
	out := map[string][2]int{}
	for _, e := range g.Edges {
		out[g.Nodes[e.From].Name+">"+g.Nodes[e.To].Name] = [2]int{e.Count, e.Cases}
	}
	return out
}

// TestCountsByHand: three cases, counted by hand.
func TestCountsByHand(t *testing.T) {
	l := read(t, `case,activity,time
1,a,2024-01-01T00:00:00Z
1,b,2024-01-01T01:00:00Z
1,c,2024-01-01T03:00:00Z
2,a,2024-01-02T00:00:00Z
2,c,2024-01-02T00:30:00Z
3,a,2024-01-03T00:00:00Z
3,b,2024-01-03T02:00:00Z
3,c,2024-01-03T03:00:00Z
`)
	g := Build(l, Options{})
	assert.Equal(t, map[string][2]int{
		"start>a": {3, 3}, "a>b": {2, 2}, "b>c": {2, 2}, "a>c": {1, 1}, "c>end": {3, 3},
	}, edgeMap(g))
	for _, e := range g.Edges {
		if g.Nodes[e.From].Name == "a" && g.Nodes[e.To].Name == "b" {
			// 1 h in case 1 and 2 h in case 3: mean 5400 s, median 5400 s, max 7200 s
			assert.Equal(t, 5400.0, e.Duration.Mean)
			assert.Equal(t, 5400.0, e.Duration.Median)
			assert.Equal(t, 7200.0, e.Duration.Max)
		}
	}
	byName := map[string]Node{}
	for _, n := range g.Nodes {
		byName[n.Name] = n
	}
	assert.Equal(t, 2, byName["b"].Count)
	assert.Equal(t, 2, byName["b"].Cases)

	// a and c hold 6 of 8 instances, over 60%: b is hidden and a leads straight to c everywhere
	h := Build(l, Options{Activities: 0.6})
	assert.Equal(t, 1, h.HiddenActs)
	assert.Equal(t, map[string][2]int{"start>a": {3, 3}, "a>c": {3, 3}, "c>end": {3, 3}}, edgeMap(h))
}

// TestAbstractionKeepsPaths: on generated logs, any pair of shares leaves every shown activity
// reachable from start and able to reach end (property test).
func TestAbstractionKeepsPaths(t *testing.T) {
	l := logtest.Generated(t, synth.Config{Seed: 9, Events: 20000, Noise: 0.1, StartTimes: true})
	r := rand.New(rand.NewPCG(1, 2))
	for i := 0; i < 40; i++ {
		opt := Options{Activities: 0.3 + 0.7*r.Float64(), Edges: 0.05 + 0.95*r.Float64()}
		g := Build(l, opt)
		all := make([]bool, len(g.Edges))
		for k := range all {
			all[k] = true
		}
		fwd, bwd := g.reach(all, startNode, true), g.reach(all, endNode, false)
		for _, n := range g.Nodes {
			assert.True(t, fwd[n.ID] && bwd[n.ID], "%+v: %s is cut off", opt, n.Name)
		}
	}
	full := Build(l, Options{})
	few := Build(l, Options{Edges: 0.3})
	assert.Less(t, len(few.Edges), len(full.Edges))
	assert.Positive(t, few.HiddenEdges)
}

func TestTopCases(t *testing.T) {
	l := read(t, `case,activity,time
1,a,2024-01-01T00:00:00Z
1,b,2024-01-01T01:00:00Z
2,a,2024-01-02T00:00:00Z
2,b,2024-01-02T03:00:00Z
3,a,2024-01-03T00:00:00Z
3,c,2024-01-03T00:10:00Z
`)
	a, _ := l.Activities.Lookup("a")
	b, _ := l.Activities.Lookup("b")
	got := TopCases(l, Options{}, a, b, 5)
	// waits a→b: 3 h in case 2, 1 h in case 1; case 3 never goes a→b
	assert.Equal(t, []CaseRef{{"2", 10800}, {"1", 3600}}, got)
	assert.Len(t, TopCases(l, Options{}, -1, a, 5), 3, "all three cases start with a")
	assert.Len(t, TopCases(l, Options{}, a, -3, 1), 1, "k caps the list")
}
