package conformance

import (
	"context"
	"errors"
	"runtime"
	"slices"
	"sort"
	"strings"
	"sync"
	"sync/atomic"

	"tracewright/core/eventlog"
	"tracewright/core/petri"
)

// VariantAlignment is the alignment of one variant, shared by all its cases.
type VariantAlignment struct {
	Trace   []string `json:"trace"`
	Cases   int      `json:"cases"`
	Cost    int      `json:"cost"`
	Fitness float64  `json:"fitness"`
	Moves   []Move   `json:"moves"`
	States  int      `json:"states_explored"`
	Aligned bool     `json:"aligned"`
	Reason  string   `json:"reason,omitempty"`
	// Examples names up to 10 of the variant's cases, in log order, so a reader can look them up.
	Examples  []string `json:"case_examples"`
	alignment *Alignment
	cases     []int32 // the cases counted, in log order
}

// Result is the alignment of a whole log.
type Result struct {
	Fitness      float64            `json:"fitness"`
	Precision    float64            `json:"precision"`
	ShortestRun  int                `json:"shortest_model_run"`
	Variants     []VariantAlignment `json:"variants"`
	NotAligned   int                `json:"variants_not_aligned"`
	FittingCases int                `json:"fitting_cases"`
	Cases        int                `json:"cases"`
}

// AlignLog aligns every variant once (each within the bound) and computes the log's
// alignment-based fitness, 1 − Σ cost / Σ (cost of all log moves + cost of the shortest model
// run), over cases (so not the mean of the traces' fitness), and escaping-edges precision.
// Variants over the bound are reported as not aligned and left out of both figures.
func AlignLog(l *eventlog.Log, n *petri.Net, costs Costs, bound Bound) (*Result, error) {
	return AlignCases(context.Background(), l, n, Options{Costs: costs, Bound: bound})
}

// Options are AlignCases' settings beyond the log and the net.
type Options struct {
	Costs Costs
	Bound Bound
	// Keep chooses the cases to align (nil keeps all): a variant counts only its kept cases, and
	// a variant with none is left out. Conformance of running cases is usually not wanted: their
	// missing ends would count as skipped steps.
	Keep func(c int) bool
	// Progress, when set, is told after each variant how many of how many are done. Calls come
	// one at a time, from whichever goroutine aligned the variant.
	Progress func(done, total int)
}

// AlignCases is AlignLog with Options, stopping with ctx's error when ctx is done (checked
// between variants).
//
// Variants are aligned on as many goroutines as GOMAXPROCS allows, each with its own aligner
// (the warm-started program is not shared); the result does not depend on their number.
func AlignCases(ctx context.Context, l *eventlog.Log, n *petri.Net, opt Options) (*Result, error) {
	costs, bound, keep := opt.Costs, opt.Bound, opt.Keep
	al0, err := newAligner(n, costs)
	if err != nil {
		return nil, err
	}
	shortest, err := al0.shortestRun(bound)
	if err != nil {
		return nil, err
	}
	res := &Result{ShortestRun: shortest}
	for _, v := range l.Variants {
		cases := v.Cases
		if keep != nil {
			cases = nil
			for _, c := range v.Cases {
				if keep(int(c)) {
					cases = append(cases, c)
				}
			}
			if len(cases) == 0 {
				continue
			}
		}
		var trace []string
		for _, a := range v.Activities {
			trace = append(trace, l.Activities.Name(a))
		}
		var examples []string
		for _, c := range cases[:min(10, len(cases))] {
			examples = append(examples, l.CaseID(int(c)))
		}
		res.Variants = append(res.Variants, VariantAlignment{Trace: trace, Cases: len(cases), cases: cases, Examples: examples})
		res.Cases += len(cases)
	}
	alignments := make([]*Alignment, len(res.Variants))
	errs := make([]error, len(res.Variants))
	workers := min(runtime.GOMAXPROCS(0), len(res.Variants))
	var next atomic.Int64
	var wg sync.WaitGroup
	var mu sync.Mutex
	done := 0
	for w := 0; w < workers; w++ {
		al := al0
		if w > 0 {
			al, _ = newAligner(n, costs) // cannot fail: al0 was built from the same net
		}
		wg.Add(1)
		go func() {
			defer wg.Done()
			for ctx.Err() == nil {
				k := int(next.Add(1) - 1)
				if k >= len(res.Variants) {
					return
				}
				alignments[k], errs[k] = al.align(res.Variants[k].Trace, bound)
				if opt.Progress != nil {
					mu.Lock()
					done++
					opt.Progress(done, len(res.Variants))
					mu.Unlock()
				}
			}
		}()
	}
	wg.Wait()
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	var num, den float64
	for k := range res.Variants {
		va := &res.Variants[k]
		if err := errs[k]; err != nil {
			if !errors.Is(err, ErrBound) {
				return nil, err
			}
			va.Reason = err.Error()
			res.NotAligned++
			continue
		}
		al := alignments[k]
		logMoves := 0
		for _, a := range va.Trace {
			logMoves += costs.logCost(a)
		}
		va.Aligned, va.Cost, va.Moves, va.States, va.alignment = true, al.Cost, al.Moves, al.States, al
		va.Fitness = 1 - float64(al.Cost)/float64(logMoves+shortest)
		if al.Cost == 0 {
			res.FittingCases += va.Cases
		}
		num += float64(va.Cases * al.Cost)
		den += float64(va.Cases * (logMoves + shortest))
	}
	if den > 0 {
		res.Fitness = 1 - num/den
	}
	res.Precision = precision(n, res.Variants)
	return res, nil
}

