package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"os"

	"tracewright/core/conformance"
	"tracewright/core/petri"
	"tracewright/core/predict"
)

// conformOutput is `conform --json`: alignment-based fitness and precision with every variant's
// cost and moves at the top level, and the token replay beside them.
type conformOutput struct {
	Model   string `json:"model"`
	LeftOut int    `json:"running_cases_left_out"`
	*conformance.Result
	TokenReplay conformance.ReplayResult `json:"token_replay"`
}

func conformCommand(ctx context.Context, args []string, stdout io.Writer) error {
	fs := flag.NewFlagSet("conform", flag.ContinueOnError)
	var rf readFlags
	rf.register(fs)
	model := fs.String("model", "", "the reference model, a PNML file (a sound workflow net)")
	bound := fs.Int("max-states", 200000, "states an alignment may explore before its variant is reported as not aligned")
	withRunning := fs.Bool("include-running", false, "align cases still running too (their missing ends count as skipped steps)")
	asJSON := fs.Bool("json", false, "print JSON")
	path, err := parse(fs, args)
	if err != nil {
		return err
	}
	if *model == "" {
		return &usageError{"conform needs --model NET.pnml"}
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
	al, err := conformance.AlignCases(l, net, conformance.Costs{}, *bound, keep)
	if err != nil {
		return err
	}
	if *asJSON {
		return printJSON(stdout, conformOutput{Model: *model, LeftOut: leftOut, Result: al, TokenReplay: res})
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
	return nil
}
