package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"os"

	"tracewright/core/conformance"
	"tracewright/core/petri"
)

// conformOutput is `conform --json`. Only token replay is done so far; alignment-based fitness,
// precision and moves are to come (DEVELOPERS.md, Roadmap), so their keys are absent rather than
// faked.
type conformOutput struct {
	Model       string                   `json:"model"`
	TokenReplay conformance.ReplayResult `json:"token_replay"`
}

func conformCommand(ctx context.Context, args []string, stdout io.Writer) error {
	fs := flag.NewFlagSet("conform", flag.ContinueOnError)
	var rf readFlags
	rf.register(fs)
	model := fs.String("model", "", "the reference model, a PNML file (a sound workflow net)")
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
	if *asJSON {
		return printJSON(stdout, conformOutput{Model: *model, TokenReplay: res})
	}
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
