package engine

import (
	"cmp"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"slices"
	"strings"
	"time"

	"tracewright/core/conformance"
	"tracewright/core/discovery"
	"tracewright/core/export"
	"tracewright/core/petri"
	"tracewright/core/predict"
	"tracewright/core/render"
)

// ConformanceOptions choose the reference model: the model discovered with the given noise, or
// a PNML file handed over with the request.
type ConformanceOptions struct {
	Source    string  `json:"source"` // "discovered" (default) or "pnml"
	Noise     float64 `json:"noise"`
	Variants  float64 `json:"variants"`   // discover from the most frequent paths covering this share of cases; 0 or 1: all
	MaxStates int     `json:"max_states"` // per variant; 0: 50,000
	// MaxSeconds bounds the time per variant; 0: 5 s.
	MaxSeconds float64 `json:"max_seconds"`
	// Costs set log-move and model-move costs per activity (1 where not set).
	Costs conformance.Costs `json:"costs"`
	// Running includes cases still running (by the forecast's rules); by default they are left
	// out, since their missing ends would count as skipped steps.
	Running bool `json:"include_running"`
}

// ConformanceResult is what the conformance view shows.
type ConformanceResult struct {
	Model       string                          `json:"model"`
	LeftOut     int                             `json:"running_cases_left_out"`
	Alignment   *conformance.Result             `json:"alignment"`
	TokenReplay float64                         `json:"token_replay_fitness"`
	Activities  []conformance.ActivityDeviation `json:"activities"`
	Patterns    []conformance.Pattern           `json:"patterns"`
	Unmatched   conformance.Matching            `json:"unmatched"`
	// SVG is the model with each step's deviations on it; TimingSVG with the time spent there.
	SVG       string              `json:"svg"`
	Timing    *conformance.Timing `json:"timing"`
	TimingSVG string              `json:"timing_svg"`
}

// ConformanceProgress is the progress message of a conformance request: how many of the log's
// variants have been set against the model.
type ConformanceProgress struct {
	Done  int `json:"variants_done"`
	Total int `json:"variants"`
}

func (e *Engine) conformance(ctx context.Context, req Request, f *File, emit func(Response)) (*ConformanceResult, error) {
	var o ConformanceOptions
	if err := options(req.Payload, &o, "conformance"); err != nil {
		return nil, err
	}
	if o.MaxStates <= 0 {
		o.MaxStates = 50000
	}
	if o.MaxSeconds <= 0 {
		o.MaxSeconds = 5
	}
	if err := o.Costs.Check(); err != nil {
		return nil, err
	}
	l, err := e.loaded()
	if err != nil {
		return nil, err
	}
	res := &ConformanceResult{}
	var net *petri.Net
	switch o.Source {
	case "", "discovered":
		if o.Variants < 0 || o.Variants > 1 {
			return nil, fmt.Errorf("the share of paths to discover from is between 0 and 1, not %v", o.Variants)
		}
		t := discovery.InductiveMiner(discovery.FromEventLog(l).Frequent(o.Variants), discovery.Options{Noise: o.Noise})
		net = petri.FromTree(t)
		res.Model = fmt.Sprintf("discovered by the Inductive Miner (leaving out %.0f%%)", o.Noise*100)
		if o.Variants > 0 && o.Variants < 1 {
			res.Model = fmt.Sprintf("discovered by the Inductive Miner from the most common paths, covering %.0f%% of cases (leaving out %.0f%% of what remains)", o.Variants*100, o.Noise*100)
		}
	case "pnml":
		if f == nil {
			return nil, errors.New("choose a PNML file for the reference model")
		}
		if net, err = petri.ReadPNML(f.R); err != nil {
			return nil, err
		}
		res.Model = f.Name
		if err := net.Sound(200000); err != nil {
			return nil, fmt.Errorf("%s is not a sound workflow net: %w", f.Name, err)
		}
		src, _, _ := net.WorkflowNet()
		net.Initial = net.Marking(src)
	default:
		return nil, fmt.Errorf("unknown model source %q", o.Source)
	}
	var keep func(int) bool
	if !o.Running {
		part := predict.Split(l, predict.Options{})
		res.LeftOut, keep = len(part.Running), part.NotRunning()
	}
	ctx, done := e.cancellable(ctx, req.ID)
	defer done()
	opt := conformance.Options{Costs: o.Costs, Keep: keep,
		Bound: conformance.Bound{States: o.MaxStates, Time: time.Duration(o.MaxSeconds * float64(time.Second))}}
	last := time.Now()
	opt.Progress = func(n, total int) {
		// a message and a turn for the host's pending messages every tenth of a second at most
		if n < total && time.Since(last) < 100*time.Millisecond {
			return
		}
		last = time.Now()
		if emit != nil {
			emit(Response{V: APIVersion, ID: req.ID, Kind: "progress", Payload: ConformanceProgress{Done: n, Total: total}})
		}
		if e.Yield != nil {
			e.Yield()
		}
	}
	if res.Alignment, err = conformance.AlignCases(ctx, l, net, opt); err != nil {
		return nil, err
	}
	rep := conformance.Replay(l, net)
	res.TokenReplay, res.Unmatched = rep.Fitness, rep.Unmatched
	res.Activities, res.Patterns = conformance.Deviations(res.Alignment)
	if res.SVG, _, err = render.PetriNetOverlay(net, deviationOverlay(net, res.Alignment, res.Activities)); err != nil {
		return nil, err
	}
	res.Timing = conformance.TimeOnModel(l, net, res.Alignment)
	if res.TimingSVG, _, err = render.PetriNetOverlay(net, timingOverlay(net, res.Timing)); err != nil {
		return nil, err
	}
	e.mu.Lock()
	e.conf = res.Alignment
	e.mu.Unlock()
	return res, nil
}

