package predict

import (
	"fmt"
	"testing"
	"time"

	"tracewright/core/synth"
)

// BenchmarkPredict builds, evaluates (temporal hold-out) and forecasts on generated logs: the
// figures are the time and the measured error (ratio to the prefix-length baseline, interval
// coverage) for several seeds, with and without shifts, at 5% noise.
func BenchmarkPredict(b *testing.B) {
	for _, tc := range []struct {
		events int
		shifts bool
		seed   uint64
	}{{100_000, true, 1}, {100_000, true, 2}, {100_000, false, 3}, {100_000, false, 4}, {1_000_000, true, 5}} {
		l := generated(b, synth.Config{Seed: tc.seed, Events: tc.events, Noise: 0.05, Shifts: tc.shifts, StartTimes: true})
		b.Run(fmt.Sprintf("events=%d/shifts=%v/seed=%d", l.NumEvents(), tc.shifts, tc.seed), func(b *testing.B) {
			opt := Options{Config: Config{Abstraction: Multiset}}
			var ev, kf *Evaluation
			var evalTime time.Duration
			for b.Loop() {
				t0 := time.Now()
				part := Split(l, opt)
				var err error
				if ev, err = Evaluate(l, part, opt); err != nil {
					b.Fatal(err)
				}
				if _, _, err = ForecastRunning(l, part, opt); err != nil {
					b.Fatal(err)
				}
				evalTime = time.Since(t0)
				if kf, err = KFold(l, part, opt, 5); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(evalTime.Milliseconds()), "build+evaluate+forecast-ms")
			b.ReportMetric(ev.Ratio, "holdout-ratio")
			b.ReportMetric(ev.Coverage, "holdout-coverage")
			b.ReportMetric(kf.Ratio, "kfold-ratio")
			b.ReportMetric(kf.Coverage, "kfold-coverage")
		})
	}
}
