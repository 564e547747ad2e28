package conformance

import (
	"fmt"
	"math/rand/v2"
	"slices"
	"strings"

	"tracewright/core/petri"
	"tracewright/core/tree"
)

// randomTree builds a process tree over the given activities: sequences, choices, parallel
// blocks and loops, split at random. Generated models are the ground truth of the property tests
// and benchmarks: every trace played out from them fits, and the noise added afterwards is known.
func randomTree(r *rand.Rand, acts []string, loopsLeft int) *tree.Node {
	if len(acts) == 1 {
		if r.IntN(10) == 0 {
			return tree.New(tree.Xor, tree.Leaf(acts[0]), tree.Silent()) // optional step
		}
		return tree.Leaf(acts[0])
	}
	op := tree.Seq
	switch x := r.IntN(20); {
	case x < 4:
		op = tree.Xor
	case x < 8:
		op = tree.And
	case x < 10 && loopsLeft > 0:
		op = tree.Loop
		loopsLeft--
	}
	k := 2
	if op != tree.Loop && len(acts) >= 3 && r.IntN(2) == 0 {
		k = 3
	}
	cuts := []int{0}
	for _, c := range r.Perm(len(acts) - 1)[:k-1] {
		cuts = append(cuts, c+1)
	}
	slices.Sort(cuts)
	cuts = append(cuts, len(acts))
	var kids []*tree.Node
	for i := 0; i+1 < len(cuts); i++ {
		kids = append(kids, randomTree(r, acts[cuts[i]:cuts[i+1]], loopsLeft))
	}
	return tree.New(op, kids...)
}

// playout walks the tree once: a choice takes a random child, a parallel block interleaves its
// children's runs at random, a loop repeats its redo part with probability 0.3 each time.
func playout(r *rand.Rand, n *tree.Node) []string {
	switch n.Op {
	case tree.Activity:
		return []string{n.Label}
	case tree.Tau:
		return nil
	case tree.Seq:
		var out []string
		for _, c := range n.Children {
			out = append(out, playout(r, c)...)
		}
		return out
	case tree.Xor:
		return playout(r, n.Children[r.IntN(len(n.Children))])
	case tree.And:
		var runs [][]string
		total := 0
		for _, c := range n.Children {
			run := playout(r, c)
			runs = append(runs, run)
			total += len(run)
		}
		out := make([]string, 0, total)
		for len(out) < total {
			k := r.IntN(len(runs))
			if len(runs[k]) == 0 {
				continue
			}
			out = append(out, runs[k][0])
			runs[k] = runs[k][1:]
		}
		return out
	default: // loop
		out := playout(r, n.Children[0])
		for r.Float64() < 0.3 {
			out = append(out, playout(r, n.Children[1])...)
			out = append(out, playout(r, n.Children[0])...)
		}
		return out
	}
}

// addNoise changes each event with probability p in one of three ways, chosen evenly: it is
// dropped, another of the model's activities is inserted after it, or it swaps places with the
// next event (the usual kinds of noise in conformance benchmarks: common practice).
func addNoise(r *rand.Rand, trace []string, acts []string, p float64) []string {
	out := slices.Clone(trace)
	for i := 0; i < len(out); i++ {
		if r.Float64() >= p {
			continue
		}
		switch r.IntN(3) {
		case 0:
			out = slices.Delete(out, i, i+1)
			i--
		case 1:
			out = slices.Insert(out, i+1, acts[r.IntN(len(acts))])
			i++
		default:
			if i+1 < len(out) {
				out[i], out[i+1] = out[i+1], out[i]
				i++
			}
		}
	}
	return out
}

// generatedModel is a random process tree with its net, over activities a01, a02, ...
type generatedModel struct {
	tree *tree.Node
	net  *petri.Net
	acts []string
}

func newGeneratedModel(seed uint64, activities int) generatedModel {
	r := rand.New(rand.NewPCG(seed, 1))
	acts := make([]string, activities)
	for i := range acts {
		acts[i] = fmt.Sprintf("a%02d", i+1)
	}
	t := randomTree(r, acts, 2)
	return generatedModel{tree: t, net: petri.FromTree(t), acts: acts}
}

// variants plays out cases traces with noise p and returns the distinct ones with their counts,
// in the order first seen.
func (g generatedModel) variants(seed uint64, cases int, p float64) (traces [][]string, counts []int) {
	r := rand.New(rand.NewPCG(seed, 2))
	at := map[string]int{}
	for range cases {
		tr := addNoise(r, playout(r, g.tree), g.acts, p)
		k := strings.Join(tr, ",")
		if i, ok := at[k]; ok {
			counts[i]++
			continue
		}
		at[k] = len(traces)
		traces = append(traces, tr)
		counts = append(counts, 1)
	}
	return traces, counts
}
