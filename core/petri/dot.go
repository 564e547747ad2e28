package petri

import (
	"bufio"
	"fmt"
	"io"
	"strings"
)

// WriteDOT writes the net in Graphviz's DOT language: places as circles (with their tokens),
// transitions as boxes, silent ones filled. Labels are quoted and escaped, so any activity name
// is safe.
func WriteDOT(w io.Writer, n *Net) error {
	bw := bufio.NewWriter(w)
	q := func(s string) string {
		return `"` + strings.NewReplacer(`\`, `\\`, `"`, `\"`, "\n", `\n`).Replace(s) + `"`
	}
	fmt.Fprintf(bw, "digraph %s {\n  rankdir=LR;\n", q(n.Name))
	for i, p := range n.Places {
		label := ""
		if n.Initial != nil && n.Initial[i] > 0 {
			label = fmt.Sprint(n.Initial[i])
		}
		fmt.Fprintf(bw, "  %s [shape=circle, label=%s];\n", q("p:"+p.ID), q(label))
	}
	for _, t := range n.Transitions {
		if t.Silent() {
			fmt.Fprintf(bw, "  %s [shape=box, style=filled, fillcolor=black, label=\"\", width=0.15];\n", q("t:"+t.ID))
		} else {
			fmt.Fprintf(bw, "  %s [shape=box, label=%s];\n", q("t:"+t.ID), q(t.Label))
		}
	}
	for _, t := range n.Transitions {
		for _, p := range t.In {
			fmt.Fprintf(bw, "  %s -> %s;\n", q("p:"+n.Places[p].ID), q("t:"+t.ID))
		}
		for _, p := range t.Out {
			fmt.Fprintf(bw, "  %s -> %s;\n", q("t:"+t.ID), q("p:"+n.Places[p].ID))
		}
	}
	fmt.Fprintln(bw, "}")
	return bw.Flush()
}
