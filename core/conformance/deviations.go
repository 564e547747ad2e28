package conformance

import (
	"slices"
	"strings"
)

// ActivityDeviation counts, for one activity, over cases: how often it was done as the model
// allows (synchronous moves), done where the model does not allow it (log moves), and required
// by the model but skipped (model moves).
type ActivityDeviation struct {
	Activity string `json:"activity"`
	Sync     int    `json:"sync"`
	LogMoves int    `json:"log_moves"`
	Skipped  int    `json:"model_moves"`
}

// Pattern is one kind of deviation ("log:X" done but not allowed, "model:X" required but
// skipped) with the cases that show it.
type Pattern struct {
	Kind     string `json:"kind"` // "log" or "model"
	Activity string `json:"activity"`
	Cases    int    `json:"cases"`
	Variants []int  `json:"variants"` // indices into Result.Variants
}

// Deviations tallies the aligned variants: per activity, and the deviation patterns most
// frequent first (a case counts once per pattern).
func Deviations(r *Result) ([]ActivityDeviation, []Pattern) {
	acts := map[string]*ActivityDeviation{}
	get := func(a string) *ActivityDeviation {
		d := acts[a]
		if d == nil {
			d = &ActivityDeviation{Activity: a}
			acts[a] = d
		}
		return d
	}
	pats := map[string]*Pattern{}
	for vi, v := range r.Variants {
		if !v.Aligned {
			continue
		}
		seen := map[string]bool{}
		for _, m := range v.Moves {
			if m.Silent {
				continue
			}
			d := get(m.Activity)
			switch m.Kind {
			case "sync":
				d.Sync += v.Cases
				continue
			case "log":
				d.LogMoves += v.Cases
			case "model":
				d.Skipped += v.Cases
			}
			k := m.Kind + "\x00" + m.Activity
			if seen[k] {
				continue
			}
			seen[k] = true
			p := pats[k]
			if p == nil {
				p = &Pattern{Kind: m.Kind, Activity: m.Activity}
				pats[k] = p
			}
			p.Cases += v.Cases
			p.Variants = append(p.Variants, vi)
		}
	}
	var out []ActivityDeviation
	for _, d := range acts {
		out = append(out, *d)
	}
	slices.SortFunc(out, func(a, b ActivityDeviation) int {
		if x, y := a.LogMoves+a.Skipped, b.LogMoves+b.Skipped; x != y {
			return y - x
		}
		return strings.Compare(a.Activity, b.Activity)
	})
	var ps []Pattern
	for _, p := range pats {
		ps = append(ps, *p)
	}
	slices.SortFunc(ps, func(a, b Pattern) int {
		if a.Cases != b.Cases {
			return b.Cases - a.Cases
		}
		return strings.Compare(a.Kind+a.Activity, b.Kind+b.Activity)
	})
	return out, ps
}
