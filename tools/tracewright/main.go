// Command tracewright is the command-line face of the Tracewright engine, for batch work and for
// logs too large for a browser. It reads CSV and XES logs (plain or gzip) with the same core as
// the page and prints results as text, or as JSON for scripts.
//
//	tracewright inspect LOG [--json] [reading flags]
//	tracewright columns LOG [--json] [reading flags]   the proposed column roles of a CSV file
//	tracewright convert LOG --to xes|csv [--out FILE] [--force] [reading flags]
//	tracewright dfg LOG [--activities SHARE] [--edges SHARE]   the directly-follows graph as JSON
//	tracewright discover LOG [--method im|imd|alpha] [--noise F] [--variants F] [--out NET.pnml] [--dot NET.dot]
//	tracewright predict LOG [--json] [--abstraction A] [--horizon K] [--outcome RULE] [--kfold K]
//	tracewright version
//
// Reading flags: --case, --activity, --time, --start, --resource, --lifecycle name CSV columns
// (by header or as #N); --time-format LAYOUT; --separator C; --header yes|no|auto;
// --skip-bad-rows sets aside rows that cannot be read and reports them; --classifier NAME picks
// an XES classifier.
//
// Exit codes: 0 done; 1 the log could not be read (the message gives line and column);
// 2 the command line is wrong; 3 a file could not be opened or written.
package main

import (
	"context"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"os/signal"
	"strings"

	"tracewright/core/engine"
	"tracewright/core/eventlog"
	"tracewright/core/export"
	"tracewright/core/intake"
	"tracewright/core/overview"
)

// Exit codes.
const (
	exitOK    = 0
	exitData  = 1
	exitUsage = 2
	exitIO    = 3
)

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	code := run(ctx, os.Args[1:], os.Stdout, os.Stderr)
	stop()
	os.Exit(code)
}

type usageError struct{ msg string }

func (e *usageError) Error() string { return e.msg }

type ioError struct{ err error }

func (e *ioError) Error() string { return e.err.Error() }
func (e *ioError) Unwrap() error { return e.err }

const usage = `usage:
  tracewright inspect LOG [--json] [reading flags]
  tracewright columns LOG [--json] [reading flags]
  tracewright convert LOG --to xes|csv [--out FILE] [--force] [reading flags]
  tracewright dfg LOG [--activities SHARE] [--edges SHARE] [reading flags]
  tracewright discover LOG [--method im|imd|alpha] [--noise F] [--variants F] [--out NET.pnml] [--dot NET.dot] [--bpmn MODEL.bpmn] [--json]
  tracewright predict LOG [--json] [--abstraction sequence|multiset|set] [--horizon K] [--outcome RULE] [--end A,B] [--kfold K]
  tracewright conform LOG --model NET.pnml [--json] [--max-states N] [--max-seconds S] [--log-cost A=N] [--model-cost A=N] [--include-running] [--cases fitting|deviating --out FILE.csv]
  tracewright version

reading flags:
  --case COL --activity COL --time COL --start COL --resource COL --lifecycle COL
  --time-format LAYOUT   e.g. "YYYY-MM-DD hh:mm[:ss]", "D.M.YYYY h:mm", "epoch-ms"
  --separator C          , ; tab |
  --header yes|no|auto
  --skip-bad-rows        set unreadable rows aside and report them instead of stopping
  --classifier NAME      XES classifier that names activities
`

func run(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	if len(args) == 0 {
		fmt.Fprint(stderr, usage)
		return exitUsage
	}
	var err error
	switch args[0] {
	case "inspect":
		err = inspect(ctx, args[1:], stdout)
	case "columns":
		err = columns(args[1:], stdout)
	case "convert":
		err = convert(ctx, args[1:], stdout)
	case "dfg":
		err = dfgCommand(ctx, args[1:], stdout)
	case "discover":
		err = discoverCommand(ctx, args[1:], stdout)
	case "predict":
		err = predictCommand(ctx, args[1:], stdout)
	case "conform":
		err = conformCommand(ctx, args[1:], stdout)
	case "version", "--version":
		fmt.Fprintln(stdout, "tracewright", engine.Version)
	case "help", "-h", "--help":
		fmt.Fprint(stdout, usage)
	default:
		err = &usageError{fmt.Sprintf("unknown command %q", args[0])}
	}
	if err == nil {
		return exitOK
	}
	fmt.Fprintln(stderr, "tracewright:", err)
	var ue *usageError
	var ie *ioError
	switch {
	case errors.As(err, &ue):
		fmt.Fprint(stderr, usage)
		return exitUsage
	case errors.As(err, &ie):
		return exitIO
	}
	return exitData
}

