package synth

import (
	"cmp"
	"math"
	"math/rand/v2"
	"slices"
	"time"
)

// Activity describes one step of the scenario: who does it and how long it waits and takes.
type Activity struct {
	Name string
	Role string        // "clerk", "technician" or "stores"
	Wait time.Duration // mean wait after the step is enabled: exponential, unless LeadTime
	// LeadTime marks a supplier's delivery: the wait is lognormal (shape leadSigma), its mean Wait
	// times the bike model's factor (BikeModels), so it is fairly regular for one model and differs
	// between models.
	LeadTime bool
	Service  time.Duration // mean of the lognormal service time
	Sigma    float64       // lognormal shape
	CostMean float64       // mean cost recorded on the event, 0 for none
}

// The scenario's activities, in the order of the process tree in the package doc.
const (
	Register = iota
	Inspect
	Reject
	Return
	Order
	Receive
	Quote
	Approve
	Repair
	Test
	Adjust
	Handover
	numActivities
)

// Activities of the workshop scenario (names, roles and timings are invented).
var Activities = [numActivities]Activity{
	Register: {"Register claim", "clerk", 0, false, 10 * time.Minute, 0.4, 0},
	Inspect:  {"Inspect bike", "technician", 4 * time.Hour, false, 45 * time.Minute, 0.5, 0},
	Reject:   {"Reject claim", "clerk", 2 * time.Hour, false, 15 * time.Minute, 0.4, 0},
	Return:   {"Return bike", "clerk", 24 * time.Hour, false, 20 * time.Minute, 0.4, 0},
	Order:    {"Order parts", "clerk", time.Hour, false, 15 * time.Minute, 0.4, 120},
	Receive:  {"Receive parts", "stores", 72 * time.Hour, true, 10 * time.Minute, 0.3, 0},
	Quote:    {"Send quote", "clerk", 2 * time.Hour, false, 10 * time.Minute, 0.3, 0},
	Approve:  {"Record approval", "clerk", 36 * time.Hour, false, 5 * time.Minute, 0.3, 0},
	Repair:   {"Repair bike", "technician", 6 * time.Hour, false, 2 * time.Hour, 0.5, 80},
	Test:     {"Test ride", "technician", time.Hour, false, 30 * time.Minute, 0.4, 0},
	Adjust:   {"Adjust repair", "technician", 2 * time.Hour, false, 45 * time.Minute, 0.5, 30},
	Handover: {"Hand over bike", "clerk", 24 * time.Hour, false, 15 * time.Minute, 0.4, 0},
}

// ProcessTree is the scenario's model in the notation of the package doc.
const ProcessTree = "seq(Register claim, Inspect bike, xor(seq(Reject claim, Return bike), " +
	"seq(and(seq(Order parts, Receive parts), seq(Send quote, Record approval)), " +
	"Repair bike, loop(Test ride, Adjust repair), Hand over bike)))"

// Scenario probabilities.
const (
	pReject = 0.12 // a claim is rejected after inspection
	pAdjust = 0.3  // a test ride fails and the repair is adjusted
)

// BikeModel is a model of bicycle the workshop repairs, with how long its parts take to arrive
// relative to the mean lead time (Receive parts).
type BikeModel struct {
	Name       string
	LeadFactor float64
}

// BikeModels are given to cases in turn; their lead times are invented: parts for the cargo bike
// come from abroad (about a week), those for the folding bike are in stock nearby (about a day).
var BikeModels = []BikeModel{{"Trailhopper 9", 1}, {"Citylane 3", 0.66}, {"Cargomule XL", 2.33}, {"Foldaway S", 0.33}}

// leadSigma is the lognormal shape of a supplier's lead time: about ±30% around its mean.
const leadSigma = 0.3

var tiers = []string{"basic", "extended"}

// Config says what log to make.
type Config struct {
	Seed   uint64
	Events int // stop adding cases once this many events are made (before cut-off at export)
	// CasesPerDay is the arrival rate; 0 picks one that spreads the log over about a year.
	CasesPerDay float64
	// Noise is the share of cases given one defect: a missing, a swapped or an extra event.
	Noise float64
	// StartTimes records when each activity began as well as when it completed.
	StartTimes bool
	// Shifts makes work wait for the shift of the resource that does it.
	Shifts bool
	// Start is the first arrival; the zero value is 2025-01-06 (a Monday).
	Start time.Time
}

// Instance is one execution of an activity in a case.
type Instance struct {
	Case     int32
	Activity uint8
	Resource uint8 // index into Resources
	Start    int64 // Unix seconds
	End      int64
	Cost     float64 // 0 for none
}

