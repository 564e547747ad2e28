package discovery

import (
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"tracewright/core/synth"
	"tracewright/core/tree"
)

func traces(ss ...string) Log {
	var ts [][]string
	for _, s := range ss {
		if s == "" {
			ts = append(ts, nil)
			continue
		}
		ts = append(ts, strings.Split(s, ","))
	}
	return FromStrings(ts...)
}

// TestRunningExample: the log used as running example by Tax, Sidorova and van der Aalst (2019,
// "Discovering more precise process models from event logs by filtering out chaotic activities",
// J. Intell. Inf. Syst.), whose Inductive Miner model the paper gives as
// →(a, ↺(→(∧(×(b, c), d), e), f), ×(g, h)).
func TestRunningExample(t *testing.T) {
	l := traces("a,b,d,e,h", "a,d,c,e,g", "a,c,d,e,f,b,d,e,g", "a,d,b,e,h", "a,c,d,e,f,d,c,e,f,c,d,e,h", "a,c,d,e,g")
	want, err := tree.Parse("→(a, ↺(→(∧(×(b, c), d), e), f), ×(g, h))")
	require.NoError(t, err)
	for _, noise := range []float64{0, 0.2} {
		got := InductiveMiner(l, Options{Noise: noise})
		assert.Equal(t, want.Canonical().String(), got.String(), "noise %v", noise)
	}
	assert.Equal(t, want.Canonical().String(), InductiveMinerGraph(l, Options{}).String(), "IMd")
}

// TestCuts checks each cut's rule on small hand logs, after the cut definitions of Leemans,
// Fahland and van der Aalst (2013), section 4.
func TestCuts(t *testing.T) {
	for _, tc := range []struct {
		name string
		log  Log
		want string
	}{
		{"exclusive choice", traces("a,b", "c,d"), "×(→(a, b), →(c, d))"},
		{"sequence", traces("a,b,c", "a,c"), "→(a, ×(τ, b), c)"},
		{"parallel", traces("a,b", "b,a"), "∧(a, b)"},
		{"loop", traces("a", "a,b,a", "a,b,a,b,a"), "↺(a, b)"},
		{"loop with silent redo", traces("a", "a,a", "a,a,a"), "↺(a, τ)"},
		{"optional activity", traces("a", ""), "×(a, τ)"},
		{"single", traces("a", "a"), "a"},
		{"parallel with sequence", traces("a,b,c", "b,a,c", "b,c,a"), "∧(a, →(b, c))"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			want, err := tree.Parse(tc.want)
			require.NoError(t, err)
			assert.Equal(t, want.Canonical().String(), InductiveMiner(tc.log, Options{}).String())
		})
	}
}

// TestFlowerWhenNothingFits: a log with no structure gets the flower model, which allows it.
func TestFlowerWhenNothingFits(t *testing.T) {
	l := traces("a,b,c", "c,a,b", "b,c,a", "a,c,b,a")
	got := InductiveMiner(l, Options{})
	for _, tr := range []string{"a,b,c", "c,a,b", "b,c,a", "a,c,b,a"} {
		assert.True(t, accepts(got, strings.Split(tr, ",")), "%s must fit %s", tr, got)
	}
}

// TestNoiseFilter: IMf drops a rare edge that hides a choice, and rare empty traces, where IM
// must model them; IMf tries IM's cuts first, so on a log IM can split it agrees with IM.
func TestNoiseFilter(t *testing.T) {
	var ts []string
	for i := 0; i < 50; i++ {
		ts = append(ts, "a,b", "c,d")
	}
	ts = append(ts, "a,d")
	l := traces(ts...)
	assert.Equal(t, "×(→(a, b), →(c, d))", InductiveMiner(l, Options{Noise: 0.2}).String())
	assert.NotEqual(t, "×(→(a, b), →(c, d))", InductiveMiner(l, Options{}).String())
	// IMd's infrequent variant filters the graph the same way
	assert.Equal(t, "×(→(a, b), →(c, d))", InductiveMinerGraph(l, Options{Noise: 0.2}).String())
	assert.NotEqual(t, "×(→(a, b), →(c, d))", InductiveMinerGraph(l, Options{}).String())

	ts = nil
	for i := 0; i < 50; i++ {
		ts = append(ts, "a")
	}
	l = traces(append(ts, "")...)
	assert.Equal(t, "a", InductiveMiner(l, Options{Noise: 0.2}).String())
	assert.Equal(t, "×(a, τ)", InductiveMiner(l, Options{}).String())

	// the single-activity base case: a repeated in 2 traces of 52 is noise under f = 0.2, in 20
	// of 70 it is a loop (IMf's filtered base case, from memory of the IMf paper)
	l = traces(append(ts, "a,a", "a,a,a")...)
	assert.Equal(t, "a", InductiveMiner(l, Options{Noise: 0.2}).String())
	assert.Equal(t, "↺(a, τ)", InductiveMiner(l, Options{}).String())
	for i := 0; i < 20; i++ {
		ts = append(ts, "a,a")
	}
	assert.Equal(t, "↺(a, τ)", InductiveMiner(traces(ts...), Options{Noise: 0.2}).String())
	assert.Equal(t, "↺(a, τ)", InductiveMinerGraph(traces(ts...), Options{Noise: 0.2}).String())
	assert.Equal(t, "a", InductiveMinerGraph(traces(append(ts[:50], "a,a")...), Options{Noise: 0.2}).String())
}

