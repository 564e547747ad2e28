package predict

import (
	"fmt"
	"math"
	"testing"
	"time"

	"tracewright/core/eventlog"
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
			var part Partition
			var evalTime time.Duration
			for b.Loop() {
				t0 := time.Now()
				part = Split(l, opt)
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
			b.ReportMetric(ev.CoverageRange[0], "holdout-coverage-lo")
			b.ReportMetric(ev.CoverageRange[1], "holdout-coverage-hi")
			b.ReportMetric(ev.RatioRange[0], "holdout-ratio-lo")
			b.ReportMetric(ev.RatioRange[1], "holdout-ratio-hi")
			b.ReportMetric(float64(ev.TestCases), "holdout-cases")
			b.ReportMetric(stateBound(b, l, part.Completed, opt.Config), "state-bound-ratio")
		})
	}
}

// stateBound is the error ratio of the best forecast any function of the state can make on the
// given cases: each state's median, measured on the very cases it was read from, against the
// prefix-length baseline measured the same way. No model of these states can beat it on these
// cases. Without shifts the synth scenario's waits are exponential, hence memoryless, and its
// loop is geometric, so the multiset of activities done tells all that the prefix tells about
// what remains (up to the short lognormal service times and the noise): the bound then holds for
// any forecast from the prefix.
func stateBound(b *testing.B, l *eventlog.Log, cases []int, cfg Config) float64 {
	sys, err := Build(l, cases, cfg, nil)
	if err != nil {
		b.Fatal(err)
	}
	byLen := map[int][2]float64{} // sum, count
	for _, c := range cases {
		_, times := caseTimes(l, c)
		for i := 1; i <= len(times); i++ {
			v := byLen[i]
			byLen[i] = [2]float64{v[0] + float64(times[len(times)-1]-times[i-1])/1e6, v[1] + 1}
		}
	}
	var errSum, baseSum float64
	for _, c := range cases {
		acts, times := caseTimes(l, c)
		for i := 1; i <= len(acts); i++ {
			actual := float64(times[len(times)-1]-times[i-1]) / 1e6
			errSum += math.Abs(actual - sys.Predict(acts[:i], sys.attrOf(c)).MedianSeconds)
			v := byLen[i]
			baseSum += math.Abs(actual - v[0]/v[1])
		}
	}
	return errSum / baseSum
}
