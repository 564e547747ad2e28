package render

import (
	"math"

	"tracewright/core/layout"
	"tracewright/core/tree"
)

var opSymbols = map[tree.Op]string{tree.Seq: "→", tree.Xor: "×", tree.And: "∧", tree.Loop: "↺"}
var opNames = map[tree.Op]string{tree.Seq: "sequence", tree.Xor: "exclusive choice", tree.And: "parallel", tree.Loop: "loop (body first, then redo)"}

// ProcessTree draws a process tree top down: operators as circles with their symbol, activities
// as boxes, τ as a small filled square.
func ProcessTree(root *tree.Node) (string, *layout.Result, error) {
	var nodes []*tree.Node
	lg := layout.Graph{}
	var walk func(n *tree.Node) int
	walk = func(n *tree.Node) int {
		id := len(nodes)
		nodes = append(nodes, n)
		w, h := 30.0, 30.0
		switch n.Op {
		case tree.Activity:
			w, h = math.Max(70, textWidth(n.Label)), 32
		case tree.Tau:
			w, h = 14, 14
		}
		lg.Width = append(lg.Width, w)
		lg.Height = append(lg.Height, h)
		for _, c := range n.Children {
			k := walk(c)
			lg.Edges = append(lg.Edges, layout.Edge{From: id, To: k, Weight: 1})
		}
		return id
	}
	walk(root)
	res, err := layout.Layout(lg, layout.Options{RankSep: 36})
	if err != nil {
		return "", nil, err
	}
	var s svg
	s.open("tree", res.Width, res.Height, "Process tree "+root.String())
	for i := range lg.Edges {
		p := res.Paths[i]
		if len(p) > 0 {
			s.f(`<line x1="%.1f" y1="%.1f" x2="%.1f" y2="%.1f" stroke="#8a949a"/>`, p[0].X, p[0].Y, p[len(p)-1].X, p[len(p)-1].Y)
		}
	}
	for i, n := range nodes {
		x, y, w, h := res.X[i], res.Y[i], lg.Width[i], lg.Height[i]
		switch n.Op {
		case tree.Activity:
			s.f(`<g class="leaf"><title>%s</title><rect x="%.1f" y="%.1f" width="%.1f" height="%.1f" rx="6" fill="#e4efe9" stroke="#1d2327"/><text x="%.1f" y="%.1f" text-anchor="middle">%s</text></g>`,
				esc(n.Label), x-w/2, y-h/2, w, h, x, y+4, esc(n.Label))
		case tree.Tau:
			s.f(`<g class="silent"><title>silent step</title><rect x="%.1f" y="%.1f" width="%.1f" height="%.1f" fill="#1d2327"/></g>`, x-w/2, y-h/2, w, h)
		default:
			s.f(`<g class="operator"><title>%s</title><circle cx="%.1f" cy="%.1f" r="15" fill="#ffffff" stroke="#2f6f5e" stroke-width="2"/><text x="%.1f" y="%.1f" text-anchor="middle" font-size="15" fill="#2f6f5e">%s</text></g>`,
				opNames[n.Op], x, y, x, y+5, opSymbols[n.Op])
		}
	}
	return s.String(), res, nil
}
