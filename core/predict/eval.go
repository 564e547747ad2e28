package predict

import (
	"cmp"
	"math"
	"math/rand/v2"
	"slices"
	"time"

	"tracewright/core/eventlog"
	"tracewright/core/summary"
	"tracewright/core/timestamp"
)

// Options steer fitting, evaluation and forecasts.
type Options struct {
	Config  Config
	Outcome Outcome // nil: no outcome probabilities
	// Alpha is the miscoverage of the interval: 0.2 gives 80% intervals (the default).
	Alpha float64
	// EndActivities end a case; nil infers them: activities that end at least 90% of their
	// occurrences' cases (they are almost always last).
	EndActivities []string
	// Inactive is how long a case may be silent and still run; 0 infers the longest gap between
	// two activities of any completed case.
	Inactive time.Duration
	// Export is the export date (Unix microseconds); 0 takes the log's last timestamp.
	Export int64
	// Cut is a single cut date for the hold-out; 0 takes three (see Evaluate).
	Cut int64
	// Step, when set, is called after each model is fitted (Choose fits 36, Evaluate up to 3,
	// KFold k, ForecastRunning 1), so that a caller can show progress; an error it returns stops
	// the work and is returned.
	Step func() error
}

func (o *Options) defaults(l *eventlog.Log) {
	if o.Alpha <= 0 || o.Alpha >= 1 {
		o.Alpha = 0.2
	}
	if o.Export == 0 {
		for _, t := range l.Time {
			o.Export = max(o.Export, t)
		}
	}
}

// Model is a transition system with its calibrated interval radius.
type Model struct {
	System *System
	// Radius is the conformal quantile of the scaled errors |actual − median| / (spread +
	// spreadFloor), where spread is the interquartile range of the state's remaining times: the
	// interval is the median ± Radius·(spread + spreadFloor), wide where past cases in the same
	// state varied much and narrow where they agreed (locally weighted conformal prediction, Lei
	// et al. 2018, section 5.2; from memory). On BenchmarkPredict's logs it brought k-fold
	// coverage to 80.0-80.3% and the single-cut hold-out's to 77.5-84.4% (constant widths:
	// 75.7-81.6%); pooled over Evaluate's three cut dates the hold-out gives 78.7-81.6%.
	Radius       float64
	Calibrations int
	alpha        float64
}

// Fit builds a model for forecasting cases open at a moment from completed cases: every fourth
// case (in log order) calibrates the interval, the others annotate the states.
//
// The cases open at a moment are not a fair draw of all cases: a case is open at a random moment
// with a chance in proportion to its duration (the inspection paradox of renewal theory; common
// practice, from memory of Feller, "An Introduction to Probability Theory and Its Applications",
// vol. II, 1971). So each calibration case's scores weigh as much as its duration, and the radius
// is the weighted (1 − α) quantile (with split conformal's (n+1)/n correction on the total). On
// the generated logs of BenchmarkPredict this took the temporal hold-out's coverage (one cut
// date) from 65-78% to 76-82% (77-84% with the spread scaling of Model.Radius). A weight that
// depends on the outcome voids split conformal's exact finite-sample
// guarantee; the hold-out shows how close it comes. FitExchangeable is the plain method for
// cases drawn like the calibration cases.
func Fit(l *eventlog.Log, cases []int, opt Options) (*Model, error) {
	return fit(l, cases, opt, true)
}

// FitExchangeable is Fit with unweighted split conformal prediction (Vovk, Gammerman and Shafer
// 2005): every calibration prefix weighs the same, and the interval covers at least 1 − α of
// prefixes drawn like them (k-fold cross-validation's test cases); the spread scaling keeps
// that guarantee, since it only changes the score.
func FitExchangeable(l *eventlog.Log, cases []int, opt Options) (*Model, error) {
	return fit(l, cases, opt, false)
}

