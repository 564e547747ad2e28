package conformance

import (
	"context"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"tracewright/core/intake"
	"tracewright/core/petri"
	"tracewright/core/tree"
)

// parallelNet is a → parallel(b, c) → d drawn by hand: a puts tokens in p1 (for b) and p2 (for
// c); d needs both p3 (after b) and p4 (after c).
func parallelNet() *petri.Net {
	n := &petri.Net{}
	i, p1, p2, p3, p4, o := n.AddPlace("i", ""), n.AddPlace("p1", ""), n.AddPlace("p2", ""), n.AddPlace("p3", ""), n.AddPlace("p4", ""), n.AddPlace("o", "")
	n.AddTransition("a", "a", []int{i}, []int{p1, p2})
	n.AddTransition("b", "b", []int{p1}, []int{p3})
	n.AddTransition("c", "c", []int{p2}, []int{p4})
	n.AddTransition("d", "d", []int{p3, p4}, []int{o})
	n.Initial, n.Final = n.Marking(i), n.Marking(o)
	return n
}

// TestWorkedExample works token replay by hand (Rozinat and van der Aalst 2008, section 4) on
// a → parallel(b, c) → d with the trace ⟨a, b, d⟩:
//
//	start: the initial token is produced                     p = 1
//	a fires: consumes i, produces p1 and p2                  c = 1, p = 3
//	b fires: consumes p1, produces p3                        c = 2, p = 4
//	d needs p3 and p4; p4 is missing: create it              m = 1
//	d fires: consumes p3 and p4, produces o                  c = 4, p = 5
//	end: the final token in o is consumed                    c = 5
//	the token in p2 is left                                  r = 1
//
// so p = c = 5, m = r = 1 and fitness = ½(1 − 1/5) + ½(1 − 1/5) = 0.8.
func TestWorkedExample(t *testing.T) {
	tok, unplayed := ReplayTrace(parallelNet(), nil, []string{"a", "b", "d"})
	assert.Equal(t, Tokens{Produced: 5, Consumed: 5, Missing: 1, Remaining: 1}, tok)
	assert.InDelta(t, 0.8, tok.Fitness(), 1e-12)
	assert.Zero(t, unplayed)
	fit, _ := ReplayTrace(parallelNet(), nil, []string{"a", "c", "b", "d"})
	assert.Equal(t, 1.0, fit.Fitness(), "a trace of the model fits perfectly")
}

// TestSilentSteps: in →(a, ×(b, τ), c), the trace ⟨a, c⟩ fits by firing the τ before c.
func TestSilentSteps(t *testing.T) {
	tr, err := tree.Parse("→(a, ×(b, τ), c)")
	require.NoError(t, err)
	n := petri.FromTree(tr)
	tok, _ := ReplayTrace(n, nil, []string{"a", "c"})
	assert.Equal(t, 1.0, tok.Fitness())
	assert.Zero(t, tok.Missing)
	tok, _ = ReplayTrace(n, nil, []string{"a", "b", "b", "c"})
	assert.Less(t, tok.Fitness(), 1.0)
}

// TestLogFitnessIsNotTheMean: the log's fitness sums tokens over traces.
func TestLogFitnessIsNotTheMean(t *testing.T) {
	csv := "case,activity,time\n1,a,2024-01-01T00:00:00Z\n1,b,2024-01-01T01:00:00Z\n1,d,2024-01-01T02:00:00Z\n" +
		"2,a,2024-01-02T00:00:00Z\n2,b,2024-01-02T01:00:00Z\n2,c,2024-01-02T02:00:00Z\n2,d,2024-01-02T03:00:00Z\n2,x,2024-01-02T04:00:00Z\n"
	l, _, err := intake.Read(context.Background(), strings.NewReader(csv), intake.Options{})
	require.NoError(t, err)
	res := Replay(l, parallelNet())
	// trace 1: p=5 c=5 m=1 r=1; trace 2: p=6 c=6 m=0 r=0 (x unplayed); sums p=11 c=11 m=1 r=1
	assert.Equal(t, Tokens{Produced: 11, Consumed: 11, Missing: 1, Remaining: 1}, res.Tokens)
	assert.InDelta(t, 1-1.0/11, res.Fitness, 1e-12)
	assert.Equal(t, []string{"x"}, res.Unmatched.Activities)
	assert.Empty(t, res.Unmatched.Labels)
}
