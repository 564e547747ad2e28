package discovery

import (
	"fmt"
	"testing"

	"tracewright/core/internal/logtest"
	"tracewright/core/synth"
)

// BenchmarkInductiveMiner runs IMf (noise 0.2) and IMd on generated logs of growing size; the
// time is discovery alone, from the log's variants (reading is BenchmarkIntakeCSV's).
func BenchmarkInductiveMiner(b *testing.B) {
	for _, n := range []int{10_000, 100_000, 1_000_000} {
		l := logtest.Generated(b, synth.Config{Seed: 3, Events: n, Noise: 0.05, Shifts: true})
		dl := FromEventLog(l)
		b.Run(fmt.Sprintf("IMf/events=%d/variants=%d", l.NumEvents(), len(dl.Traces)), func(b *testing.B) {
			for b.Loop() {
				InductiveMiner(dl, Options{Noise: 0.2})
			}
		})
		b.Run(fmt.Sprintf("IMd/events=%d", l.NumEvents()), func(b *testing.B) {
			for b.Loop() {
				InductiveMinerGraph(dl, Options{})
			}
		})
	}
}