func fit(l *eventlog.Log, cases []int, opt Options, open bool) (*Model, error) {
	opt.defaults(l)
	var proper, calib []int
	for i, c := range cases {
		if i%4 == 3 {
			calib = append(calib, c)
		} else {
			proper = append(proper, c)
		}
	}
	sys, err := Build(l, proper, opt.Config, opt.Outcome)
	if err != nil {
		return nil, err
	}
	if opt.Step != nil {
		if err := opt.Step(); err != nil {
			return nil, err
		}
	}
	type scored struct{ s, w float64 }
	var scores []scored
	for _, c := range calib {
		acts, times := caseTimes(l, c)
		attr := sys.attrOf(c)
		w := 1.0
		if open {
			w = math.Max(1, float64(times[len(times)-1]-times[0])/1e6)
		}
		for i := 1; i <= len(acts); i++ {
			var median, spread float64
			if st, _ := sys.state(acts[:i], attr); st != nil {
				median, spread = st.median, st.spread
			}
			actual := float64(times[len(times)-1]-times[i-1]) / 1e6
			scores = append(scores, scored{math.Abs(actual-median) / (spread + spreadFloor), w})
		}
	}
	m := &Model{System: sys, Calibrations: len(scores), alpha: opt.Alpha}
	if len(scores) > 0 {
		slices.SortFunc(scores, func(a, b scored) int { return cmp.Compare(a.s, b.s) })
		total := 0.0
		for _, x := range scores {
			total += x.w
		}
		// with equal weights this is the ⌈(n+1)(1−α)⌉-th smallest score of split conformal
		// prediction; with fewer than 1/α calibration prefixes that rank does not exist and the
		// largest score is taken (the stated coverage is then not guaranteed)
		target := (1 - opt.Alpha) * total * float64(len(scores)+1) / float64(len(scores))
		acc := 0.0
		m.Radius = scores[len(scores)-1].s
		for _, x := range scores {
			if acc += x.w; acc >= target {
				m.Radius = x.s
				break
			}
		}
	}
	return m, nil
}

// Forecast is a prediction with its interval.
type Forecast struct {
	Prediction
	LowSeconds  float64 `json:"low_seconds"`
	HighSeconds float64 `json:"high_seconds"`
}

// quickForecast is what the evaluations read of a forecast, without Forecast's map of next
// activities by name: building that map for every prefix took 40% of choosing the states.
type quickForecast struct {
	median, low, high, outcome float64
	next                       int32 // the likeliest next activity, -1 for the end
}

func (m *Model) quick(acts []int32, attr string) quickForecast {
	st, _ := m.System.state(acts, attr)
	if st == nil {
		return quickForecast{next: -1}
	}
	low, high := m.interval(st.median, st.spread)
	return quickForecast{median: st.median, low: low, high: high,
		outcome: float64(st.Outcome) / float64(len(st.Remaining)), next: st.likeliest}
}

// interval is the calibrated interval around a state's median: median ± Radius·(spread +
// spreadFloor), clipped at 0.
func (m *Model) interval(median, spread float64) (low, high float64) {
	r := m.Radius * (spread + spreadFloor)
	return math.Max(0, median-r), median + r
}

// Forecast predicts a prefix.
func (m *Model) Forecast(acts []int32, attr string) Forecast {
	p := m.System.Predict(acts, attr)
	low, high := m.interval(p.MedianSeconds, p.Spread)
	return Forecast{Prediction: p, LowSeconds: low, HighSeconds: high}
}

// Partition says which cases are complete, which still run, and which were abandoned.
type Partition struct {
	Completed, Running, Abandoned []int
	EndActivities                 []string
	Inactive                      time.Duration
}

// Split sorts the cases of l by the rules of Options.
func Split(l *eventlog.Log, opt Options) Partition {
	opt.defaults(l)
	ends := map[int32]bool{}
	if opt.EndActivities != nil {
		for _, n := range opt.EndActivities {
			if id, ok := l.Activities.Lookup(n); ok {
				ends[id] = true
			}
		}
	} else {
		last := make([]int, l.Activities.Len())
		total := make([]int, l.Activities.Len())
		for c := 0; c < l.NumCases(); c++ {
			tr := l.Trace(c)
			for i, a := range tr {
				total[a]++
				if i == len(tr)-1 {
					last[a]++
				}
			}
		}
		for a := range last {
			if total[a] > 0 && float64(last[a]) >= 0.9*float64(total[a]) {
				ends[int32(a)] = true
			}
		}
	}
	var p Partition
	for a := range ends {
		p.EndActivities = append(p.EndActivities, l.Activities.Name(a))
	}
	slices.Sort(p.EndActivities)
	// one pass: completed cases give the longest pause; the others wait for the threshold
	var maxGap int64
	var open []int
	lastTime := make([]int64, l.NumCases())
	for c := 0; c < l.NumCases(); c++ {
		acts, times := caseTimes(l, c)
		if len(acts) == 0 {
			continue
		}
		if ends[acts[len(acts)-1]] {
			p.Completed = append(p.Completed, c)
			for i := 1; i < len(times); i++ {
				maxGap = max(maxGap, times[i]-times[i-1])
			}
			continue
		}
		open = append(open, c)
		lastTime[c] = times[len(times)-1]
	}
	p.Inactive = opt.Inactive
	if p.Inactive == 0 {
		p.Inactive = time.Duration(maxGap) * time.Microsecond
	}
	for _, c := range open {
		if time.Duration(opt.Export-lastTime[c])*time.Microsecond > p.Inactive {
			p.Abandoned = append(p.Abandoned, c)
		} else {
			p.Running = append(p.Running, c)
		}
	}
	return p
}

