package conformance

import (
	"math"
	"slices"

	"tracewright/core/eventlog"
	"tracewright/core/petri"
	"tracewright/core/summary"
)

// Timing is time on the model: the aligned cases replayed on the net with their timestamps.
// Durations are in seconds.
type Timing struct {
	// HasStart tells whether the log records when activities start: only then can waiting
	// (enabled to start) and service (start to complete) be told apart; otherwise the sojourn
	// (enabled to complete) holds both.
	HasStart    bool               `json:"has_start"`
	Transitions []TransitionTiming `json:"transitions"` // visible transitions, in the net's order
	Places      []PlaceTiming      `json:"places"`      // in the net's order
	Cases       int                `json:"cases_timed"`
	Untimed     int                `json:"cases_untimed"`
	// Case durations (first to last event) of the cases that fit the model and of those that do
	// not, with histograms over the same bins so they can be drawn side by side.
	Fitting       summary.Dist  `json:"fitting_case_seconds"`
	Deviating     summary.Dist  `json:"deviating_case_seconds"`
	FittingBins   []summary.Bin `json:"fitting_case_histogram"`
	DeviatingBins []summary.Bin `json:"deviating_case_histogram"`
}

// TransitionTiming is the time spent at one visible transition over its synchronous moves.
type TransitionTiming struct {
	Transition string       `json:"transition"`
	Activity   string       `json:"activity"`
	Sojourn    summary.Dist `json:"sojourn_seconds"`
	Waiting    summary.Dist `json:"waiting_seconds"` // only when the log has start events
	Service    summary.Dist `json:"service_seconds"` // only when the log has start events
}

// PlaceTiming is how long tokens waited in a place before a visible transition took them.
type PlaceTiming struct {
	Place string       `json:"place"`
	Wait  summary.Dist `json:"wait_seconds"`
}

// TimeOnModel replays each aligned case on the net with its timestamps, following its variant's
// alignment move by move, and measures where time goes. A token carries the time it was made:
// the case's first timestamp for the initial marking, an activity's completion for what it
// produces. A transition is enabled when its last input token arrived. A synchronous move fires
// at the event's start (its completion when no start is recorded) and produces at its completion;
// model moves and silent transitions fire as soon as they are enabled (they leave no timestamp,
// and firing them early puts the wait on the place before the visible step that actually waited,
// where an analyst looks for it). Log moves consume and produce nothing. Tokens in a place are
// taken oldest first.
//
// This follows the timed replay of van der Aalst, "Process Mining: Data Science in Action" (2nd
// ed., 2016), section 9.4, on the alignment instead of on a token game, so deviations never make
// tokens appear out of nowhere (from memory of that section; the firing rules for silent steps
// are our choice, stated above). Negative gaps, where the log shows a step starting before the
// model says it could, count as 0. Cases with an event without a timestamp are left out and
// counted. Cost: O(events + moves) per case and O(samples · log samples) for the summaries.
func TimeOnModel(l *eventlog.Log, n *petri.Net, r *Result) *Timing {
	tm := &Timing{HasStart: l.InstFirst != nil}
	index := n.TransitionIndex()
	sojourn := make([][]float64, len(n.Transitions))
	waiting := make([][]float64, len(n.Transitions))
	service := make([][]float64, len(n.Transitions))
	wait := make([][]float64, len(n.Places))
	var fitting, deviating []float64
	tokens := make([][]int64, len(n.Places))
	const sec = 1e6 // timestamps are microseconds
	for _, v := range r.Variants {
		if !v.Aligned {
			continue
		}
	cases:
		for _, c := range v.cases {
			first, last, ok := l.CaseSpan(int(c))
			from, to := l.Events(int(c))
			for e := from; e < to; e++ {
				if l.Time[e] == eventlog.NoTime {
					ok = false
				}
			}
			if !ok {
				tm.Untimed++
				continue
			}
			tm.Cases++
			if v.Cost == 0 {
				fitting = append(fitting, float64(last-first)/sec)
			} else {
				deviating = append(deviating, float64(last-first)/sec)
			}
			for p := range tokens {
				tokens[p] = tokens[p][:0]
				for k := 0; k < n.Initial[p]; k++ {
					tokens[p] = append(tokens[p], first)
				}
			}
			inst := int(l.InstStart[c])
			for _, mv := range v.Moves {
				if mv.Kind == "log" {
					inst++
					continue
				}
				t := index[mv.Transition]
				tr := n.Transitions[t]
				enabled := first
				for _, p := range tr.In {
					if len(tokens[p]) == 0 {
						continue cases // cannot happen for an alignment of this net; never guess
					}
					enabled = max(enabled, tokens[p][0])
				}
				fire, done := enabled, enabled
				if mv.Kind == "sync" {
					fe, le := l.InstanceEvents(inst)
					inst++
					fire, done = l.Time[fe], l.Time[le]
					sojourn[t] = append(sojourn[t], math.Max(0, float64(done-enabled)/sec))
					if fe != le {
						waiting[t] = append(waiting[t], math.Max(0, float64(fire-enabled)/sec))
						service[t] = append(service[t], math.Max(0, float64(done-fire)/sec))
					}
				}
				for _, p := range tr.In {
					if mv.Kind == "sync" {
						wait[p] = append(wait[p], math.Max(0, float64(fire-tokens[p][0])/sec))
					}
					tokens[p] = tokens[p][1:]
				}
				for _, p := range tr.Out {
					tokens[p] = append(tokens[p], done)
				}
			}
		}
	}
	for t, tr := range n.Transitions {
		if tr.Silent() {
			continue
		}
		tm.Transitions = append(tm.Transitions, TransitionTiming{Transition: tr.ID, Activity: tr.Label,
			Sojourn: summary.Of(sojourn[t]), Waiting: summary.Of(waiting[t]), Service: summary.Of(service[t])})
	}
	for p, pl := range n.Places {
		tm.Places = append(tm.Places, PlaceTiming{Place: pl.ID, Wait: summary.Of(wait[p])})
	}
	tm.Fitting, tm.Deviating = summary.Of(fitting), summary.Of(deviating)
	tm.FittingBins, tm.DeviatingBins = sharedHistograms(fitting, deviating, 12)
	return tm
}

// sharedHistograms bins two sorted samples over the same k bins spanning both.
func sharedHistograms(a, b []float64, k int) ([]summary.Bin, []summary.Bin) {
	all := slices.Concat(a, b)
	if len(all) == 0 {
		return nil, nil
	}
	slices.Sort(all)
	edges := summary.Histogram(all, k)
	count := func(xs []float64) []summary.Bin {
		out := slices.Clone(edges)
		for i := range out {
			out[i].Count = 0
		}
		for _, x := range xs {
			i := len(out) - 1
			for j, e := range out {
				if x < e.Hi {
					i = j
					break
				}
			}
			out[i].Count++
		}
		return out
	}
	return count(a), count(b)
}