// precision is escaping-edges precision (Muñoz-Gama and Carmona, "A fresh look at precision in
// process conformance", BPM 2010) computed on the aligned log, as Adriansyah et al. (2013) do for
// non-fitting logs: the states are the prefixes of the model's side of the alignments (visible
// transitions' labels); in each, the activities the model allows (visible transitions enabled
// after any silent steps) are compared with those the aligned log shows next. With ω(s) the cases
// through state s, A(s) the allowed and E(s) the escaping (allowed, never shown) activities,
// precision = 1 − Σ ω(s)|E(s)| / Σ ω(s)|A(s)|. We take this variant because it needs no fitting
// log and each state is the model's own, so the allowed set is exact.
func precision(n *petri.Net, vs []VariantAlignment) float64 {
	type state struct {
		weight  int
		allowed map[string]bool
		shown   map[string]bool
	}
	states := map[string]*state{}
	visit := func(prefix []string, m petri.Marking, w int, next string) {
		k := strings.Join(prefix, "\x00")
		st := states[k]
		if st == nil {
			st = &state{allowed: enabledVisible(n, m), shown: map[string]bool{}}
			states[k] = st
		}
		st.weight += w
		if next != "" {
			st.shown[next] = true
		}
	}
	index := n.TransitionIndex()
	for _, v := range vs {
		if !v.Aligned {
			continue
		}
		m := n.Initial
		var prefix []string
		for _, mv := range v.Moves {
			if mv.Kind == "log" {
				continue
			}
			t, ok := index[mv.Transition]
			if !ok {
				panic("conformance: alignment names an unknown transition " + mv.Transition)
			}
			if !mv.Silent {
				visit(prefix, m, v.Cases, mv.Activity)
				prefix = append(prefix, mv.Activity)
			}
			m = n.Fire(m, t)
		}
		visit(prefix, m, v.Cases, "")
	}
	var esc, all float64
	keys := make([]string, 0, len(states))
	for k := range states {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	for _, k := range keys {
		st := states[k]
		for a := range st.allowed {
			all += float64(st.weight)
			if !st.shown[a] {
				esc += float64(st.weight)
			}
		}
	}
	if all == 0 {
		return 1
	}
	return 1 - esc/all
}

// enabledVisible lists the labels of visible transitions enabled in m or after silent steps.
func enabledVisible(n *petri.Net, m petri.Marking) map[string]bool {
	out := map[string]bool{}
	seen := map[string]bool{m.Key(): true}
	stack := []petri.Marking{m}
	for len(stack) > 0 && len(seen) < silentLimit {
		cur := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		for t, tr := range n.Transitions {
			if !n.Enabled(cur, t) {
				continue
			}
			if !tr.Silent() {
				out[tr.Label] = true
				continue
			}
			next := n.Fire(cur, t)
			if k := next.Key(); !seen[k] {
				seen[k] = true
				stack = append(stack, next)
			}
		}
	}
	return out
}

// CaseSet lists the cases of the aligned variants that fit the model (cost 0) or, with fit false,
// those that deviate, in log order. Variants that were not aligned are in neither.
func (r *Result) CaseSet(fit bool) []int32 {
	var out []int32
	for _, v := range r.Variants {
		if v.Aligned && (v.Cost == 0) == fit {
			out = append(out, v.cases...)
		}
	}
	slices.Sort(out)
	return out
}