// NotRunning accepts the cases that are not running (completed or abandoned): the filter
// conformance checking uses, since a running case's missing end is no deviation.
func (p Partition) NotRunning() func(c int) bool {
	running := make(map[int]bool, len(p.Running))
	for _, c := range p.Running {
		running[c] = true
	}
	return func(c int) bool { return !running[c] }
}

// Evaluation is the measured error of the forecasts on temporal hold-outs (see Evaluate) or by
// k-fold cross-validation (KFold). TrainCases is the mean over the cut dates or folds.
type Evaluation struct {
	Cut          string      `json:"cut_date"` // the last cut date, or "k-fold"
	Cuts         []string    `json:"cut_dates,omitempty"`
	TrainCases   int         `json:"train_cases"`
	TestCases    int         `json:"test_cases"`
	TestPrefixes int         `json:"test_prefixes"`
	MAEDays      float64     `json:"mae_days"`
	BaselineDays float64     `json:"baseline_mae_days"`      // mean remaining time by number of events
	MeanBaseDays float64     `json:"baseline_mean_mae_days"` // mean remaining time of all prefixes
	Ratio        float64     `json:"mae_ratio_to_baseline"`
	Coverage     float64     `json:"coverage"`
	Level        float64     `json:"interval_level"`
	NextAccuracy float64     `json:"next_accuracy"`
	Brier        float64     `json:"brier,omitempty"`
	AUC          float64     `json:"auc,omitempty"`
	ByLength     []LengthRow `json:"by_prefix_length"`
	// CoverageRange and RatioRange are 95% bootstrap intervals of Coverage and Ratio, resampling
	// the test cases (see bootstrapRanges): how far the figures could move on another sample of
	// cases, so that a reader does not take 84% for a different thing from 80%.
	CoverageRange [2]float64 `json:"coverage_range"`
	RatioRange    [2]float64 `json:"mae_ratio_range"`

	cases []caseScore // per test case, for the ranges and for pooling folds
}

// caseScore sums one test case's errors over its prefixes.
type caseScore struct {
	prefixes, covered int
	err, base         float64
}

// bootstrapRounds is how many resamples bootstrapRanges draws: 1000, with which the ends of a 95%
// percentile interval move by about a tenth of its width from one seed to another, but no more
// than bootstrapWork case draws in all (k-fold over 100,000 cases gets 200 rounds, and its ends
// move by about a fifth of a range that is then narrow).
const (
	bootstrapRounds = 1000
	bootstrapWork   = 20_000_000
)

// bootstrapRanges gives 95% percentile bootstrap intervals (Efron and Tibshirani, An Introduction
// to the Bootstrap, 1993, chapter 13) of the coverage and of the error ratio, resampling whole
// cases with replacement: the prefixes of one case share its fate (one slow case misses the
// interval at many of its prefixes), so the case, not the prefix, is the unit that was drawn.
// The resamples are seeded, so the same evaluation gives the same ranges.
func bootstrapRanges(cases []caseScore) (cov, ratio [2]float64) {
	if len(cases) < 2 {
		return
	}
	r := rand.New(rand.NewPCG(uint64(len(cases)), 0x6b6f6f74))
	rounds := max(200, min(bootstrapRounds, bootstrapWork/len(cases)))
	covs := make([]float64, 0, rounds)
	ratios := make([]float64, 0, rounds)
	for range rounds {
		var n, in int
		var e, b float64
		for range cases {
			c := &cases[r.IntN(len(cases))]
			n += c.prefixes
			in += c.covered
			e += c.err
			b += c.base
		}
		if n > 0 {
			covs = append(covs, float64(in)/float64(n))
		}
		if b > 0 {
			ratios = append(ratios, e/b)
		}
	}
	ends := func(xs []float64) [2]float64 {
		if len(xs) == 0 {
			return [2]float64{}
		}
		slices.Sort(xs)
		return [2]float64{summary.Quantile(xs, 0.025), summary.Quantile(xs, 0.975)}
	}
	return ends(covs), ends(ratios)
}