// readFlags are the flags every reading command takes.
type readFlags struct {
	m                                   intake.Mapping
	timeFormat, sep, header, classifier string
	skip                                bool
}

func (r *readFlags) register(fs *flag.FlagSet) {
	fs.StringVar(&r.m.Case, "case", "", "case id column")
	fs.StringVar(&r.m.Activity, "activity", "", "activity column")
	fs.StringVar(&r.m.Time, "time", "", "timestamp column (completion)")
	fs.StringVar(&r.m.Start, "start", "", "start timestamp column")
	fs.StringVar(&r.m.Resource, "resource", "", "resource column")
	fs.StringVar(&r.m.Lifecycle, "lifecycle", "", "lifecycle transition column")
	fs.StringVar(&r.timeFormat, "time-format", "", "timestamp layout")
	fs.StringVar(&r.sep, "separator", "", "field separator")
	fs.StringVar(&r.header, "header", "auto", "first row is a header: yes, no or auto")
	fs.StringVar(&r.classifier, "classifier", "", "XES classifier")
	fs.BoolVar(&r.skip, "skip-bad-rows", false, "set aside unreadable rows")
}

func (r *readFlags) options(size int64) (intake.Options, error) {
	o := intake.Options{Size: size}
	o.CSV.Mapping = r.m
	o.CSV.TimeFormat = r.timeFormat
	var err error
	if o.CSV.Comma, err = intake.SeparatorOf(r.sep); err != nil {
		return o, &usageError{"--separator: " + err.Error()}
	}
	if o.CSV.Header, err = intake.HeaderModeOf(r.header); err != nil {
		return o, &usageError{"--header: " + err.Error()}
	}
	o.XES.Classifier = r.classifier
	if r.skip {
		o.OnError = intake.Skip
	}
	return o, nil
}

// parse parses flags placed before or after the one positional argument (the log).
func parse(fs *flag.FlagSet, args []string) (string, error) {
	fs.SetOutput(io.Discard)
	var pos []string
	for len(args) > 0 {
		if err := fs.Parse(args); err != nil {
			return "", &usageError{err.Error()}
		}
		args = fs.Args()
		if len(args) > 0 {
			pos = append(pos, args[0])
			args = args[1:]
		}
	}
	if len(pos) != 1 {
		return "", &usageError{fmt.Sprintf("%s takes one log file, got %d", fs.Name(), len(pos))}
	}
	return pos[0], nil
}

func load(ctx context.Context, path string, rf *readFlags) (*eventlog.Log, *intake.Report, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, nil, &ioError{err}
	}
	defer f.Close()
	var size int64
	if st, err := f.Stat(); err == nil {
		size = st.Size()
	}
	opt, err := rf.options(size)
	if err != nil {
		return nil, nil, err
	}
	l, rep, err := intake.Read(ctx, f, opt)
	if err != nil {
		return nil, rep, fmt.Errorf("%s: %w", path, err)
	}
	return l, rep, nil
}

// inspectOutput is `inspect --json`: the overview's figures at the top level, and how the file
// was read under "read".
type inspectOutput struct {
	*overview.Overview
	Read *intake.Report `json:"read"`
}

func inspect(ctx context.Context, args []string, stdout io.Writer) error {
	fs := flag.NewFlagSet("inspect", flag.ContinueOnError)
	var rf readFlags
	rf.register(fs)
	asJSON := fs.Bool("json", false, "print JSON")
	path, err := parse(fs, args)
	if err != nil {
		return err
	}
	l, rep, err := load(ctx, path, &rf)
	if err != nil {
		return err
	}
	o := overview.Of(l, overview.Options{})
	if *asJSON {
		if rep.CSV != nil {
			rep.CSV.Preview = nil
		}
		return printJSON(stdout, inspectOutput{o, rep})
	}
	printOverview(stdout, path, o, rep)
	return nil
}