// deviationOverlay marks each visible transition with how often it was skipped where the model
// required it and how often its activity was done where the model did not allow it (log moves
// are placed on the first transition with the activity's label).
func deviationOverlay(n *petri.Net, r *conformance.Result, acts []conformance.ActivityDeviation) *render.Overlay {
	index := n.TransitionIndex()
	sync := make([]int, len(n.Transitions))
	skip := make([]int, len(n.Transitions))
	for _, v := range r.Variants {
		for _, m := range v.Moves {
			if m.Kind == "log" || m.Silent {
				continue
			}
			if m.Kind == "sync" {
				sync[index[m.Transition]] += v.Cases
			} else {
				skip[index[m.Transition]] += v.Cases
			}
		}
	}
	extra := make([]int, len(n.Transitions))
	for _, a := range acts {
		for t, tr := range n.Transitions {
			if tr.Label == a.Activity {
				extra[t] += a.LogMoves
				break
			}
		}
	}
	worst := 1
	for t := range n.Transitions {
		worst = max(worst, skip[t]+extra[t])
	}
	o := &render.Overlay{Ramp: render.DeviationRamp, Transitions: make([]render.Mark, len(n.Transitions))}
	for t, tr := range n.Transitions {
		if tr.Silent() {
			continue
		}
		text := "as modelled"
		switch {
		case skip[t] > 0 && extra[t] > 0:
			text = fmt.Sprintf("%d skipped · %d extra", skip[t], extra[t])
		case skip[t] > 0:
			text = fmt.Sprintf("%d skipped", skip[t])
		case extra[t] > 0:
			text = fmt.Sprintf("%d extra", extra[t])
		}
		o.Transitions[t] = render.Mark{Level: float64(skip[t]+extra[t]) / float64(worst), Text: text,
			Title: fmt.Sprintf("done as allowed %d times, skipped where required %d times, done where not allowed %d times", sync[t], skip[t], extra[t])}
	}
	return o
}

// timingOverlay marks each visible transition with its median time (waiting when the log has
// starts, else the sojourn) and the five places where tokens waited longest by median.
func timingOverlay(n *petri.Net, tm *conformance.Timing) *render.Overlay {
	o := &render.Overlay{Ramp: render.DurationRamp, Transitions: make([]render.Mark, len(n.Transitions)), Places: make([]render.Mark, len(n.Places))}
	byID := map[string]conformance.TransitionTiming{}
	worst := 1.0
	figure := func(tt conformance.TransitionTiming) (float64, int) {
		if tm.HasStart {
			return tt.Waiting.Median, tt.Waiting.N
		}
		return tt.Sojourn.Median, tt.Sojourn.N
	}
	for _, tt := range tm.Transitions {
		byID[tt.Transition] = tt
		v, _ := figure(tt)
		worst = max(worst, v)
	}
	for _, pt := range tm.Places {
		worst = max(worst, pt.Wait.Median)
	}
	what := "from enabled to complete"
	if tm.HasStart {
		what = "waiting, from enabled to start"
	}
	for t, tr := range n.Transitions {
		tt, ok := byID[tr.ID]
		v, count := figure(tt)
		if !ok || count == 0 {
			continue
		}
		o.Transitions[t] = render.Mark{Level: v / worst, Text: "median " + render.Human(v),
			Title: fmt.Sprintf("median %s %s over %d times (mean %s)", render.Human(v), what, count, render.Human(meanOf(tt, tm.HasStart)))}
	}
	places := make([]int, len(n.Places))
	for p := range places {
		places[p] = p
	}
	slices.SortStableFunc(places, func(a, b int) int { return cmp.Compare(tm.Places[b].Wait.Median, tm.Places[a].Wait.Median) })
	for _, p := range places[:min(5, len(places))] {
		w := tm.Places[p].Wait
		if w.N == 0 || w.Median <= 0 {
			break
		}
		o.Places[p] = render.Mark{Level: w.Median / worst, Text: render.Human(w.Median),
			Title: fmt.Sprintf("tokens waited a median %s here (%d times)", render.Human(w.Median), w.N)}
	}
	return o
}

func meanOf(tt conformance.TransitionTiming, hasStart bool) float64 {
	if hasStart {
		return tt.Waiting.Mean
	}
	return tt.Sojourn.Mean
}

// CasesOptions choose which cases of the last conformance check to hand back.
type CasesOptions struct {
	Which string `json:"which"` // "fitting" or "deviating"
}

// CasesResult is the chosen cases as a CSV log (the columns of export.WriteCSV), ready to save
// and open again.
type CasesResult struct {
	Cases int    `json:"cases"`
	CSV   string `json:"csv"`
}

func (e *Engine) conformanceCases(raw json.RawMessage) (*CasesResult, error) {
	var o CasesOptions
	if err := json.Unmarshal(raw, &o); err != nil {
		return nil, fmt.Errorf("conformance_cases options: %w", err)
	}
	e.mu.Lock()
	l, r := e.log, e.conf
	e.mu.Unlock()
	if l == nil || r == nil {
		return nil, errors.New("check conformance first")
	}
	if o.Which != "fitting" && o.Which != "deviating" {
		return nil, fmt.Errorf("which cases: %q is neither fitting nor deviating", o.Which)
	}
	set := r.CaseSet(o.Which == "fitting")
	var b strings.Builder
	if err := export.WriteCSVCases(&b, l, set); err != nil {
		return nil, err
	}
	return &CasesResult{Cases: len(set), CSV: b.String()}, nil
}