// TestFilterRule checks IMf's edge filter on counts worked by hand: with f = 0.2, a's edges 50
// and 9 keep 50 and drop 9 (9 < 0.2·50); b's single edge of 1 stays (it is b's most frequent).
func TestFilterRule(t *testing.T) {
	g := &Graph{Edges: map[[2]int32]int{{0, 1}: 50, {0, 2}: 9, {1, 2}: 1}, Start: map[int32]int{0: 50, 1: 5}, End: map[int32]int{2: 55}}
	f := g.filtered(0.2)
	assert.Equal(t, map[[2]int32]int{{0, 1}: 50, {1, 2}: 1}, f.Edges)
	assert.Equal(t, map[int32]int{0: 50}, f.Start)
}

// accepts reports whether the tree allows the trace, by its bounded language.
func accepts(n *tree.Node, tr []string) bool {
	want := strings.Join(tr, ",")
	for _, s := range n.Language(len(tr)) {
		if s == want {
			return true
		}
	}
	return false
}

// TestFrequent: the most frequent traces are kept until they cover the share, ties to the first.
func TestFrequent(t *testing.T) {
	l := traces("a,b", "a,b", "a,b", "a,b", "a,c", "a,c", "a,d", "a,e", "a,f", "a,g")
	for _, tc := range []struct {
		share float64
		want  int // distinct traces kept
	}{{0.4, 1}, {0.5, 2}, {0.6, 2}, {0.61, 3}, {0.99, 6}, {1, 6}, {0, 6}} {
		f := l.Frequent(tc.share)
		assert.Len(t, f.Traces, tc.want, "share %v", tc.share)
	}
	assert.Equal(t, []int{4, 2, 1}, l.Frequent(0.7).Counts, "by frequency, ties in order of first appearance")
}

// TestFrequentRediscovers: on a generated log without noise (synth) the Inductive Miner gives
// back the generator's process tree (synth.ProcessTree), as Leemans, Fahland and van der Aalst
// (2013, "Discovering block-structured process models from event logs", Theorem on
// rediscoverability) promise for a directly-follows complete log. With 5% of cases given a random
// extra, missing or swapped event, IMf on all variants no longer does; on the variants that cover
// 90% of the cases it gives the same tree as on the 90% of the noise-free log: the filter takes
// the noise away. (It also takes away the rarest true orders: parts arriving before the quote is
// sent, or the approval before the order, about 3% of repaired bikes with the scenario's lead
// times; so both give ∧(Order parts, Send quote) then ∧(Receive parts, Record approval), which the
// test states.) Running cases are left out, as the page leaves them out of conformance checking.
func TestFrequentRediscovers(t *testing.T) {
	finished := func(noise float64) Log {
		lg := synth.Generate(synth.Config{Seed: 1, Events: 100_000, Noise: noise, Shifts: true})
		var out [][]string
		for _, c := range lg.Cases {
			if !c.Running {
				out = append(out, c.Activity)
			}
		}
		return FromStrings(out...)
	}
	clean, noisy := finished(0), finished(0.05)
	want, err := tree.Parse(synth.ProcessTree)
	require.NoError(t, err)
	assert.Equal(t, want.Canonical().String(), InductiveMiner(clean, Options{}).String(), "rediscovered without noise")
	assert.NotEqual(t, want.Canonical().String(), InductiveMiner(noisy, Options{Noise: 0.2}).String(), "the noise hides it")
	frequent := InductiveMiner(noisy.Frequent(0.9), Options{Noise: 0.2}).String()
	assert.Equal(t, InductiveMiner(clean.Frequent(0.9), Options{Noise: 0.2}).String(), frequent, "the filter takes the noise away")
	assert.Equal(t, "→(Register claim, Inspect bike, ×(→(Reject claim, Return bike), →(∧(Order parts, Send quote), ∧(Receive parts, Record approval), "+
		"Repair bike, ↺(Test ride, Adjust repair), Hand over bike)))", frequent)
}
