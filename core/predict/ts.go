package predict

import (
	"encoding/binary"
	"fmt"
	"slices"
	"strings"

	"tracewright/core/eventlog"
	"tracewright/core/summary"
)

// Abstraction maps a prefix to a state.
type Abstraction uint8

// The three abstractions of the paper.
const (
	Sequence Abstraction = iota
	Multiset
	Set
)

// ParseAbstraction reads "sequence", "multiset" or "set".
func ParseAbstraction(s string) (Abstraction, error) {
	switch strings.ToLower(s) {
	case "sequence", "seq", "":
		return Sequence, nil
	case "multiset", "bag":
		return Multiset, nil
	case "set":
		return Set, nil
	}
	return 0, fmt.Errorf("abstraction %q is not sequence, multiset or set", s)
}

func (a Abstraction) String() string { return [...]string{"sequence", "multiset", "set"}[a] }

// MarshalText writes the abstraction's name.
func (a Abstraction) MarshalText() ([]byte, error) { return []byte(a.String()), nil }

// Config chooses the states.
type Config struct {
	Abstraction Abstraction `json:"abstraction"`
	// Horizon is k, the number of last activity instances a state looks at; 0 is the whole prefix.
	Horizon int `json:"horizon"`
	// Attribute, when set, names a case attribute whose value becomes part of every state.
	Attribute string `json:"attribute,omitempty"`
}

// appendKey appends the key of a prefix (the state of activities acts of a case whose attribute
// value is attr) to dst. Lookups index their map with string(dst), which
// does not allocate, so only a new state's key becomes a string.
func (c Config) appendKey(dst []byte, acts []int32, attr string, horizon int) []byte {
	if horizon > 0 && len(acts) > horizon {
		acts = acts[len(acts)-horizon:]
	}
	dst = append(dst, attr...)
	dst = append(dst, 0)
	if c.Abstraction != Sequence {
		var sorted [64]int32
		s := append(sorted[:0], acts...)
		slices.Sort(s)
		if c.Abstraction == Set {
			s = slices.Compact(s)
		}
		acts = s
	}
	for _, a := range acts {
		dst = binary.LittleEndian.AppendUint32(dst, uint32(a))
	}
	return dst
}

// State holds the annotations of one state.
type State struct {
	// Remaining, Elapsed and Sojourn hold one value per prefix, in seconds and in no particular
	// order: Build reads the quantiles it needs by selection, not by sorting, which made up most
	// of its time. The states of the shorter horizons kept for fallbacks (System) hold Remaining
	// only, with the sojourn's sum: they hold every prefix again and are read only for a
	// forecast's median, spread and mean sojourn.
	Remaining  []float64
	Elapsed    []float64
	Sojourn    []float64 // time to the next activity (absent at the end of a case)
	sojournSum float64
	sojournN   int
	Next       map[int32]int
	Ends       int // prefixes that were whole cases
	Outcome    int // prefixes whose case met the outcome rule
	// summaries computed once by Build, so a prediction costs a lookup
	median, meanRemaining, meanSojourn float64
	spread                             float64 // interquartile range of Remaining
	likeliest                          int32   // the most frequent next activity, -1 for the end
}

// System is an annotated transition system. Besides the states of the configured horizon it
// keeps those of shorter horizons (the last 3, 2 and 1 instances, below the configured k) for
// the fallback of unseen states.
type System struct {
	Config  Config
	States  map[string]*State
	levels  []level // the configured horizon first, then shorter ones
	log     *eventlog.Log
	attr    *eventlog.Column
	outcome Outcome
}

type level struct {
	horizon int // 0: the whole prefix
	states  map[string]*State
}

// caseTimes returns a case's instance activities and completion times (NoTime dropped).
func caseTimes(l *eventlog.Log, c int) ([]int32, []int64) {
	lo, hi := int(l.InstStart[c]), int(l.InstStart[c+1])
	acts := make([]int32, 0, hi-lo)
	times := make([]int64, 0, hi-lo)
	for i := lo; i < hi; i++ {
		_, last := l.InstanceEvents(i)
		if t := l.Time[last]; t != eventlog.NoTime {
			acts = append(acts, l.InstAct[i])
			times = append(times, t)
		}
	}
	return acts, times
}

func (s *System) attrOf(c int) string {
	if s.attr == nil {
		return ""
	}
	v, _ := s.attr.Text(c)
	return v
}