// LengthRow is the error at one prefix length.
type LengthRow struct {
	Events       int     `json:"events"`
	Prefixes     int     `json:"prefixes"`
	MAEDays      float64 `json:"mae_days"`
	BaselineDays float64 `json:"baseline_mae_days"`
	Coverage     float64 `json:"coverage"`
}

// Evaluate measures the forecasts' error on temporal hold-outs of the completed cases: at each
// cut date a model is fitted on the cases that had ended and tested on every prefix of the cases
// that were open then, and the results are pooled. Without opt.Cut there are three cut dates,
// by which 60%, 70% and 80% of the completed cases had ended (evaluation from several forecast
// origins; Tashman, "Out-of-sample tests of forecasting accuracy", International Journal of
// Forecasting 16, 2000). One cut tests only the cases open at one moment, about a hundred in a
// year-long log of 10,000 cases, and its coverage then swung by ±4 points from one log to the
// next; three cuts test three times as many.
func Evaluate(l *eventlog.Log, part Partition, opt Options) (*Evaluation, error) {
	opt.defaults(l)
	type span struct{ start, end int64 }
	spans := make([]span, 0, len(part.Completed))
	var ends []float64
	for _, c := range part.Completed {
		_, times := caseTimes(l, c)
		spans = append(spans, span{times[0], times[len(times)-1]})
		ends = append(ends, float64(times[len(times)-1]))
	}
	if len(ends) < 8 {
		return nil, errTooFew
	}
	slices.Sort(ends)
	cuts := []int64{opt.Cut}
	if opt.Cut == 0 {
		cuts = cuts[:0]
		for _, q := range [...]float64{0.6, 0.7, 0.8} {
			cuts = append(cuts, int64(summary.Quantile(ends, q)))
		}
	}
	var evs []*Evaluation
	for _, cut := range cuts {
		var train, test []int
		for i, c := range part.Completed {
			s := spans[i]
			switch {
			case s.end < cut:
				train = append(train, c)
			case s.start < cut:
				test = append(test, c)
			}
		}
		if len(train) < 4 || len(test) == 0 {
			continue
		}
		ev, err := score(l, train, test, opt, true)
		if err != nil {
			return nil, err
		}
		ev.Cut = timestamp.FormatRFC3339(cut)
		ev.Cuts = []string{ev.Cut}
		evs = append(evs, ev)
	}
	if len(evs) == 0 {
		return nil, errTooFew
	}
	ev := pool(evs)
	ev.Cut = evs[len(evs)-1].Cut
	ev.CoverageRange, ev.RatioRange = bootstrapRanges(ev.cases)
	return ev, nil
}

// KFold measures the error by k-fold cross-validation over the completed cases (in log order,
// case i in fold i mod k): every case is tested once by a model fitted on the others, with plain
// split conformal intervals (FitExchangeable), since its test cases are drawn like the
// calibration cases. It avoids
// the temporal hold-out's bias (cases running at the cut date and finished by the export are the
// shorter ones) at the price of training on cases that ended after some of the tested ones.
func KFold(l *eventlog.Log, part Partition, opt Options, k int) (*Evaluation, error) {
	ev, err := kfold(l, part, opt, k)
	if err != nil {
		return nil, err
	}
	ev.CoverageRange, ev.RatioRange = bootstrapRanges(ev.cases)
	return ev, nil
}

// kfold is KFold without the bootstrap ranges, for Choose, which compares many.
func kfold(l *eventlog.Log, part Partition, opt Options, k int) (*Evaluation, error) {
	opt.defaults(l)
	if k < 2 || len(part.Completed) < 2*k {
		return nil, errTooFew
	}
	var folds []*Evaluation
	for f := 0; f < k; f++ {
		var train, test []int
		for i, c := range part.Completed {
			if i%k == f {
				test = append(test, c)
			} else {
				train = append(train, c)
			}
		}
		ev, err := score(l, train, test, opt, false)
		if err != nil {
			return nil, err
		}
		folds = append(folds, ev)
	}
	total := pool(folds)
	total.Cut, total.Cuts = "k-fold", nil
	return total, nil
}

