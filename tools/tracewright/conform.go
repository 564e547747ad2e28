package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"os"
	"strconv"
	"strings"
	"time"

	"tracewright/core/conformance"
	"tracewright/core/export"
	"tracewright/core/petri"
	"tracewright/core/predict"
	"tracewright/core/render"
)

// conformOutput is `conform --json`: alignment-based fitness and precision with every variant's
// cost and moves at the top level, and the token replay beside them.
type conformOutput struct {
	Model   string `json:"model"`
	LeftOut int    `json:"running_cases_left_out"`
	*conformance.Result
	TokenReplay conformance.ReplayResult `json:"token_replay"`
	Timing      *conformance.Timing      `json:"timing"`
}

func conformCommand(ctx context.Context, args []string, stdout io.Writer) error {
	fs := flag.NewFlagSet("conform", flag.ContinueOnError)
	var rf readFlags
	rf.register(fs)
	model := fs.String("model", "", "the reference model, a PNML file (a sound workflow net)")
	bound := fs.Int("max-states", 200000, "states an alignment may explore before its variant is reported as not aligned")
	seconds := fs.Float64("max-seconds", 0, "time an alignment may take before its variant is reported as not aligned (0: no limit)")
	costs := conformance.Costs{Log: map[string]int{}, Model: map[string]int{}}
	fs.Func("log-cost", "`ACTIVITY=N`: the cost of doing ACTIVITY where the model does not allow it (default 1; repeatable)", costFlag(costs.Log))
	fs.Func("model-cost", "`ACTIVITY=N`: the cost of skipping ACTIVITY where the model requires it (default 1; repeatable)", costFlag(costs.Model))
	withRunning := fs.Bool("include-running", false, "align cases still running too (their missing ends count as skipped steps)")
	asJSON := fs.Bool("json", false, "print JSON")
	which := fs.String("cases", "", "with --out: write the `fitting` or the `deviating` cases as a CSV log")
	out := fs.String("out", "", "the CSV file for --cases")
	force := fs.Bool("force", false, "replace an existing --out file")
	path, err := parse(fs, args)
	if err != nil {
		return err
	}
	if *model == "" {
		return &usageError{"conform needs --model NET.pnml"}
	}
	if (*which == "") != (*out == "") {
		return &usageError{"--cases and --out go together"}
	}
	if *which != "" && *which != "fitting" && *which != "deviating" {
		return &usageError{fmt.Sprintf("--cases is fitting or deviating, not %q", *which)}
	}
	if *out != "" {
		if err := checkOutput(path, *out, *force); err != nil {
			return err
		}
	}
	f, err := os.Open(*model)
	if err != nil {
		return &ioError{err}
	}
	net, err := petri.ReadPNML(f)
	f.Close()
	if err != nil {
		return fmt.Errorf("%s: %w", *model, err)
	}
	if err := net.Sound(200000); err != nil {
		return fmt.Errorf("%s is not a sound workflow net: %w", *model, err)
	}
	src, _, _ := net.WorkflowNet()
	net.Initial = net.Marking(src)
	l, _, err := load(ctx, path, &rf)
	if err != nil {
		return err
	}
	res := conformance.Replay(l, net)
	var keep func(int) bool
	leftOut := 0
	if !*withRunning {
		part := predict.Split(l, predict.Options{})
		leftOut, keep = len(part.Running), part.NotRunning()
	}
	if err := costs.Check(); err != nil {
		return &usageError{err.Error()}
	}
	al, err := conformance.AlignCases(ctx, l, net, conformance.Options{Costs: costs, Keep: keep,
		Bound: conformance.Bound{States: *bound, Time: time.Duration(*seconds * float64(time.Second))}})
	if err != nil {
		return err
	}
	if *out != "" {
		set := al.CaseSet(*which == "fitting")
		if err := writeFile(*out, func(w io.Writer) error { return export.WriteCSVCases(w, l, set) }); err != nil {
			return err
		}
		fmt.Fprintf(os.Stderr, "tracewright: %d %s cases written to %s\n", len(set), *which, *out)
	}
	timing := conformance.TimeOnModel(l, net, al)
	if *asJSON {
		return printJSON(stdout, conformOutput{Model: *model, LeftOut: leftOut, Result: al, TokenReplay: res, Timing: timing})
	}
	fmt.Fprintf(stdout, "alignments: fitness %.4f, precision %.4f; %d of %d cases fit; %d variants not aligned within the bound; %d running cases left out\n",
		al.Fitness, al.Precision, al.FittingCases, al.Cases, al.NotAligned, leftOut)
	t := res.Tokens
	fmt.Fprintf(stdout, "token replay on %s: fitness %.4f (produced %d, consumed %d, missing %d, remaining %d)\n",
		*model, res.Fitness, t.Produced, t.Consumed, t.Missing, t.Remaining)
	if len(res.Unmatched.Activities) > 0 {
		fmt.Fprintf(stdout, "activities the model does not have: %v\n", res.Unmatched.Activities)
	}
	if len(res.Unmatched.Labels) > 0 {
		fmt.Fprintf(stdout, "model labels the log does not have: %v\n", res.Unmatched.Labels)
	}
	what := "sojourn (enabled to complete)"
	if timing.HasStart {
		what = "waiting (enabled to start)"
	}
	fmt.Fprintf(stdout, "time on the model, median %s per step:\n", what)
	for _, tt := range timing.Transitions {
		d := tt.Sojourn
		if timing.HasStart {
			d = tt.Waiting
		}
		if d.N > 0 {
			fmt.Fprintf(stdout, "  %-30s %10s  (%d times)\n", tt.Activity, render.Human(d.Median), d.N)
		}
	}
	fmt.Fprintf(stdout, "case duration, median: fitting %s (%d cases), deviating %s (%d cases)\n",
		render.Human(timing.Fitting.Median), timing.Fitting.N, render.Human(timing.Deviating.Median), timing.Deviating.N)
	return nil
}

// costFlag reads ACTIVITY=N into m; the activity may itself contain "=" (the last one splits).
func costFlag(m map[string]int) func(string) error {
	return func(v string) error {
		i := strings.LastIndexByte(v, '=')
		if i <= 0 {
			return fmt.Errorf("%q: want ACTIVITY=N", v)
		}
		n, err := strconv.Atoi(v[i+1:])
		if err != nil {
			return fmt.Errorf("%q: the cost is not a whole number", v)
		}
		m[v[:i]] = n
		return nil
	}
}
