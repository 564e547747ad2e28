package render

import (
	"math"

	"tracewright/core/layout"
	"tracewright/core/petri"
)

// PetriNet draws a Petri net left to right: places as circles with their initial tokens,
// transitions as boxes with their activity, silent transitions as narrow filled bars.
func PetriNet(n *petri.Net) (string, *layout.Result, error) {
	np, nt := len(n.Places), len(n.Transitions)
	lg := layout.Graph{Width: make([]float64, np+nt), Height: make([]float64, np+nt)}
	for p := range n.Places {
		lg.Width[p], lg.Height[p] = 26, 26
	}
	for t, tr := range n.Transitions {
		if tr.Silent() {
			lg.Width[np+t], lg.Height[np+t] = 10, 32
		} else {
			lg.Width[np+t], lg.Height[np+t] = math.Max(80, textWidth(tr.Label)), 36
		}
	}
	for t, tr := range n.Transitions {
		for _, p := range tr.In {
			lg.Edges = append(lg.Edges, layout.Edge{From: p, To: np + t, Weight: 1})
		}
		for _, p := range tr.Out {
			lg.Edges = append(lg.Edges, layout.Edge{From: np + t, To: p, Weight: 1})
		}
	}
	res, err := layout.Layout(lg, layout.Options{Direction: layout.LeftRight, RankSep: 36, NodeSep: 18})
	if err != nil {
		return "", nil, err
	}
	var s svg
	s.open("net", res.Width, res.Height, "Petri net "+n.Name)
	for i := range lg.Edges {
		s.path(res.Paths[i], 1.2, "#5c666d", "")
	}
	for p := range n.Places {
		x, y := res.X[p], res.Y[p]
		s.f(`<g class="place"><title>place %s</title><circle cx="%.1f" cy="%.1f" r="13" fill="#ffffff" stroke="#1d2327" stroke-width="1.5"/>`, esc(n.Places[p].ID), x, y)
		if n.Initial != nil && n.Initial[p] > 0 {
			if n.Initial[p] == 1 {
				s.f(`<circle cx="%.1f" cy="%.1f" r="4" fill="#1d2327"/>`, x, y)
			} else {
				s.f(`<text x="%.1f" y="%.1f" text-anchor="middle">%d</text>`, x, y+4, n.Initial[p])
			}
		}
		s.f(`</g>`)
	}
	for t, tr := range n.Transitions {
		i := np + t
		x, y, w, h := res.X[i], res.Y[i], lg.Width[i], lg.Height[i]
		if tr.Silent() {
			s.f(`<g class="transition silent"><title>silent step</title><rect x="%.1f" y="%.1f" width="%.1f" height="%.1f" fill="#1d2327"/></g>`, x-w/2, y-h/2, w, h)
			continue
		}
		s.f(`<g class="transition"><title>%s</title><rect x="%.1f" y="%.1f" width="%.1f" height="%.1f" rx="4" fill="#e4efe9" stroke="#1d2327"/>`, esc(tr.Label), x-w/2, y-h/2, w, h)
		s.f(`<text x="%.1f" y="%.1f" text-anchor="middle">%s</text></g>`, x, y+4, esc(tr.Label))
	}
	return s.String(), res, nil
}
