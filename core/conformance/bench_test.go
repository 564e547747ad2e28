package conformance

import (
	"errors"
	"fmt"
	"testing"

	"tracewright/core/discovery"
	"tracewright/core/internal/logtest"
	"tracewright/core/petri"
	"tracewright/core/synth"
)

// BenchmarkAlignVariants aligns every distinct variant of a generated log (cases played out from
// a random process tree, events changed with the given probability) on the tree's net, as the
// conformance view does. It reports variants per second, states expanded per variant and the
// share of variants aligned within the bound of 50,000 states. The goal: 1000 variants/s
// on models of up to 40 transitions at 10% noise, every result optimal.
//
//	go test -run - -bench AlignVariants -benchtime 1x ./core/conformance/
func BenchmarkAlignVariants(b *testing.B) {
	for _, acts := range []int{14, 25, 35} { // 21, 41 and 61 transitions
		g := newGeneratedModel(uint64(acts), acts)
		for _, cases := range []int{10000, 100000} {
			for _, noise := range []float64{0.01, 0.1, 0.3} {
				traces, _ := g.variants(7, cases, noise)
				name := fmt.Sprintf("transitions=%d/cases=%d/noise=%.0f%%", len(g.net.Transitions), cases, noise*100)
				b.Run(name, func(b *testing.B) {
					var states, solves, aligned int
					for b.Loop() {
						al, err := newAligner(g.net, Costs{})
						if err != nil {
							b.Fatal(err)
						}
						states, solves, aligned = 0, 0, 0
						for _, tr := range traces {
							res, err := al.align(tr, Bound{States: 50000})
							if errors.Is(err, ErrBound) {
								continue
							}
							if err != nil {
								b.Fatal(err)
							}
							states += res.States
							solves += res.Solves
							aligned++
						}
					}
					b.ReportMetric(float64(len(traces)*b.N)/b.Elapsed().Seconds(), "variants/s")
					b.ReportMetric(float64(len(traces)), "variants")
					b.ReportMetric(float64(states)/float64(max(aligned, 1)), "states/variant")
					b.ReportMetric(float64(solves)/float64(max(aligned, 1)), "programs/variant")
					b.ReportMetric(float64(aligned)/float64(len(traces)), "aligned")
				})
			}
		}
	}
}

// BenchmarkWorkshop is the conformance view's work on the invented workshop log (200k events,
// 10% of cases with noise) against the model the Inductive Miner finds leaving out 20%: token
// replay and the alignment of every variant with precision. Until IMf's filtered single-activity
// base case (package discovery), that model put most activities in self-loops inside parallel
// blocks (55 transitions, 43 of them silent), the hardest shape for the marking equation: 540-950
// variants/s. Now it has 25 transitions and aligns about 32,000 variants/s.
func BenchmarkWorkshop(b *testing.B) {
	l := logtest.Generated(b, synth.Config{Seed: 3, Events: 200000, Noise: 0.1, Shifts: true})
	n := petri.FromTree(discovery.InductiveMiner(discovery.FromEventLog(l), discovery.Options{Noise: 0.2}))
	b.Run("replay", func(b *testing.B) {
		for b.Loop() {
			Replay(l, n)
		}
		b.ReportMetric(float64(len(l.Variants)*b.N)/b.Elapsed().Seconds(), "variants/s")
	})
	b.Run("align", func(b *testing.B) {
		var res *Result
		var err error
		for b.Loop() {
			if res, err = AlignLog(l, n, Costs{}, Bound{States: 100000}); err != nil {
				b.Fatal(err)
			}
		}
		states := 0
		for _, v := range res.Variants {
			states += v.States
		}
		b.ReportMetric(float64(len(res.Variants)*b.N)/b.Elapsed().Seconds(), "variants/s")
		b.ReportMetric(float64(states)/float64(len(res.Variants)), "states/variant")
		b.ReportMetric(float64(len(n.Transitions)), "transitions")
	})
}
