package predict

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/integrate"
	"gonum.org/v1/gonum/integrate/quad"
	"gonum.org/v1/gonum/stat"
	"gonum.org/v1/gonum/stat/distuv"

	"tracewright/core/eventlog"
	"tracewright/core/internal/logtest"
	"tracewright/core/synth"
)

func generated(t testing.TB, cfg synth.Config) *eventlog.Log { return logtest.Generated(t, cfg) }

// TestAUCAgainstGonum compares our AUC with gonum/stat's ROC curve integrated by
// gonum/integrate's trapezoidal rule, and the Brier score with one worked by hand.
func TestAUCAgainstGonum(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 1))
	for trial := 0; trial < 20; trial++ {
		n := 20 + r.IntN(200)
		p := make([]float64, n)
		y := make([]bool, n)
		for i := range p {
			y[i] = r.Float64() < 0.4
			p[i] = math.Round(r.Float64()*20) / 20 // ties, as state frequencies give
			if y[i] {
				p[i] = math.Min(1, p[i]+0.2)
			}
		}
		sorted := append([]float64(nil), p...)
		cls := append([]bool(nil), y...)
		stat.SortWeightedLabeled(sorted, cls, nil)
		tpr, fpr, _ := stat.ROC(nil, sorted, cls, nil)
		assert.InDelta(t, integrate.Trapezoidal(fpr, tpr), AUC(p, y), 1e-9)
	}
	// computed by hand: (0.9-1)² + (0.2-0)² + (0.6-1)² = 0.01 + 0.04 + 0.16 = 0.21, over 3 = 0.07
	assert.InDelta(t, 0.07, Brier([]float64{0.9, 0.2, 0.6}, []bool{true, false, true}), 1e-12)
}

// TestEvaluationOnGeneratedLog: on a generated log (no shifts, 5% noise) the hold-out runs end to
// end: the interval covers about its level, the outcome ranks cases well, and the state model
// is not worse than the prefix-length baseline by more than 10% (measured: 1.006; DEVELOPERS.md
// says why it is not better on this scenario).
func TestEvaluationOnGeneratedLog(t *testing.T) {
	l := generated(t, synth.Config{Seed: 5, Events: 60000, Noise: 0.05, Shifts: false})
	out, err := ParseOutcome("ends:Hand over bike")
	require.NoError(t, err)
	opt := Options{Config: Config{Abstraction: Sequence, Horizon: 0}, Outcome: out}
	part := Split(l, opt)
	assert.Contains(t, part.EndActivities, "Hand over bike")
	assert.Contains(t, part.EndActivities, "Return bike")
	assert.NotEmpty(t, part.Running)
	ev, err := Evaluate(l, part, opt)
	require.NoError(t, err)
	assert.InDelta(t, 0.8, ev.Coverage, 0.1)
	assert.Less(t, ev.Ratio, 1.1)
	assert.Greater(t, ev.AUC, 0.7)
	for _, r := range []struct{ v, lo, hi float64 }{{ev.Coverage, ev.CoverageRange[0], ev.CoverageRange[1]}, {ev.Ratio, ev.RatioRange[0], ev.RatioRange[1]}} {
		assert.True(t, r.lo < r.v && r.v < r.hi, "%v in its range [%v, %v]", r.v, r.lo, r.hi)
	}
	_, running, err := ForecastRunning(l, part, opt)
	require.NoError(t, err)
	assert.Len(t, running, len(part.Running))
}

