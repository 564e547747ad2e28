package predict

import "tracewright/core/eventlog"

// Choice is one candidate state definition and its measured error.
type Choice struct {
	Config  Config  `json:"config"`
	MAEDays float64 `json:"mae_days"`
}

// chooseCases is how many completed cases Choose measures on at most. On a generated log of 1M
// events (about 100,000 cases) measuring on all of them took 28 s natively, on an even sample of
// 20,000 1.9 s; the sample chose multiset states over the last 3 activities, whose error on all
// cases is 0.03% above that of the best (sequence over the last 3), chosen on all.
const chooseCases = 20_000

// maxLevels is the most distinct values a case attribute may have to be tried as a refinement.
// Each value splits every state; with more, the states of a typical log hold too few past cases
// for a median, and an identifier-like attribute (an order number) would only be measured to lose.
const maxLevels = 20

// chooseFolds is the number of folds of Choose's cross-validation: each candidate costs as many
// models.
const chooseFolds = 3

// Search says what Choose varies; what it does not vary is taken from the options.
type Search struct {
	States    bool `json:"states"`    // the abstraction and the horizon (whole prefix, last 1, 2 or 3 activities)
	Attribute bool `json:"attribute"` // the case attribute that refines the states, or none
}

// ParseSettings reads the state settings as the page and the command line give them: an
// abstraction's name or "auto", the horizon, and a case attribute's name, "" for none or "auto".
// What is "auto" is left to Choose: the returned Config has the zero value there.
func ParseSettings(abstraction string, horizon int, attribute string) (Config, Search, error) {
	s := Search{States: abstraction == "auto", Attribute: attribute == "auto"}
	cfg := Config{Horizon: horizon, Attribute: attribute}
	if s.Attribute {
		cfg.Attribute = ""
	}
	if !s.States {
		a, err := ParseAbstraction(abstraction)
		if err != nil {
			return cfg, s, err
		}
		cfg.Abstraction = a
	}
	return cfg, s, nil
}

// Models is how many models Choose fits on l for the search: what a progress bar counts.
func (s Search) Models(l *eventlog.Log) int {
	n := 0
	if s.States {
		n += 12 * chooseFolds
	}
	if s.Attribute {
		if !s.States {
			n += chooseFolds // the states as given, without an attribute
		}
		n += len(AttributeCandidates(l)) * chooseFolds
	}
	return n
}

// AttributeCandidates lists the case attributes Choose tries as refinements: those with 2 to
// maxLevels distinct values (as written), in the log's order.
func AttributeCandidates(l *eventlog.Log) []string {
	var out []string
	for _, c := range l.CaseAttrs {
		if n := c.Dict.Len(); n >= 2 && n <= maxLevels {
			out = append(out, c.Key)
		}
	}
	return out
}

// Choose measures candidate state definitions by 3-fold cross-validation over the completed cases
// (an even sample of chooseCases of them when there are more) and returns the one with the
// smallest mean absolute error of the remaining time, with the table of all measured.
//
// With s.States it measures every abstraction over the whole prefix and the last 1, 2 and 3
// activities, keeping the attribute of opt unless s.Attribute. With s.Attribute it then measures
// the best states (or those of opt) without an attribute and refined by each of
// AttributeCandidates, so the two searches cost 12 + 1 + candidates fits of 3 folds, not their
// product. An attribute is kept only when it lowered the error: where the time left does not
// depend on it, refining only thins the states.
//
// The choice sees the completed cases, so a temporal hold-out measured afterwards is a little
// optimistic; k-fold figures are not.
func Choose(l *eventlog.Log, part Partition, opt Options, s Search) (Config, []Choice, error) {
	part = part.Sample(chooseCases)
	var table []Choice
	best := -1
	try := func(cfg Config) error {
		o := opt
		o.Config = cfg
		ev, err := kfold(l, part, o, chooseFolds)
		if err != nil {
			return err
		}
		table = append(table, Choice{Config: cfg, MAEDays: ev.MAEDays})
		if best < 0 || ev.MAEDays < table[best].MAEDays {
			best = len(table) - 1
		}
		return nil
	}
	attr := opt.Config.Attribute
	if s.Attribute {
		attr = ""
	}
	if s.States {
		for _, a := range []Abstraction{Sequence, Multiset, Set} {
			for _, h := range []int{0, 1, 2, 3} {
				if err := try(Config{Abstraction: a, Horizon: h, Attribute: attr}); err != nil {
					return opt.Config, nil, err
				}
			}
		}
	} else if err := try(Config{Abstraction: opt.Config.Abstraction, Horizon: opt.Config.Horizon, Attribute: attr}); err != nil {
		return opt.Config, nil, err
	}
	if s.Attribute {
		states := table[best].Config
		for _, key := range AttributeCandidates(l) {
			states.Attribute = key
			if err := try(states); err != nil {
				return opt.Config, nil, err
			}
		}
	}
	return table[best].Config, table, nil
}

// Sample returns the partition with its completed cases thinned to an even sample of at most n
// (every k-th in log order, so the sample spans the whole period); the running and abandoned
// cases are kept.
func (p Partition) Sample(n int) Partition {
	m := len(p.Completed)
	if m <= n {
		return p
	}
	sample := make([]int, 0, n)
	for i := range n {
		sample = append(sample, p.Completed[i*m/n])
	}
	p.Completed = sample
	return p
}