// Case is a generated case and what was done to it.
type Case struct {
	ID       string   `json:"id"`
	Model    string   `json:"bike_model"`
	Tier     string   `json:"warranty"`
	Running  bool     `json:"running"`
	Noise    []string `json:"noise,omitempty"` // "missing", "swapped", "extra"
	Activity []string `json:"trace"`
}

// Log is a generated log: instances in time order of their completion, and the cases.
type Log struct {
	Config    Config
	Instances []Instance
	Cases     []Case
	Resources []string
	Export    time.Time // the export date: nothing after it is in the log
}

// resources: pseudonymous ids, never names of people.
func resourcePool() (names []string, byRole map[string][]uint8, shift []int) {
	byRole = map[string][]uint8{}
	add := func(role, name string, s int) {
		byRole[role] = append(byRole[role], uint8(len(names)))
		names = append(names, name)
		shift = append(shift, s)
	}
	for i := 1; i <= 3; i++ {
		add("clerk", "clerk-0"+string(rune('0'+i)), shiftOffice)
	}
	for i := 1; i <= 4; i++ {
		s := shiftEarly
		if i > 2 {
			s = shiftLate
		}
		add("technician", "tech-0"+string(rune('0'+i)), s)
	}
	add("stores", "stores-01", shiftOffice)
	return
}

const (
	shiftOffice = iota // Monday-Friday 08:00-16:00
	shiftEarly         // Monday-Saturday 06:00-14:00
	shiftLate          // Monday-Saturday 13:00-21:00
)

// nextShift returns the first moment at or after t (Unix seconds, UTC) inside the shift.
func nextShift(t int64, s int) int64 {
	from, to, days := 8, 16, 5
	switch s {
	case shiftEarly:
		from, to, days = 6, 14, 6
	case shiftLate:
		from, to, days = 13, 21, 6
	}
	for k := 0; k < 8; k++ {
		tm := time.Unix(t, 0).UTC()
		wd := (int(tm.Weekday()) + 6) % 7 // Monday = 0
		h := tm.Hour()
		if wd < days {
			if h >= from && h < to {
				return t
			}
			if h < from {
				return time.Date(tm.Year(), tm.Month(), tm.Day(), from, 0, 0, 0, time.UTC).Unix()
			}
		}
		next := time.Date(tm.Year(), tm.Month(), tm.Day()+1, 0, 0, 0, 0, time.UTC)
		t = next.Unix()
	}
	return t
}

type gen struct {
	cfg    Config
	r      *rand.Rand
	pool   map[string][]uint8
	shifts []int
}

func (g *gen) lognormal(mean time.Duration, sigma float64) int64 {
	mu := math.Log(mean.Seconds()) - sigma*sigma/2
	return int64(math.Exp(mu + sigma*g.r.NormFloat64()))
}

func (g *gen) exp(mean time.Duration) int64 {
	if mean == 0 {
		return 0
	}
	return int64(g.r.ExpFloat64() * mean.Seconds())
}

// do performs activity a, enabled at t, and returns the instance.
func (g *gen) do(c int32, a int, t int64) Instance {
	act := Activities[a]
	rs := g.pool[act.Role]
	res := rs[g.r.IntN(len(rs))]
	var start int64
	if act.LeadTime {
		start = t + g.lognormal(time.Duration(float64(act.Wait)*BikeModels[int(c)%len(BikeModels)].LeadFactor), leadSigma)
	} else {
		start = t + g.exp(act.Wait)
	}
	if g.cfg.Shifts {
		if s := nextShift(start, g.shifts[res]); s != start {
			start = s + int64(g.r.IntN(1800)) // people do not all begin at the bell
		}
	}
	end := start + max(1, g.lognormal(act.Service, act.Sigma))
	in := Instance{Case: c, Activity: uint8(a), Resource: res, Start: start, End: end}
	if act.CostMean > 0 {
		in.Cost = math.Round(act.CostMean*(0.5+g.r.Float64())*100) / 100
	}
	return in
}

// playCase plays one case arriving at t and returns its instances in the order they were made.
func (g *gen) playCase(c int32, t int64) []Instance {
	var out []Instance
	step := func(a int, at int64) int64 {
		in := g.do(c, a, at)
		out = append(out, in)
		return in.End
	}
	t = step(Register, t)
	t = step(Inspect, t)
	if g.r.Float64() < pReject {
		t = step(Reject, t)
		step(Return, t)
		return out
	}
	t1 := step(Receive, step(Order, t))
	t2 := step(Approve, step(Quote, t))
	t = step(Repair, max(t1, t2))
	t = step(Test, t)
	for g.r.Float64() < pAdjust {
		t = step(Adjust, t)
		t = step(Test, t)
	}
	step(Handover, t)
	return out
}