// TestConvergesToAnalyticValues: with known timing (package synth, shifts off), a case whose last
// activity is "Reject claim" has one step left, "Return bike", which waits an exponential time W
// of mean 24 h and takes a lognormal time S of mean 20 min (shape 0.4; synth.Activities). The
// estimates at that state (horizon 1) must approach the analytic values as the log grows:
//   - the mean, 24 h 20 min (computed by hand);
//   - the median of W + S, whose distribution function F(t) = ∫₀ᵗ f_S(s) (1 − e^(−(t−s)/24h)) ds
//     is integrated with gonum's Gauss–Legendre quadrature (integrate/quad) over gonum's
//     densities (stat/distuv), the median found by bisection.
func TestConvergesToAnalyticValues(t *testing.T) {
	ret := synth.Activities[synth.Return]
	wantMean := ret.Wait.Seconds() + ret.Service.Seconds()
	wait := distuv.Exponential{Rate: 1 / ret.Wait.Seconds()}
	sigma := ret.Sigma
	service := distuv.LogNormal{Mu: math.Log(ret.Service.Seconds()) - sigma*sigma/2, Sigma: sigma}
	cdf := func(x float64) float64 {
		return quad.Fixed(func(s float64) float64 { return service.Prob(s) * wait.CDF(x-s) }, 0, x, 2000, quad.Legendre{}, 0)
	}
	lo, hi := 0.0, 10*ret.Wait.Seconds()
	for hi-lo > 1 {
		if mid := (lo + hi) / 2; cdf(mid) < 0.5 {
			lo = mid
		} else {
			hi = mid
		}
	}
	wantMedian := (lo + hi) / 2
	// a sanity check of the integration: without the service time the median is 24 h · ln 2
	require.InDelta(t, ret.Wait.Seconds()*math.Ln2+ret.Service.Seconds(), wantMedian, 0.05*wantMedian)
	var meanErrs, medianErrs []float64
	for _, events := range []int{5000, 50000, 300000} {
		l := generated(t, synth.Config{Seed: 11, Events: events, Shifts: false})
		part := Split(l, Options{})
		sys, err := Build(l, part.Completed, Config{Horizon: 1}, nil)
		require.NoError(t, err)
		id, _ := l.Activities.Lookup("Reject claim")
		p := sys.Predict([]int32{id}, "")
		meanErrs = append(meanErrs, math.Abs(p.MeanSeconds-wantMean)/wantMean)
		medianErrs = append(medianErrs, math.Abs(p.MedianSeconds-wantMedian)/wantMedian)
	}
	t.Logf("analytic median %.0f s; relative errors by size: mean %v, median %v", wantMedian, meanErrs, medianErrs)
	for what, errs := range map[string][]float64{"mean": meanErrs, "median": medianErrs} {
		assert.Less(t, errs[2], 0.05, "%s: relative errors by size: %v", what, errs)
		assert.Less(t, errs[2], errs[0], "%s: more data, closer: %v", what, errs)
	}
}

// TestBootstrapRangesAgainstWald: with one prefix per case, the coverage is a binomial
// proportion, and for n = 2000 its 95% bootstrap percentile interval must agree with the normal
// approximation p ± 1.96·√(p(1−p)/n) (the Wald interval; common practice) to within a tenth of
// its width. When every case has ten prefixes that share its fate, the unit drawn is still the
// case: the interval is that of 2000 draws, not of 20000.
func TestBootstrapRangesAgainstWald(t *testing.T) {
	const n = 2000
	for _, per := range []int{1, 10} {
		cases := make([]caseScore, n)
		for i := range cases {
			cases[i] = caseScore{prefixes: per, err: 1, base: 2}
			if i%5 != 0 { // 80% covered
				cases[i].covered = per
			}
		}
		cov, ratio := bootstrapRanges(cases)
		half := 1.96 * math.Sqrt(0.8*0.2/n)
		assert.InDelta(t, 0.8-half, cov[0], half/10, "%d prefixes per case", per)
		assert.InDelta(t, 0.8+half, cov[1], half/10, "%d prefixes per case", per)
		assert.Equal(t, [2]float64{0.5, 0.5}, ratio, "every case has the same ratio: no spread")
	}
	cov, _ := bootstrapRanges(nil)
	assert.Equal(t, [2]float64{}, cov, "no cases, no range")
}