// Build annotates the states of the given (completed) cases. Cost: O(Σ n_c · k) for cases of
// n_c instances with horizon k (O(Σ n_c²) for the whole prefix), memory one sample per prefix.
func Build(l *eventlog.Log, cases []int, cfg Config, outcome Outcome) (*System, error) {
	s := &System{Config: cfg, States: map[string]*State{}, log: l, outcome: outcome}
	if cfg.Attribute != "" {
		if s.attr = l.CaseAttr(cfg.Attribute); s.attr == nil {
			return nil, fmt.Errorf("predict: the log has no case attribute %q", cfg.Attribute)
		}
	}
	s.levels = append(s.levels, level{cfg.Horizon, s.States})
	top := 3
	if cfg.Horizon > 0 {
		top = cfg.Horizon - 1
	}
	for h := min(top, 3); h >= 1; h-- {
		s.levels = append(s.levels, level{h, map[string]*State{}})
	}
	s.levels = append(s.levels, level{-1, map[string]*State{}}) // the empty prefix: any case
	var buf []byte
	for _, c := range cases {
		acts, times := caseTimes(l, c)
		if len(acts) == 0 {
			continue
		}
		met := outcome != nil && outcome.Met(l, acts, times)
		attr := s.attrOf(c)
		start, end := times[0], times[len(times)-1]
		for i := 1; i <= len(acts); i++ {
			t := times[i-1]
			for li, lv := range s.levels {
				if lv.horizon < 0 {
					buf = cfg.appendKey(buf[:0], nil, attr, 0)
				} else {
					buf = cfg.appendKey(buf[:0], acts[:i], attr, lv.horizon)
				}
				st := lv.states[string(buf)]
				if st == nil {
					st = &State{Next: map[int32]int{}}
					lv.states[string(buf)] = st
				}
				st.Remaining = append(st.Remaining, float64(end-t)/1e6)
				if li == 0 {
					st.Elapsed = append(st.Elapsed, float64(t-start)/1e6)
				}
				if i < len(acts) {
					so := float64(times[i]-t) / 1e6
					if li == 0 {
						st.Sojourn = append(st.Sojourn, so)
					}
					st.sojournSum += so
					st.sojournN++
					st.Next[acts[i]]++
				} else {
					st.Ends++
				}
				if met {
					st.Outcome++
				}
			}
		}
	}
	for _, lv := range s.levels {
		for _, st := range lv.states {
			q := summary.QuantilesInPlace(st.Remaining, 0.25, 0.5, 0.75)
			st.median, st.spread = q[1], q[2]-q[0]
			st.meanRemaining = mean(st.Remaining)
			if st.sojournN > 0 {
				st.meanSojourn = st.sojournSum / float64(st.sojournN)
			}
			// the likeliest next step, the end winning ties and names breaking the others
			st.likeliest = -1
			best := st.Ends
			for a, n := range st.Next {
				if n > best || (n == best && st.likeliest >= 0 && l.Activities.Name(a) < l.Activities.Name(st.likeliest)) {
					st.likeliest, best = a, n
				}
			}
		}
	}
	return s, nil
}

// Prediction is the forecast for one prefix.
type Prediction struct {
	MedianSeconds float64            `json:"median_seconds"`
	MeanSeconds   float64            `json:"mean_seconds"`
	SojournMean   float64            `json:"sojourn_mean_seconds"`
	Next          map[string]float64 `json:"next"`
	End           float64            `json:"end_probability"`
	Outcome       float64            `json:"outcome_probability"`
	Support       int                `json:"support"`        // past prefixes behind the forecast
	Horizon       int                `json:"horizon"`        // the horizon used (less than asked after a fallback)
	Fallback      bool               `json:"fallback"`       // the full state was never seen
	Unknown       bool               `json:"unknown"`        // no state at any horizon: nothing to say
	Spread        float64            `json:"spread_seconds"` // interquartile range of the state's remaining times
}

// Predict forecasts the prefix acts of a case with attribute value attr.
func (s *System) Predict(acts []int32, attr string) Prediction {
	st, li := s.state(acts, attr)
	if st == nil {
		return Prediction{Unknown: true, Next: map[string]float64{}}
	}
	p := Prediction{Horizon: s.levels[li].horizon, Fallback: li > 0, Support: len(st.Remaining), Next: map[string]float64{}}
	p.MedianSeconds, p.MeanSeconds, p.SojournMean, p.Spread = st.median, st.meanRemaining, st.meanSojourn, st.spread
	n := float64(len(st.Remaining))
	for a, c := range st.Next {
		p.Next[s.log.Activities.Name(a)] = float64(c) / n
	}
	p.End = float64(st.Ends) / n
	p.Outcome = float64(st.Outcome) / n
	return p
}

// state finds the state that forecasts a prefix and the index of its level: the configured
// horizon, or the first shorter one that knows the prefix. It is Predict without building the
// Prediction, for the evaluations, which ask for every prefix of many cases.
func (s *System) state(acts []int32, attr string) (*State, int) {
	var arr [256]byte
	for li, lv := range s.levels {
		var k []byte
		switch {
		case lv.horizon < 0:
			k = s.Config.appendKey(arr[:0], nil, attr, 0)
		case lv.horizon > 0 && lv.horizon > len(acts) && li > 0:
			continue // a shorter horizon than the prefix adds nothing here
		default:
			k = s.Config.appendKey(arr[:0], acts, attr, lv.horizon)
		}
		if st := lv.states[string(k)]; st != nil && len(st.Remaining) > 0 {
			return st, li
		}
	}
	return nil, -1
}

func mean(xs []float64) float64 {
	if len(xs) == 0 {
		return 0
	}
	s := 0.0
	for _, x := range xs {
		s += x
	}
	return s / float64(len(xs))
}
