package intake

import (
	"cmp"
	"errors"
	"slices"
	"strconv"
	"strings"

	"tracewright/core/timestamp"
)

// Role is what a CSV column means to the log.
type Role string

// The roles a column can take. A row's event is the activity of the case at the time; a start
// column makes each row one activity instance of two events (start and complete).
const (
	RoleCase      Role = "case"
	RoleActivity  Role = "activity"
	RoleTime      Role = "time"
	RoleStart     Role = "start"
	RoleResource  Role = "resource"
	RoleLifecycle Role = "lifecycle"
	RoleAttribute Role = "attribute"
	RoleIgnore    Role = "ignore"
)

// Mapping names the column of each role. Columns not named are kept as attributes, except those
// in Ignore. A column is named by its header or by its 1-based number ("#3").
type Mapping struct {
	Case      string   `json:"case"`
	Activity  string   `json:"activity"`
	Time      string   `json:"time"`
	Start     string   `json:"start,omitempty"`
	Resource  string   `json:"resource,omitempty"`
	Lifecycle string   `json:"lifecycle,omitempty"`
	Ignore    []string `json:"ignore,omitempty"`
}

// ColumnGuess is the role proposed for one column and how sure the guess is, from 0 (a guess
// by elimination) to 1 (the name and the values both fit).
type ColumnGuess struct {
	Column     string  `json:"column"`
	Role       Role    `json:"role"`
	Confidence float64 `json:"confidence"`
	Why        string  `json:"why"`
}

// Header words that suggest a role, compared after lower-casing and dropping spaces, '_', '-',
// ':' and '.'. Besides English they hold the usual words of German, Dutch, French, Spanish and
// Italian exports (our own lists, common practice of such exports).
var roleWords = map[Role][]string{
	RoleCase: {"case", "caseid", "casenumber", "caseno", "caseconceptname", "trace", "traceid", "instance",
		"processinstance", "ticket", "order", "orderid", "claim", "claimid", "id", "fall", "fallid",
		"vorgang", "vorgangsnummer", "zaak", "zaakid", "dossier", "cas", "caso", "expediente", "pratica"},
	RoleActivity: {"activity", "activityname", "event", "eventname", "action", "task", "step", "operation",
		"status", "conceptname", "aktivität", "aktivitat", "tätigkeit", "activiteit", "actividad", "activité",
		"activite", "étape", "etape", "attività", "attivita", "evento"},
	RoleTime: {"timestamp", "time", "datetime", "date", "completetime", "endtime", "end", "complete", "completed", "completion",
		"finished", "finish", "timetimestamp", "zeitstempel", "zeit", "datum", "tijd", "tijdstip",
		"fecha", "horodatage", "dateheure", "data", "ora", "ende", "eind", "fin"},
	RoleStart: {"start", "starttime", "started", "begin", "begintime", "starttimestamp", "beginn",
		"startzeit", "inicio", "début", "debut"},
	RoleResource: {"resource", "orgresource", "user", "username", "employee", "agent", "performer",
		"staff", "worker", "owner", "handler", "executor", "technician", "bearbeiter", "mitarbeiter",
		"ressource", "medewerker", "gebruiker", "usuario", "recurso", "utilisateur", "risorsa", "utente"},
	RoleLifecycle: {"lifecycle", "lifecycletransition", "transition", "eventtype", "lifecyclestate"},
}

var lifecycleValues = []string{"schedule", "assign", "reassign", "start", "suspend", "resume",
	"autoskip", "manualskip", "complete", "withdraw", "ate_abort", "pi_abort"}

func normalize(h string) string {
	var b strings.Builder
	for _, r := range strings.ToLower(h) {
		switch r {
		case ' ', '_', '-', ':', '.', '\t':
			continue
		}
		b.WriteRune(r)
	}
	return b.String()
}

// nameScore is 1 when the header is one of the role's words, 0.7 when it contains one of at
// least four letters (a "Case ID" or "end_timestamp"), else 0.
func nameScore(h string, role Role) float64 {
	n := normalize(h)
	best := 0.0
	for _, w := range roleWords[role] {
		if n == w {
			return 1
		}
		if len(w) >= 4 && strings.Contains(n, w) {
			best = 0.7
		}
	}
	return best
}

type columnStats struct {
	n, distinct   int
	timeShare     float64
	numberShare   float64
	lifecycleOnly bool
}

func statsOf(vals []string) columnStats {
	st := columnStats{n: len(vals)}
	if len(vals) == 0 {
		return st
	}
	seen := map[string]bool{}
	nums := 0
	life := true
	for _, v := range vals {
		seen[v] = true
		if _, err := strconv.ParseFloat(strings.TrimSpace(v), 64); err == nil {
			nums++
		}
		if !slices.Contains(lifecycleValues, strings.ToLower(strings.TrimSpace(v))) {
			life = false
		}
	}
	st.distinct = len(seen)
	st.numberShare = float64(nums) / float64(len(vals))
	st.lifecycleOnly = life
	inf := timestamp.InferShare(vals, 0.5)
	if inf.Format != nil {
		st.timeShare = float64(inf.Parsed) / float64(max(1, inf.Total))
	}
	return st
}

