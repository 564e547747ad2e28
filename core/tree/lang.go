package tree

import (
	"slices"
	"strings"
)

// Language lists the traces the tree allows, with every loop's redo part taken at most loops
// times, sorted and without repeats; a trace is its activities joined by ",". It grows fast with
// parallel branches: it is meant for the small trees of tests, where two trees have the same
// behaviour exactly when their bounded languages are equal for every bound.
func (n *Node) Language(loops int) []string {
	var out []string
	for _, t := range n.lang(loops) {
		out = append(out, strings.Join(t, ","))
	}
	slices.Sort(out)
	return slices.Compact(out)
}

func (n *Node) lang(loops int) [][]string {
	switch n.Op {
	case Activity:
		return [][]string{{n.Label}}
	case Tau:
		return [][]string{{}}
	case Xor:
		var out [][]string
		for _, c := range n.Children {
			out = append(out, c.lang(loops)...)
		}
		return dedup(out)
	case Seq:
		out := [][]string{{}}
		for _, c := range n.Children {
			out = concat(out, c.lang(loops))
		}
		return out
	case And:
		out := [][]string{{}}
		for _, c := range n.Children {
			var next [][]string
			for _, a := range out {
				for _, b := range c.lang(loops) {
					next = append(next, shuffle(a, b)...)
				}
			}
			out = dedup(next)
		}
		return out
	case Loop:
		body, redo := n.Children[0].lang(loops), n.Children[1].lang(loops)
		out := body
		cur := body
		for i := 0; i < loops; i++ {
			cur = concat(concat(cur, redo), body)
			out = append(out, cur...)
		}
		return dedup(out)
	}
	return nil
}

func concat(a, b [][]string) [][]string {
	var out [][]string
	for _, x := range a {
		for _, y := range b {
			out = append(out, append(slices.Clone(x), y...))
		}
	}
	return dedup(out)
}

// shuffle lists every interleaving of a and b.
func shuffle(a, b []string) [][]string {
	if len(a) == 0 {
		return [][]string{slices.Clone(b)}
	}
	if len(b) == 0 {
		return [][]string{slices.Clone(a)}
	}
	var out [][]string
	for _, t := range shuffle(a[1:], b) {
		out = append(out, append([]string{a[0]}, t...))
	}
	for _, t := range shuffle(a, b[1:]) {
		out = append(out, append([]string{b[0]}, t...))
	}
	return out
}

func dedup(ts [][]string) [][]string {
	seen := map[string]bool{}
	var out [][]string
	for _, t := range ts {
		k := strings.Join(t, "\x00")
		if !seen[k] {
			seen[k] = true
			out = append(out, t)
		}
	}
	return out
}
