package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"tracewright/core/bpmn"
	"tracewright/core/dfg"
	"tracewright/core/discovery"
	"tracewright/core/petri"
	"tracewright/core/tree"
)

// dfgCommand prints the directly-follows graph as JSON.
func dfgCommand(ctx context.Context, args []string, stdout io.Writer) error {
	fs := flag.NewFlagSet("dfg", flag.ContinueOnError)
	var rf readFlags
	rf.register(fs)
	acts := fs.Float64("activities", 1, "share of activity instances to show (0 to 1)")
	edges := fs.Float64("edges", 1, "share of edge occurrences to show (0 to 1)")
	path, err := parse(fs, args)
	if err != nil {
		return err
	}
	if *acts <= 0 || *acts > 1 || *edges <= 0 || *edges > 1 {
		return &usageError{"--activities and --edges are shares above 0 and at most 1"}
	}
	l, _, err := load(ctx, path, &rf)
	if err != nil {
		return err
	}
	return printJSON(stdout, dfg.Build(l, dfg.Options{Activities: *acts, Edges: *edges}))
}

// discoverOutput is what `discover --json` prints.
type discoverOutput struct {
	Method      string  `json:"method"`
	Noise       float64 `json:"noise,omitempty"`
	Variants    float64 `json:"variants"` // the share of cases whose paths were used
	Tree        string  `json:"tree,omitempty"`
	Places      int     `json:"places"`
	Transitions int     `json:"transitions"`
	Silent      int     `json:"silent_transitions"`
	Sound       bool    `json:"sound"`
	Out         string  `json:"out,omitempty"`
}

func discoverCommand(ctx context.Context, args []string, stdout io.Writer) error {
	fs := flag.NewFlagSet("discover", flag.ContinueOnError)
	var rf readFlags
	rf.register(fs)
	method := fs.String("method", "im", "im (Inductive Miner), imd (on the directly-follows graph) or alpha")
	noise := fs.Float64("noise", 0, "noise threshold of IMf and IMfD (im, imd), 0 to 1 (0: the base algorithms)")
	variants := fs.Float64("variants", 1, "discover from the most frequent paths that cover this share of the cases, 0 to 1 (1: all)")
	out := fs.String("out", "", "write the Petri net as PNML here")
	dot := fs.String("dot", "", "write the Petri net as Graphviz DOT here")
	bpmnOut := fs.String("bpmn", "", "write the process tree as BPMN 2.0 here (im and imd)")
	force := fs.Bool("force", false, "replace existing output files")
	asJSON := fs.Bool("json", false, "print JSON")
	path, err := parse(fs, args)
	if err != nil {
		return err
	}
	if *noise < 0 || *noise > 1 {
		return &usageError{"--noise is a share between 0 and 1"}
	}
	if *variants <= 0 || *variants > 1 {
		return &usageError{"--variants is a share above 0 and at most 1"}
	}
	for _, o := range []string{*out, *dot, *bpmnOut} {
		if o != "" {
			if err := checkOutput(path, o, *force); err != nil {
				return err
			}
		}
	}
	l, _, err := load(ctx, path, &rf)
	if err != nil {
		return err
	}
	dl := discovery.FromEventLog(l).Frequent(*variants)
	res := discoverOutput{Method: strings.ToLower(*method), Noise: *noise, Variants: *variants, Out: *out}
	var net *petri.Net
	var t *tree.Node
	switch res.Method {
	case "im":
		t = discovery.InductiveMiner(dl, discovery.Options{Noise: *noise})
		res.Tree, net = t.String(), petri.FromTree(t)
	case "imd":
		t = discovery.InductiveMinerGraph(dl, discovery.Options{Noise: *noise})
		res.Tree, net = t.String(), petri.FromTree(t)
	case "alpha":
		a, err := discovery.Alpha(dl)
		if err != nil {
			return err
		}
		net = a.PetriNet()
	default:
		return &usageError{fmt.Sprintf("--method takes im, imd or alpha, not %q", *method)}
	}
	net.Name = filepath.Base(path)
	res.Places, res.Transitions = len(net.Places), len(net.Transitions)
	for _, t := range net.Transitions {
		if t.Silent() {
			res.Silent++
		}
	}
	res.Sound = net.Sound(200000) == nil
	if *out != "" {
		if err := writeFile(*out, func(w io.Writer) error { return petri.WritePNML(w, net) }); err != nil {
			return err
		}
	}
	if *bpmnOut != "" {
		if t == nil {
			return &usageError{"--bpmn needs a process tree: use --method im or imd"}
		}
		if err := writeFile(*bpmnOut, func(w io.Writer) error { return bpmn.Write(w, bpmn.FromTree(t), filepath.Base(path)) }); err != nil {
			return err
		}
	}
	if *dot != "" {
		if err := writeFile(*dot, func(w io.Writer) error { return petri.WriteDOT(w, net) }); err != nil {
			return err
		}
	}
	if *asJSON {
		return printJSON(stdout, res)
	}
	if res.Tree != "" {
		fmt.Fprintln(stdout, res.Tree)
	}
	fmt.Fprintf(stdout, "Petri net: %d places, %d transitions (%d silent), sound: %v\n", res.Places, res.Transitions, res.Silent, res.Sound)
	if res.Method == "alpha" {
		fmt.Fprintln(stdout, "note: the alpha algorithm finds no loops of one or two steps, no silent steps and has no notion of noise")
	}
	return nil
}

// writeFile writes beside the target and renames, so a failed write never leaves half a file.
func writeFile(path string, body func(io.Writer) error) error {
	tmp, err := os.CreateTemp(filepath.Dir(path), ".tracewright-*")
	if err != nil {
		return &ioError{err}
	}
	defer os.Remove(tmp.Name())
	if err := body(tmp); err != nil {
		tmp.Close()
		return &ioError{err}
	}
	if err := tmp.Close(); err != nil {
		return &ioError{err}
	}
	if err := os.Rename(tmp.Name(), path); err != nil {
		return &ioError{err}
	}
	return nil
}
