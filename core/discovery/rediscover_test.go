package discovery

import (
	"fmt"
	"math/rand/v2"
	"strings"
	"testing"

	"tracewright/core/tree"
)

// randomTree makes a process tree over fresh activity names (no duplicates), depth at most
// depth: the class of trees the Inductive Miner rediscovers (Leemans, Fahland and van der Aalst
// 2013, section 5: no duplicate activities, no silent leaves; a loop's body here never begins
// and ends with the same activity, one of the paper's conditions).
func randomTree(r *rand.Rand, depth int, next *int) *tree.Node {
	leaf := func() *tree.Node {
		*next++
		return tree.Leaf(fmt.Sprintf("t%d", *next))
	}
	if depth == 0 || r.IntN(3) == 0 {
		return leaf()
	}
	switch r.IntN(4) {
	case 0:
		return tree.New(tree.Seq, randomTree(r, depth-1, next), randomTree(r, depth-1, next))
	case 1:
		return tree.New(tree.Xor, randomTree(r, depth-1, next), randomTree(r, depth-1, next))
	case 2:
		return tree.New(tree.And, randomTree(r, depth-1, next), randomTree(r, depth-1, next))
	default:
		body := tree.New(tree.Seq, leaf(), leaf())
		return tree.New(tree.Loop, body, randomTree(r, depth-1, next))
	}
}

// TestRediscoverability: a log holding every trace of a random tree (loops up to twice) shows
// every directly-follows pair, so IM, IMf and IMd must return a tree with the same language
// (property test with known ground truth; the guarantee is Theorem 14 of the paper above).
func TestRediscoverability(t *testing.T) {
	r := rand.New(rand.NewPCG(7, 11))
	tried := 0
	for i := 0; i < 2000 && tried < 150; i++ {
		n := 0
		truth := randomTree(r, 3, &n)
		if n > 7 { // parallel branches make languages explode; small trees cover every operator
			continue
		}
		lang := truth.Language(2)
		if len(lang) > 300 {
			continue
		}
		tried++
		var ts [][]string
		for _, s := range lang {
			if s == "" {
				ts = append(ts, nil)
			} else {
				ts = append(ts, strings.Split(s, ","))
			}
		}
		l := FromStrings(ts...)
		for name, got := range map[string]*tree.Node{
			"IM":  InductiveMiner(l, Options{}),
			"IMf": InductiveMiner(l, Options{Noise: 0.2}),
			"IMd": InductiveMinerGraph(l, Options{}),
		} {
			if g := got.Language(2); strings.Join(g, "|") != strings.Join(lang, "|") {
				t.Errorf("%s: tree %s came back as %s", name, truth, got)
			}
		}
	}
	if tried < 100 {
		t.Fatalf("only %d trees tried", tried)
	}
}
