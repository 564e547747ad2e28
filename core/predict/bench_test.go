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
// coverage) for several seeds, with and without shifts, at 5% noise. Each log is measured with
// multiset states over the whole prefix ("multiset"), the same refined by the case attribute
// Choose keeps, if any ("multiset+attribute", the page's default), and with the states and the
// attribute both chosen ("chosen"); the times include the choice.
func BenchmarkPredict(b *testing.B) {
	for _, tc := range []struct {
		events int
		shifts bool
		seed   uint64
	}{{100_000, true, 1}, {100_000, true, 2}, {100_000, false, 3}, {100_000, false, 4}, {1_000_000, true, 5}} {
		l := generated(b, synth.Config{Seed: tc.seed, Events: tc.events, Noise: 0.05, Shifts: tc.shifts, StartTimes: true})
		for _, sc := range []struct {
			name   string
			search Search
		}{{"multiset", Search{}}, {"multiset+attribute", Search{Attribute: true}}, {"chosen", Search{States: true, Attribute: true}}} {
			chosen := sc.search.States || sc.search.Attribute
			b.Run(fmt.Sprintf("events=%d/shifts=%v/seed=%d/states=%s", l.NumEvents(), tc.shifts, tc.seed, sc.name), func(b *testing.B) {
				opt := Options{Config: Config{Abstraction: Multiset}}
				var ev, kf *Evaluation
				var part Partition
				var evalTime time.Duration
				for b.Loop() {
					t0 := time.Now()
					part = Split(l, opt)
					var err error
					if chosen {
						if opt.Config, _, err = Choose(l, part, opt, sc.search); err != nil {
							b.Fatal(err)
						}
					}
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
				if chosen {
					b.Logf("chosen: %s over the last %d (0: all), attribute %q", opt.Config.Abstraction, opt.Config.Horizon, opt.Config.Attribute)
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
}

// stateBound is the error ratio of the best forecast any function of the state can make on the
// given cases: each state's median, measured on the very cases it was read from, against the
// prefix-length baseline measured the same way. No model of these states can beat it on these
// cases. It bounds these states only: in the synth scenario the bike model sets the lead time of
// parts, so states that do not tell the models apart are bounded well above states that do.
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