// pool combines evaluations of disjoint tests (folds, or cut dates), weighting each by its
// prefixes; TrainCases becomes their mean. AUC is pooled as the weighted mean of the parts'.
func pool(evs []*Evaluation) *Evaluation {
	if len(evs) == 1 {
		return evs[0]
	}
	total := &Evaluation{Level: evs[0].Level}
	type row struct{ n, mae, base, cov float64 }
	rows := map[int]*row{}
	for _, ev := range evs {
		w := float64(ev.TestPrefixes)
		total.TrainCases += ev.TrainCases
		total.TestCases += ev.TestCases
		total.TestPrefixes += ev.TestPrefixes
		total.MAEDays += w * ev.MAEDays
		total.BaselineDays += w * ev.BaselineDays
		total.MeanBaseDays += w * ev.MeanBaseDays
		total.Coverage += w * ev.Coverage
		total.NextAccuracy += w * ev.NextAccuracy
		total.Brier += w * ev.Brier
		total.AUC += w * ev.AUC
		total.Cuts = append(total.Cuts, ev.Cuts...)
		total.cases = append(total.cases, ev.cases...)
		for _, r := range ev.ByLength {
			x := rows[r.Events]
			if x == nil {
				x = &row{}
				rows[r.Events] = x
			}
			n := float64(r.Prefixes)
			x.n += n
			x.mae += n * r.MAEDays
			x.base += n * r.BaselineDays
			x.cov += n * r.Coverage
		}
	}
	n := float64(total.TestPrefixes)
	total.TrainCases /= len(evs)
	total.MAEDays /= n
	total.BaselineDays /= n
	total.MeanBaseDays /= n
	total.Coverage /= n
	total.NextAccuracy /= n
	total.Brier /= n
	total.AUC /= n
	if total.BaselineDays > 0 {
		total.Ratio = total.MAEDays / total.BaselineDays
	}
	for k := 1; k <= 20; k++ {
		if x := rows[k]; x != nil {
			total.ByLength = append(total.ByLength, LengthRow{Events: k, Prefixes: int(x.n), MAEDays: x.mae / x.n, BaselineDays: x.base / x.n, Coverage: x.cov / x.n})
		}
	}
	return total
}

// score fits on train and measures on every prefix of test.
func score(l *eventlog.Log, train, test []int, opt Options, open bool) (*Evaluation, error) {
	m, err := fit(l, train, opt, open)
	if err != nil {
		return nil, err
	}
	// baselines from the training prefixes
	byLen := map[int][]float64{}
	var allRem []float64
	for _, c := range train {
		_, times := caseTimes(l, c)
		for i := 1; i <= len(times); i++ {
			r := float64(times[len(times)-1]-times[i-1]) / 1e6
			byLen[i] = append(byLen[i], r)
			allRem = append(allRem, r)
		}
	}
	meanAll := mean(allRem)
	meanByLen := make(map[int]float64, len(byLen))
	for k, xs := range byLen {
		meanByLen[k] = mean(xs)
	}
	ev := &Evaluation{TrainCases: len(train), TestCases: len(test), Level: 1 - opt.Alpha}
	type acc struct {
		n, covered int
		err, base  float64
	}
	rows := map[int]*acc{}
	var sumErr, sumBase, sumMean float64
	covered, nextRight, nextTotal := 0, 0, 0
	var probs []float64
	var labels []bool
	for _, c := range test {
		acts, times := caseTimes(l, c)
		attr := m.System.attrOf(c)
		met := opt.Outcome != nil && opt.Outcome.Met(l, acts, times)
		var cs caseScore
		for i := 1; i <= len(acts); i++ {
			f := m.quick(acts[:i], attr)
			actual := float64(times[len(times)-1]-times[i-1]) / 1e6
			base, ok := meanByLen[i]
			if !ok {
				base = meanAll
			}
			e := math.Abs(actual - f.median)
			sumErr += e
			sumBase += math.Abs(actual - base)
			sumMean += math.Abs(actual - meanAll)
			in := actual >= f.low && actual <= f.high
			if in {
				covered++
				cs.covered++
			}
			cs.prefixes++
			cs.err += e
			cs.base += math.Abs(actual - base)
			r := rows[min(i, 20)]
			if r == nil {
				r = &acc{}
				rows[min(i, 20)] = r
			}
			r.n++
			r.err += e
			r.base += math.Abs(actual - base)
			if in {
				r.covered++
			}
			// next activity: the most likely continuation, or the end (-1)
			best := f.next
			truth := int32(-1)
			if i < len(acts) {
				truth = acts[i]
			}
			nextTotal++
			if best == truth {
				nextRight++
			}
			if opt.Outcome != nil {
				probs = append(probs, f.outcome)
				labels = append(labels, met)
			}
			ev.TestPrefixes++
		}
		ev.cases = append(ev.cases, cs)
	}
	n := float64(ev.TestPrefixes)
	const day = 86400
	ev.MAEDays, ev.BaselineDays, ev.MeanBaseDays = sumErr/n/day, sumBase/n/day, sumMean/n/day
	if ev.BaselineDays > 0 {
		ev.Ratio = ev.MAEDays / ev.BaselineDays
	}
	ev.Coverage = float64(covered) / n
	ev.NextAccuracy = float64(nextRight) / float64(nextTotal)
	if len(probs) > 0 {
		ev.Brier = Brier(probs, labels)
		ev.AUC = AUC(probs, labels)
	}
	for k := 1; k <= 20; k++ {
		if r := rows[k]; r != nil {
			ev.ByLength = append(ev.ByLength, LengthRow{Events: k, Prefixes: r.n, MAEDays: r.err / float64(r.n) / day,
				BaselineDays: r.base / float64(r.n) / day, Coverage: float64(r.covered) / float64(r.n)})
		}
	}
	return ev, nil
}

