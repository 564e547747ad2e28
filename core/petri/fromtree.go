package petri

import (
	"fmt"

	"tracewright/core/tree"
)

// FromTree translates a process tree into a sound workflow net (van der Aalst, Process Mining,
// 2nd ed. 2016, section 3.2.8, from memory): an activity is a transition, τ a silent one; a
// sequence chains its children through new places; an exclusive choice lets its children share
// the places before and after; a parallel node splits and joins with silent transitions; a loop
// enters its body and leaves after it with silent transitions, and its redo part leads from the
// end of the body back to its start. The initial marking is one token in the source place, the
// final one a token in the sink.
func FromTree(t *tree.Node) *Net {
	n := &Net{}
	b := &treeBuilder{n: n}
	source := b.place("source")
	sink := b.place("sink")
	b.node(t, source, sink)
	n.Initial = n.Marking(source)
	n.Final = n.Marking(sink)
	return n
}

type treeBuilder struct {
	n      *Net
	np, nt int
}

func (b *treeBuilder) place(name string) int {
	b.np++
	return b.n.AddPlace(fmt.Sprintf("p%d", b.np), name)
}

func (b *treeBuilder) trans(label string, in, out []int) {
	b.nt++
	b.n.AddTransition(fmt.Sprintf("t%d", b.nt), label, in, out)
}

func (b *treeBuilder) node(t *tree.Node, in, out int) {
	switch t.Op {
	case tree.Activity:
		b.trans(t.Label, []int{in}, []int{out})
	case tree.Tau:
		b.trans("", []int{in}, []int{out})
	case tree.Seq:
		cur := in
		for i, c := range t.Children {
			next := out
			if i < len(t.Children)-1 {
				next = b.place("")
			}
			b.node(c, cur, next)
			cur = next
		}
	case tree.Xor:
		for _, c := range t.Children {
			b.node(c, in, out)
		}
	case tree.And:
		var starts, ends []int
		for range t.Children {
			starts = append(starts, b.place(""))
			ends = append(ends, b.place(""))
		}
		b.trans("", []int{in}, starts)
		for i, c := range t.Children {
			b.node(c, starts[i], ends[i])
		}
		b.trans("", ends, []int{out})
	case tree.Loop:
		start, end := b.place(""), b.place("")
		b.trans("", []int{in}, []int{start})
		b.node(t.Children[0], start, end)
		b.node(t.Children[1], end, start)
		b.trans("", []int{end}, []int{out})
	}
}
