// Package dfg computes the directly-follows graph of an event log, the picture of how cases
// really flowed: a node per activity, plus an artificial start and end, and an edge from a to b
// when, in some case, an instance of b directly follows an instance of a. Every node and edge
// carries how often it occurs and in how many cases; every edge between activities carries the
// time from the end of the first instance to the start of the next (mean, median, 90th
// percentile and maximum, in seconds; Hyndman and Fan definition 7 for the quantiles).
//
// Abstraction has two independent controls. Activities: the most frequent activities are kept
// until they hold the chosen share of all activity instances; hidden activities are taken out of
// the traces before the edges are counted, so an edge a→c appears where a hidden b stood between
// them (the graph stays true to the log, projected). Edges: the most frequent edges are kept
// until they hold the chosen share of all edge occurrences, and then edges are added back, most
// frequent first, until every shown activity is reachable from start and can reach end: while an
// activity is unreachable, the heaviest hidden edge from a reachable node to an unreachable one
// joins; then, while an activity cannot reach end, the heaviest hidden edge from it (or any node
// that cannot) to a node that can. Both loops end because the full projected graph has every
// activity on a path from start to end (each lies on a case), and each added edge makes at least
// one more node reachable (or co-reachable).
//
// Cost: O(events) to count, O(e log e) to choose edges, O(e·n) for the repair.
package dfg

import (
	"slices"

	"tracewright/core/eventlog"
	"tracewright/core/summary"
)

// Node is an activity, or the artificial start (Activity -1) or end (Activity -2).
type Node struct {
	ID       int    `json:"id"`
	Activity int32  `json:"activity"`
	Name     string `json:"name"`
	Count    int    `json:"count"` // activity instances (for start and end: cases)
	Cases    int    `json:"cases"`
}

// Edge is a directly-follows relation with its frequency and timing.
type Edge struct {
	From     int          `json:"from"`
	To       int          `json:"to"`
	Count    int          `json:"count"`
	Cases    int          `json:"cases"`
	Duration summary.Dist `json:"duration_seconds"`
}

// Graph is a directly-follows graph. Nodes[0] is start and Nodes[1] end.
type Graph struct {
	Nodes []Node `json:"nodes"`
	Edges []Edge `json:"edges"`
	// Shown reports the abstraction: activity and edge shares asked for, and what they hide.
	ActivityShare float64 `json:"activity_share"`
	EdgeShare     float64 `json:"edge_share"`
	HiddenActs    int     `json:"hidden_activities"`
	HiddenEdges   int     `json:"hidden_edges"`
}

const (
	startNode = 0
	endNode   = 1
)

// Options are the two abstraction controls, shares in (0, 1]; 0 means 1 (show all).
type Options struct {
	Activities float64 `json:"activities"`
	Edges      float64 `json:"edges"`
}

// Build computes the directly-follows graph of l under the abstraction.
func Build(l *eventlog.Log, opt Options) *Graph {
	if opt.Activities <= 0 || opt.Activities > 1 {
		opt.Activities = 1
	}
	if opt.Edges <= 0 || opt.Edges > 1 {
		opt.Edges = 1
	}
	nAct := l.Activities.Len()
	inst := make([]int, nAct)
	for _, a := range l.InstAct {
		inst[a]++
	}
	keep := keepActivities(inst, opt.Activities)
	g := count(l, keep)
	g.ActivityShare, g.EdgeShare = opt.Activities, opt.Edges
	for a := range keep {
		if !keep[a] && inst[a] > 0 {
			g.HiddenActs++
		}
	}
	g.chooseEdges(opt.Edges)
	return g
}

// keepActivities keeps the most frequent activities (ties by id) until they hold share of all
// instances.
func keepActivities(inst []int, share float64) []bool {
	total := 0
	order := make([]int, 0, len(inst))
	for a, n := range inst {
		total += n
		if n > 0 {
			order = append(order, a)
		}
	}
	slices.SortStableFunc(order, func(a, b int) int { return inst[b] - inst[a] })
	keep := make([]bool, len(inst))
	sum := 0
	for _, a := range order {
		if len(order) > 0 && float64(sum) >= share*float64(total) && sum > 0 {
			break
		}
		keep[a] = true
		sum += inst[a]
	}
	return keep
}