// Brier is the mean squared difference between predicted probabilities and what happened
// (Brier 1950).
func Brier(p []float64, y []bool) float64 {
	s := 0.0
	for i := range p {
		v := 0.0
		if y[i] {
			v = 1
		}
		s += (p[i] - v) * (p[i] - v)
	}
	return s / float64(len(p))
}

// AUC is the area under the ROC curve: the probability that a random positive gets a higher
// score than a random negative, ties counting half (the Mann-Whitney form). 0.5 without both
// classes.
func AUC(p []float64, y []bool) float64 {
	type pair struct {
		p float64
		y bool
	}
	ps := make([]pair, len(p))
	for i := range p {
		ps[i] = pair{p[i], y[i]}
	}
	slices.SortFunc(ps, func(a, b pair) int { return cmp.Compare(a.p, b.p) })
	// average ranks over ties
	var pos, neg, rankSum float64
	for i := 0; i < len(ps); {
		j := i
		for j < len(ps) && ps[j].p == ps[i].p {
			j++
		}
		avg := float64(i+j+1) / 2 // ranks i+1 .. j
		for k := i; k < j; k++ {
			if ps[k].y {
				rankSum += avg
				pos++
			} else {
				neg++
			}
		}
		i = j
	}
	if pos == 0 || neg == 0 {
		return 0.5
	}
	return (rankSum - pos*(pos+1)/2) / (pos * neg)
}

type predictError string

func (e predictError) Error() string { return string(e) }

const errTooFew = predictError("too few completed cases before and after the cut date to measure the error (at least 8 completed cases are needed)")

// RunningForecast is the forecast for one running case.
type RunningForecast struct {
	Case      string   `json:"case"`
	Events    int      `json:"events"`
	Last      string   `json:"last_activity"`
	Since     string   `json:"last_event"`
	Forecast  Forecast `json:"forecast"`
	Finish    string   `json:"expected_finish"`
	FinishLow string   `json:"finish_low"`
	FinishHi  string   `json:"finish_high,omitempty"`
}

// ForecastRunning fits a model on all completed cases and forecasts every running case.
func ForecastRunning(l *eventlog.Log, part Partition, opt Options) (*Model, []RunningForecast, error) {
	opt.defaults(l)
	m, err := Fit(l, part.Completed, opt)
	if err != nil {
		return nil, nil, err
	}
	var out []RunningForecast
	for _, c := range part.Running {
		acts, times := caseTimes(l, c)
		f := m.Forecast(acts, m.System.attrOf(c))
		last := times[len(times)-1]
		rf := RunningForecast{Case: l.CaseID(c), Events: len(acts), Last: l.Activities.Name(acts[len(acts)-1]),
			Since: timestamp.FormatRFC3339(last), Forecast: f,
			Finish:    timestamp.FormatRFC3339(last + int64(f.MedianSeconds*1e6)),
			FinishLow: timestamp.FormatRFC3339(last + int64(f.LowSeconds*1e6)),
			FinishHi:  timestamp.FormatRFC3339(last + int64(f.HighSeconds*1e6))}
		out = append(out, rf)
	}
	slices.SortStableFunc(out, func(a, b RunningForecast) int { return cmp.Compare(a.Finish, b.Finish) })
	return m, out, nil
}

// spreadFloor keeps a state whose past cases all took about as long from getting an interval
// of no width (one hour; a day gave the same coverage within a point).
const spreadFloor = 3600.0