// Generate makes a log. It holds about 40 bytes per instance.
func Generate(cfg Config) *Log {
	if cfg.Start.IsZero() {
		cfg.Start = time.Date(2025, 1, 6, 7, 0, 0, 0, time.UTC)
	}
	perCase := 10.0
	if cfg.StartTimes {
		perCase = 20
	}
	if cfg.CasesPerDay <= 0 {
		cfg.CasesPerDay = max(8, float64(cfg.Events)/perCase/365)
	}
	names, pool, shifts := resourcePool()
	g := &gen{cfg: cfg, r: rand.New(rand.NewPCG(cfg.Seed, 0x7e57)), pool: pool, shifts: shifts}
	lg := &Log{Config: cfg, Resources: names}
	var all []Instance
	var caseNoise [][]string
	events := 0
	t := cfg.Start.Unix()
	interArrival := 86400 / cfg.CasesPerDay
	for c := int32(0); events < cfg.Events; c++ {
		t += int64(g.r.ExpFloat64() * interArrival)
		ins := g.playCase(c, t)
		var noise []string
		if g.r.Float64() < cfg.Noise {
			ins, noise = g.inject(ins)
		}
		all = append(all, ins...)
		caseNoise = append(caseNoise, noise)
		per := 1
		if cfg.StartTimes {
			per = 2
		}
		events += per * len(ins)
	}
	// The export date: when the last case arrived; later work has not happened yet.
	export := t + 3600
	lg.Export = time.Unix(export, 0).UTC()
	kept := all[:0]
	running := make([]bool, len(caseNoise))
	for _, in := range all {
		if in.End > export {
			running[in.Case] = true
			continue
		}
		kept = append(kept, in)
	}
	all = kept
	// Make the ordering key (start, or end without start times) distinct within a case, so that
	// the true trace does not depend on how a reader breaks ties.
	key := func(in *Instance) *int64 {
		if cfg.StartTimes {
			return &in.Start
		}
		return &in.End
	}
	slices.SortStableFunc(all, func(a, b Instance) int {
		if a.Case != b.Case {
			return int(a.Case - b.Case)
		}
		return cmp.Compare(*key(&a), *key(&b))
	})
	for i := 1; i < len(all); i++ {
		if all[i].Case == all[i-1].Case && *key(&all[i]) <= *key(&all[i-1]) {
			d := *key(&all[i-1]) + 1 - *key(&all[i])
			all[i].Start += d
			all[i].End += d
		}
	}
	// Cases that kept at least one instance, numbered in order of arrival.
	traces := make([][]string, len(caseNoise))
	for _, in := range all {
		traces[in.Case] = append(traces[in.Case], Activities[in.Activity].Name)
	}
	ids := make([]int32, len(caseNoise))
	for c := range caseNoise {
		ids[c] = -1
		if len(traces[c]) == 0 {
			continue
		}
		ids[c] = int32(len(lg.Cases))
		lg.Cases = append(lg.Cases, Case{
			ID: caseID(len(lg.Cases) + 1), Model: BikeModels[int(c)%len(BikeModels)].Name, Tier: tiers[(int(c)/3)%2],
			Running: running[c], Noise: caseNoise[c], Activity: traces[c],
		})
	}
	for i := range all {
		all[i].Case = ids[all[i].Case]
	}
	// Exports list events by time; the readers must not rely on it, so callers may shuffle.
	slices.SortStableFunc(all, func(a, b Instance) int { return cmp.Compare(a.End, b.End) })
	lg.Instances = all
	return lg
}

func caseID(n int) string {
	const digits = "0123456789"
	b := []byte("WR-0000000")
	for i := len(b) - 1; i >= 3 && n > 0; i-- {
		b[i] = digits[n%10]
		n /= 10
	}
	return string(b)
}

// inject gives the case one defect, chosen at random among those its length allows.
func (g *gen) inject(ins []Instance) ([]Instance, []string) {
	switch k := g.r.IntN(3); {
	case k == 0 && len(ins) > 2:
		i := 1 + g.r.IntN(len(ins)-1)
		return slices.Delete(ins, i, i+1), []string{"missing"}
	case k == 1 && len(ins) > 2:
		// swap the times of two instances that follow each other in the case
		slices.SortFunc(ins, func(a, b Instance) int { return cmp.Compare(a.Start, b.Start) })
		i := 1 + g.r.IntN(len(ins)-2)
		a, b := ins[i], ins[i+1]
		ins[i].Start, ins[i].End, ins[i+1].Start, ins[i+1].End = b.Start, b.Start+(a.End-a.Start), a.Start, a.Start+(b.End-b.Start)
		return ins, []string{"swapped"}
	default:
		i := g.r.IntN(len(ins))
		at := ins[i].End
		extra := g.do(ins[0].Case, g.r.IntN(int(numActivities)), at)
		return append(ins, extra), []string{"extra"}
	}
}
