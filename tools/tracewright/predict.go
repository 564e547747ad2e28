package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"strings"

	"tracewright/core/predict"
)

// predictOutput is `predict --json`: the hold-out's error at the top level (mae_days,
// baseline_mae_days, coverage, ...), the settings, and the forecast of every running case.
type predictOutput struct {
	*predict.Evaluation
	Abstraction   predict.Abstraction       `json:"abstraction"`
	Horizon       int                       `json:"horizon"`
	Attribute     string                    `json:"attribute,omitempty"`
	Outcome       string                    `json:"outcome,omitempty"`
	EndActivities []string                  `json:"end_activities"`
	InactiveDays  float64                   `json:"inactive_after_days"`
	Completed     int                       `json:"completed_cases"`
	Abandoned     int                       `json:"abandoned_cases"`
	KFold         *predict.Evaluation       `json:"kfold,omitempty"`
	Choices       []predict.Choice          `json:"choices,omitempty"`
	Running       []predict.RunningForecast `json:"running"`
	Caution       string                    `json:"caution"`
}

const caution = "These are statistical estimates from past cases, not guarantees; the error above says how far off they were on past cases. Do not use them alone to judge people."

func predictCommand(ctx context.Context, args []string, stdout io.Writer) error {
	fs := flag.NewFlagSet("predict", flag.ContinueOnError)
	var rf readFlags
	rf.register(fs)
	abs := fs.String("abstraction", "multiset", "sequence, multiset, set, or auto (the one that predicted past cases best)")
	horizon := fs.Int("horizon", 0, "how many last activities a state looks at (0: all)")
	attr := fs.String("attribute", "auto", "a case attribute that refines the states, auto (the one, if any, that predicted past cases better) or \"\" (none)")
	outcome := fs.String("outcome", "", "ends:ACTIVITY, contains:ACTIVITY or longer:DURATION (e.g. longer:10d)")
	ends := fs.String("end", "", "activities that end a case, comma-separated (default: inferred)")
	inactive := fs.Duration("inactive", 0, "a case silent longer than this is abandoned, not running (default: the longest pause of any completed case)")
	kfold := fs.Int("kfold", 0, "also evaluate by k-fold cross-validation over cases")
	asJSON := fs.Bool("json", false, "print JSON")
	path, perr := parse(fs, args)
	if perr != nil {
		return perr
	}
	cfg, search, err := predict.ParseSettings(*abs, *horizon, *attr)
	if err != nil {
		return &usageError{err.Error()}
	}
	if *horizon < 0 {
		return &usageError{"--horizon is 0 (all) or more"}
	}
	opt := predict.Options{Config: cfg, Inactive: *inactive}
	if *outcome != "" {
		if opt.Outcome, err = predict.ParseOutcome(*outcome); err != nil {
			return &usageError{err.Error()}
		}
	}
	if *ends != "" {
		opt.EndActivities = strings.Split(*ends, ",")
	}
	l, _, err := load(ctx, path, &rf)
	if err != nil {
		return err
	}
	part := predict.Split(l, opt)
	var choices []predict.Choice
	if search.States || search.Attribute {
		if opt.Config, choices, err = predict.Choose(l, part, opt, search); err != nil {
			return err
		}
	}
	ev, err := predict.Evaluate(l, part, opt)
	if err != nil {
		return err
	}
	a, h := opt.Config.Abstraction, opt.Config.Horizon
	out := predictOutput{Evaluation: ev, Abstraction: a, Horizon: h, EndActivities: part.EndActivities,
		Attribute: opt.Config.Attribute, InactiveDays: part.Inactive.Hours() / 24, Completed: len(part.Completed), Abandoned: len(part.Abandoned), Caution: caution, Choices: choices}
	if opt.Outcome != nil {
		out.Outcome = opt.Outcome.String()
	}
	if *kfold > 0 {
		if out.KFold, err = predict.KFold(l, part, opt, *kfold); err != nil {
			return err
		}
	}
	if _, out.Running, err = predict.ForecastRunning(l, part, opt); err != nil {
		return err
	}
	if out.Running == nil {
		out.Running = []predict.RunningForecast{}
	}
	if *asJSON {
		return printJSON(stdout, out)
	}
	apart := ""
	if opt.Config.Attribute != "" {
		apart = ", cases told apart by " + opt.Config.Attribute
	}
	fmt.Fprintf(stdout, "states: %s over %s%s; %d completed, %d running, %d abandoned cases\n", a, horizonText(h), apart, len(part.Completed), len(part.Running), len(part.Abandoned))
	fmt.Fprintf(stdout, "error on past cases (cut dates %s; tested on %d prefixes of %d cases open then):\n", strings.Join(ev.Cuts, ", "), ev.TestPrefixes, ev.TestCases)
	fmt.Fprintf(stdout, "  remaining time: %.2f days off on average (%.2fx the mean by number of events, %.2f days; 95%% range of the ratio %.2f-%.2f)\n", ev.MAEDays, ev.Ratio, ev.BaselineDays, ev.RatioRange[0], ev.RatioRange[1])
	fmt.Fprintf(stdout, "  the %.0f%% interval held the truth for %.1f%% of prefixes (95%% range %.1f-%.1f%%); next activity right %.1f%%\n", ev.Level*100, ev.Coverage*100, ev.CoverageRange[0]*100, ev.CoverageRange[1]*100, ev.NextAccuracy*100)
	if opt.Outcome != nil {
		fmt.Fprintf(stdout, "  %s: Brier %.3f, AUC %.3f\n", opt.Outcome, ev.Brier, ev.AUC)
	}
	if out.KFold != nil {
		fmt.Fprintf(stdout, "  %d-fold: %.2f days (%.2fx), interval held %.1f%%\n", *kfold, out.KFold.MAEDays, out.KFold.Ratio, out.KFold.Coverage*100)
	}
	fmt.Fprintln(stdout, "running cases, soonest expected finish first:")
	for i, r := range out.Running {
		if i == 20 {
			fmt.Fprintf(stdout, "  and %d more (--json lists all)\n", len(out.Running)-20)
			break
		}
		fmt.Fprintf(stdout, "  %-14s after %-20s finish %s (between %s and %s)\n", r.Case, r.Last, r.Finish[:10], r.FinishLow[:10], r.FinishHi[:10])
	}
	fmt.Fprintln(stdout, caution)
	return nil
}

func horizonText(h int) string {
	if h == 0 {
		return "the whole prefix"
	}
	return fmt.Sprintf("the last %d activities", h)
}