func TestKFold(t *testing.T) {
	l := generated(t, synth.Config{Seed: 5, Events: 30000, Noise: 0.05, Shifts: false})
	opt := Options{Config: Config{Abstraction: Multiset}}
	part := Split(l, opt)
	ev, err := KFold(l, part, opt, 5)
	require.NoError(t, err)
	assert.Equal(t, "k-fold", ev.Cut)
	assert.InDelta(t, 0.8, ev.Coverage, 0.05, "no temporal shift: the conformal level holds")
	assert.Less(t, ev.Ratio, 1.0, "the states beat the prefix-length baseline")
}

// TestChoose: the choice returns the best of the table it measured. The generator's lead time for
// parts depends on the bike model and on nothing else of the case (package synth), so that is the
// attribute the search must keep, and the warranty tier, which changes nothing, must not win.
func TestChoose(t *testing.T) {
	l := generated(t, synth.Config{Seed: 6, Events: 20000, Noise: 0.05, Shifts: true})
	part := Split(l, Options{})
	require.Equal(t, []string{"bike_model", "warranty"}, AttributeCandidates(l))
	for _, tc := range []struct {
		search Search
		models int
	}{
		{Search{States: true}, 12},
		{Search{Attribute: true}, 1 + 2},
		{Search{States: true, Attribute: true}, 12 + 2},
	} {
		cfg, table, err := Choose(l, part, Options{Config: Config{Abstraction: Multiset}}, tc.search)
		require.NoError(t, err)
		require.Len(t, table, tc.models, "%+v", tc.search)
		assert.Equal(t, 3*tc.models, tc.search.Models(l), "what the progress bar counts")
		found := false
		for _, c := range table {
			if c.Config == cfg {
				found = true
				for _, d := range table {
					assert.LessOrEqual(t, c.MAEDays, d.MAEDays)
				}
			}
		}
		assert.True(t, found, "the choice is in the table")
		if tc.search.Attribute {
			assert.Equal(t, "bike_model", cfg.Attribute, "%+v", tc.search)
		} else {
			assert.Empty(t, cfg.Attribute)
		}
		if !tc.search.States {
			assert.Equal(t, Multiset, cfg.Abstraction)
		}
	}
}

// TestSample: an even sample keeps every k-th finished case in log order, spanning the period,
// and leaves the running and abandoned cases alone.
func TestSample(t *testing.T) {
	p := Partition{Completed: []int{0, 1, 2, 3, 4, 5, 6, 7, 8, 9}, Running: []int{10}, Abandoned: []int{11}}
	s := p.Sample(4)
	assert.Equal(t, []int{0, 2, 5, 7}, s.Completed)
	assert.Equal(t, p.Running, s.Running)
	assert.Equal(t, p.Abandoned, s.Abandoned)
	assert.Equal(t, p.Completed, p.Sample(10).Completed, "no more than asked: kept whole")
}

// TestParseSettings: "auto" leaves the abstraction or the attribute to Choose; a name is taken.
func TestParseSettings(t *testing.T) {
	for _, tc := range []struct {
		abs, attr string
		cfg       Config
		search    Search
	}{
		{"multiset", "", Config{Abstraction: Multiset, Horizon: 2}, Search{}},
		{"set", "region", Config{Abstraction: Set, Horizon: 2, Attribute: "region"}, Search{}},
		{"auto", "auto", Config{Horizon: 2}, Search{States: true, Attribute: true}},
		{"sequence", "auto", Config{Abstraction: Sequence, Horizon: 2}, Search{Attribute: true}},
	} {
		cfg, s, err := ParseSettings(tc.abs, 2, tc.attr)
		require.NoError(t, err)
		assert.Equal(t, tc.cfg, cfg, "%s/%s", tc.abs, tc.attr)
		assert.Equal(t, tc.search, s, "%s/%s", tc.abs, tc.attr)
	}
	_, _, err := ParseSettings("tree", 0, "")
	assert.Error(t, err)
}