func columns(args []string, stdout io.Writer) error {
	fs := flag.NewFlagSet("columns", flag.ContinueOnError)
	var rf readFlags
	rf.register(fs)
	asJSON := fs.Bool("json", false, "print JSON")
	path, err := parse(fs, args)
	if err != nil {
		return err
	}
	f, err := os.Open(path)
	if err != nil {
		return &ioError{err}
	}
	defer f.Close()
	text, format, _, err := intake.Open(f)
	if err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	if format != intake.FormatCSV {
		return fmt.Errorf("%s: %w: columns are for CSV files; XES names its attributes itself", path, intake.ErrUnsupported)
	}
	head, err := io.ReadAll(io.LimitReader(text, intake.SampleBytes))
	if err != nil {
		return &ioError{err}
	}
	opt, err := rf.options(0)
	if err != nil {
		return err
	}
	sn, err := intake.SniffCSV(head, opt.CSV.Comma, opt.CSV.Header)
	if err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	if *asJSON {
		return printJSON(stdout, sn)
	}
	sep := sn.Comma
	if sep == "\t" {
		sep = "tab"
	}
	fmt.Fprintf(stdout, "separator %q, header %v, %d sampled rows\n", sep, sn.Header, sn.SampleRows)
	for _, g := range sn.Guesses {
		fmt.Fprintf(stdout, "  %-28s %-10s %3.0f%%  %s\n", g.Column, g.Role, g.Confidence*100, g.Why)
	}
	if sn.TimeFormat != "" {
		fmt.Fprintf(stdout, "time format %s", sn.TimeFormat)
		if sn.TimeExample != "" {
			fmt.Fprintf(stdout, " (%q reads as %s)", sn.TimeExample, sn.TimeExampleParsed)
		}
		fmt.Fprintln(stdout)
		if sn.TimeAmbiguous {
			fmt.Fprintf(stdout, "  the sample cannot tell day-first from month-first; the other reading is %s\n", sn.TimeAlternative)
		}
	}
	return nil
}

func convert(ctx context.Context, args []string, stdout io.Writer) error {
	fs := flag.NewFlagSet("convert", flag.ContinueOnError)
	var rf readFlags
	rf.register(fs)
	to := fs.String("to", "", "xes or csv")
	out := fs.String("out", "", "output file (default: standard output)")
	force := fs.Bool("force", false, "replace an existing output file")
	path, err := parse(fs, args)
	if err != nil {
		return err
	}
	var write func(io.Writer, *eventlog.Log) error
	switch strings.ToLower(*to) {
	case "xes":
		write = export.WriteXES
	case "csv":
		write = export.WriteCSV
	default:
		return &usageError{fmt.Sprintf("convert needs --to xes or --to csv (got %q)", *to)}
	}
	if *out != "" {
		if err := checkOutput(path, *out, *force); err != nil {
			return err
		}
	}
	l, rep, err := load(ctx, path, &rf)
	if err != nil {
		return err
	}
	if rep.Problems.Skipped > 0 {
		fmt.Fprintln(os.Stderr, "tracewright:", rep.Problems.Summary())
	}
	if *out == "" {
		return write(stdout, l)
	}
	return writeFile(*out, func(w io.Writer) error { return write(w, l) })
}

// checkOutput refuses to write over the input, and over any existing file without --force.
func checkOutput(in, out string, force bool) error {
	ost, err := os.Stat(out)
	if err != nil {
		return nil
	}
	if ist, err := os.Stat(in); err == nil && os.SameFile(ist, ost) {
		return &usageError{fmt.Sprintf("--out %s is the input file; the input is never changed", out)}
	}
	if !force {
		return &usageError{fmt.Sprintf("--out %s exists; add --force to replace it", out)}
	}
	return nil
}

func printJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(v)
}