// guessRoles proposes a role for every column. Each (role, column) pair gets a score from the
// header's words and from the values (a case id repeats but not too often, an activity has few
// distinct text values, a time column parses as timestamps); then pairs are taken best first,
// one column per role. The scores are ours, tuned on the demo logs and on common export shapes.
func guessRoles(cols []string, rows [][]string) ([]ColumnGuess, Mapping) {
	st := make([]columnStats, len(cols))
	for j := range cols {
		st[j] = statsOf(columnValues(rows, j))
	}
	type cand struct {
		role  Role
		col   int
		score float64
		why   string
	}
	var cands []cand
	for j, h := range cols {
		s := st[j]
		if s.n == 0 {
			continue
		}
		ratio := float64(s.distinct) / float64(s.n)
		// A column is taken for times when nearly all its values read as times, or when most do
		// and its header says so (the rest are reported row by row when the file is read).
		isTime := s.timeShare >= 0.95 || (s.timeShare >= 0.5 && nameScore(h, RoleTime)+nameScore(h, RoleStart) > 0)
		if isTime {
			cands = append(cands, cand{RoleTime, j, 0.6 + 0.4*nameScore(h, RoleTime) - 0.3*nameScore(h, RoleStart), "values are timestamps"})
			if ns := nameScore(h, RoleStart); ns > 0 {
				cands = append(cands, cand{RoleStart, j, 0.6 + 0.4*ns, "timestamps under a start header"})
			}
			continue
		}
		repeats := s.distinct < s.n
		content := 0.0
		if repeats && ratio <= 0.8 {
			content = 0.4
		} else if ratio <= 0.95 {
			content = 0.2
		}
		cands = append(cands, cand{RoleCase, j, 0.6*nameScore(h, RoleCase) + content, "values repeat as case ids do"})
		if s.numberShare < 0.5 {
			act := 0.0
			if s.distinct <= 200 && ratio <= 0.5 {
				act = 0.4
			} else if s.distinct <= 1000 && ratio <= 0.8 {
				act = 0.3
			}
			cands = append(cands, cand{RoleActivity, j, 0.6*nameScore(h, RoleActivity) + act, "few distinct names"})
			res := 0.0
			if ratio <= 0.5 {
				res = 0.15
			}
			cands = append(cands, cand{RoleResource, j, 0.6*nameScore(h, RoleResource) + res, "names of people or units"})
		}
		if s.lifecycleOnly {
			cands = append(cands, cand{RoleLifecycle, j, 0.5 + 0.5*nameScore(h, RoleLifecycle), "values are lifecycle transitions"})
		}
	}
	slices.SortStableFunc(cands, func(a, b cand) int {
		return cmp.Or(cmp.Compare(b.score, a.score), a.col-b.col)
	})
	guesses := make([]ColumnGuess, len(cols))
	for j, h := range cols {
		guesses[j] = ColumnGuess{Column: h, Role: RoleAttribute, Confidence: 0.5, Why: "kept as an attribute"}
	}
	taken := map[Role]bool{}
	// Two passes: a start column only makes sense beside a time column, so the time role is
	// settled first.
	for pass := 0; pass < 2; pass++ {
		for _, c := range cands {
			if c.score < 0.3 || taken[c.role] || guesses[c.col].Role != RoleAttribute || (c.role == RoleStart) != (pass == 1) {
				continue
			}
			if c.role == RoleStart && !taken[RoleTime] {
				continue
			}
			taken[c.role] = true
			guesses[c.col] = ColumnGuess{Column: cols[c.col], Role: c.role, Confidence: round2(min(c.score, 1)), Why: c.why}
		}
	}
	// Two timestamp columns and no start by name: the one that is never later than the other on
	// the sampled rows is the start.
	if taken[RoleTime] && !taken[RoleStart] {
		tc := -1
		for j, g := range guesses {
			if g.Role == RoleTime {
				tc = j
			}
		}
		for j := range cols {
			if j == tc || guesses[j].Role != RoleAttribute || st[j].timeShare < 0.95 {
				continue
			}
			if earlier(rows, j, tc) {
				guesses[j] = ColumnGuess{Column: cols[j], Role: RoleStart, Confidence: 0.5, Why: "timestamps never after the time column"}
				break
			}
			if earlier(rows, tc, j) {
				guesses[tc] = ColumnGuess{Column: cols[tc], Role: RoleStart, Confidence: 0.5, Why: "timestamps never after the other time column"}
				guesses[j] = ColumnGuess{Column: cols[j], Role: RoleTime, Confidence: 0.5, Why: "the later of two timestamp columns"}
				break
			}
		}
	}
	var m Mapping
	for _, g := range guesses {
		switch g.Role {
		case RoleCase:
			m.Case = g.Column
		case RoleActivity:
			m.Activity = g.Column
		case RoleTime:
			m.Time = g.Column
		case RoleStart:
			m.Start = g.Column
		case RoleResource:
			m.Resource = g.Column
		case RoleLifecycle:
			m.Lifecycle = g.Column
		}
	}
	return guesses, m
}

// earlier reports whether column a is at most column b on every sampled row where both read.
func earlier(rows [][]string, a, b int) bool {
	va, vb := columnValues(rows, a), columnValues(rows, b)
	fa, fb := timestamp.Infer(va).Format, timestamp.Infer(vb).Format
	if fa == nil || fb == nil {
		return false
	}
	n := 0
	for _, r := range rows {
		if a >= len(r) || b >= len(r) {
			continue
		}
		ta, oka := fa.ParseString(r[a])
		tb, okb := fb.ParseString(r[b])
		if !oka || !okb {
			continue
		}
		if ta > tb {
			return false
		}
		n++
	}
	return n > 0
}

func round2(f float64) float64 { return float64(int(f*100+0.5)) / 100 }

func asSyntax(err error, target **SyntaxError) bool { return errors.As(err, target) }
