// Command loggen writes synthetic event logs of the invented e-bike warranty workshop (package
// core/synth) with a ground-truth file, for tests, benchmarks and demos.
//
//	loggen --events 100000 --seed 1 --noise 0.05 --start-times --shifts \
//	       --csv log.csv --xes log.xes.gz --truth log.truth.json [--order time|case|random] [--detail]
//
// A name ending in .gz is written gzip-compressed. At least one of --csv and --xes is needed.
package main

import (
	"compress/gzip"
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"os"
	"strings"

	"tracewright/core/synth"
)

func main() {
	if err := run(os.Args[1:]); err != nil {
		fmt.Fprintln(os.Stderr, "loggen:", err)
		os.Exit(1)
	}
}

func run(args []string) error {
	fs := flag.NewFlagSet("loggen", flag.ContinueOnError)
	events := fs.Int("events", 10000, "events to make (100 to 10,000,000; the export cut-off trims a few)")
	seed := fs.Uint64("seed", 1, "random seed")
	noise := fs.Float64("noise", 0.05, "share of cases with a missing, swapped or extra event")
	start := fs.Bool("start-times", false, "record start as well as completion times")
	shifts := fs.Bool("shifts", true, "work waits for the resource's shift")
	perDay := fs.Float64("cases-per-day", 0, "arrival rate (0: spread over about a year)")
	order := fs.String("order", "time", "row order: time, case or random")
	csvPath := fs.String("csv", "", "write the log as CSV here")
	xesPath := fs.String("xes", "", "write the log as XES here")
	truthPath := fs.String("truth", "", "write the ground truth as JSON here")
	detail := fs.Bool("detail", false, "list every case in the ground truth")
	if err := fs.Parse(args); err != nil {
		return err
	}
	if *csvPath == "" && *xesPath == "" {
		return fmt.Errorf("give --csv FILE or --xes FILE")
	}
	if *events < 1 || *events > 20_000_000 {
		return fmt.Errorf("--events must be between 1 and 20,000,000")
	}
	if *noise < 0 || *noise > 1 {
		return fmt.Errorf("--noise is a share between 0 and 1")
	}
	ro := synth.RowOrder(*order)
	if ro != synth.ByTime && ro != synth.ByCase && ro != synth.Shuffled {
		return fmt.Errorf("--order takes time, case or random")
	}
	lg := synth.Generate(synth.Config{Seed: *seed, Events: *events, Noise: *noise, StartTimes: *start, Shifts: *shifts, CasesPerDay: *perDay})
	if *csvPath != "" {
		if err := write(*csvPath, func(w io.Writer) error { return lg.WriteCSV(w, ro) }); err != nil {
			return err
		}
	}
	if *xesPath != "" {
		if err := write(*xesPath, lg.WriteXES); err != nil {
			return err
		}
	}
	if *truthPath != "" {
		t := lg.Truth(*detail)
		if err := write(*truthPath, func(w io.Writer) error {
			enc := json.NewEncoder(w)
			enc.SetIndent("", "  ")
			return enc.Encode(t)
		}); err != nil {
			return err
		}
	}
	t := lg.Truth(false)
	fmt.Fprintf(os.Stderr, "loggen: %d cases, %d events, %d variants, %d running, %d with noise\n", t.Cases, t.Events, t.Variants, t.RunningCases, t.NoisyCases)
	return nil
}

func write(path string, body func(io.Writer) error) error {
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	var w io.Writer = f
	var zw *gzip.Writer
	if strings.HasSuffix(path, ".gz") {
		zw, _ = gzip.NewWriterLevel(f, gzip.BestSpeed)
		w = zw
	}
	if err := body(w); err != nil {
		f.Close()
		return err
	}
	if zw != nil {
		if err := zw.Close(); err != nil {
			f.Close()
			return err
		}
	}
	return f.Close()
}