// count builds the graph of the traces projected on the kept activities.
func count(l *eventlog.Log, keep []bool) *Graph {
	g := &Graph{}
	g.Nodes = append(g.Nodes, Node{ID: 0, Activity: -1, Name: "start"}, Node{ID: 1, Activity: -2, Name: "end"})
	nodeOf := make([]int, l.Activities.Len())
	for a := range nodeOf {
		nodeOf[a] = -1
		if keep[a] {
			nodeOf[a] = len(g.Nodes)
			g.Nodes = append(g.Nodes, Node{ID: len(g.Nodes), Activity: int32(a), Name: l.Activities.Name(int32(a))})
		}
	}
	type acc struct {
		count, cases, lastCase int
		durs                   []float64
	}
	edges := map[[2]int]*acc{}
	add := func(from, to, c int, dur float64, timed bool) {
		e := edges[[2]int{from, to}]
		if e == nil {
			e = &acc{lastCase: -1}
			edges[[2]int{from, to}] = e
		}
		e.count++
		if e.lastCase != c {
			e.lastCase = c
			e.cases++
		}
		if timed {
			e.durs = append(e.durs, dur)
		}
	}
	lastCase := make([]int, len(g.Nodes))
	for i := range lastCase {
		lastCase[i] = -1
	}
	for c := 0; c < l.NumCases(); c++ {
		prev, prevEnd := startNode, eventlog.NoTime
		from, to := int(l.InstStart[c]), int(l.InstStart[c+1])
		if from == to {
			continue
		}
		g.Nodes[startNode].Count++
		g.Nodes[startNode].Cases++
		for i := from; i < to; i++ {
			n := nodeOf[l.InstAct[i]]
			if n < 0 {
				continue
			}
			g.Nodes[n].Count++
			if lastCase[n] != c {
				lastCase[n] = c
				g.Nodes[n].Cases++
			}
			first, last := l.InstanceEvents(i)
			begin := l.Time[first]
			timed := prev != startNode && prevEnd != eventlog.NoTime && begin != eventlog.NoTime
			add(prev, n, c, float64(begin-prevEnd)/1e6, timed)
			prev, prevEnd = n, l.Time[last]
		}
		add(prev, endNode, c, 0, false)
		g.Nodes[endNode].Count++
		g.Nodes[endNode].Cases++
	}
	for k, e := range edges {
		g.Edges = append(g.Edges, Edge{From: k[0], To: k[1], Count: e.count, Cases: e.cases, Duration: summary.Of(e.durs)})
	}
	slices.SortFunc(g.Edges, func(a, b Edge) int {
		if a.From != b.From {
			return a.From - b.From
		}
		return a.To - b.To
	})
	return g
}

// chooseEdges keeps the heaviest edges up to share of all edge occurrences, then repairs
// reachability as the package doc says.
func (g *Graph) chooseEdges(share float64) {
	if share >= 1 {
		return
	}
	order := make([]int, len(g.Edges))
	total := 0
	for i, e := range g.Edges {
		order[i] = i
		total += e.Count
	}
	// heaviest first; ties by (from, to) order, already sorted
	slices.SortStableFunc(order, func(a, b int) int { return g.Edges[b].Count - g.Edges[a].Count })
	kept := make([]bool, len(g.Edges))
	sum := 0
	for _, i := range order {
		if float64(sum) >= share*float64(total) {
			break
		}
		kept[i] = true
		sum += g.Edges[i].Count
	}
	// repair: reachable from start
	for {
		fwd := g.reach(kept, startNode, true)
		best := -1
		for _, i := range order {
			e := g.Edges[i]
			if !kept[i] && fwd[e.From] && !fwd[e.To] {
				best = i
				break
			}
		}
		if best < 0 {
			break
		}
		kept[best] = true
	}
	// repair: able to reach end
	for {
		bwd := g.reach(kept, endNode, false)
		best := -1
		for _, i := range order {
			e := g.Edges[i]
			if !kept[i] && !bwd[e.From] && bwd[e.To] {
				best = i
				break
			}
		}
		if best < 0 {
			break
		}
		kept[best] = true
	}
	var out []Edge
	for i, e := range g.Edges {
		if kept[i] {
			out = append(out, e)
		} else {
			g.HiddenEdges++
		}
	}
	g.Edges = out
}

// reach marks the nodes reachable from n along kept edges (forward), or that reach n (backward).
func (g *Graph) reach(kept []bool, n int, forward bool) []bool {
	seen := make([]bool, len(g.Nodes))
	seen[n] = true
	for changed := true; changed; {
		changed = false
		for i, e := range g.Edges {
			if !kept[i] {
				continue
			}
			a, b := e.From, e.To
			if !forward {
				a, b = b, a
			}
			if seen[a] && !seen[b] {
				seen[b] = true
				changed = true
			}
		}
	}
	return seen
}
