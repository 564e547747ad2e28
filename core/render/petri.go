package render

import (
	"math"

	"tracewright/core/layout"
	"tracewright/core/petri"
)

// PetriNet draws a Petri net left to right: places as circles with their initial tokens,
// transitions as boxes with their activity, silent transitions as narrow filled bars.
func PetriNet(n *petri.Net) (string, *layout.Result, error) {
	return PetriNetOverlay(n, nil)
}

// Overlay puts figures on a Petri net drawing: each place or transition with a Mark is filled
// from the ramp at its level and gets its text beneath it and its title as a tooltip. The
// conformance view uses it for deviations per step and the timing view for time per step.
type Overlay struct {
	Ramp        Ramp
	Transitions []Mark // by transition index; nil or a zero Mark for none
	Places      []Mark // by place index
}

// Mark is one node's figure. Level runs from 0 to 1 on the ramp; Text is a few characters (a
// count, a duration) drawn under the node.
type Mark struct {
	Level float64
	Text  string
	Title string
}

func (o *Overlay) transition(t int) (Mark, bool) {
	if o == nil || t >= len(o.Transitions) || o.Transitions[t].Text == "" {
		return Mark{}, false
	}
	return o.Transitions[t], true
}

func (o *Overlay) place(p int) (Mark, bool) {
	if o == nil || p >= len(o.Places) || o.Places[p].Text == "" {
		return Mark{}, false
	}
	return o.Places[p], true
}

// PetriNetOverlay is PetriNet with an overlay (nil: none). A node with a mark is laid out
// taller, so its text never runs into what lies below it.
func PetriNetOverlay(n *petri.Net, o *Overlay) (string, *layout.Result, error) {
	np, nt := len(n.Places), len(n.Transitions)
	lg := layout.Graph{Width: make([]float64, np+nt), Height: make([]float64, np+nt)}
	const textRoom = 30 // two lines of 12 px text and a gap under a marked node
	for p := range n.Places {
		lg.Width[p], lg.Height[p] = 26, 26
		if m, ok := o.place(p); ok {
			lg.Width[p], lg.Height[p] = math.Max(26, textWidth(m.Text)-10), 26+textRoom
		}
	}
	for t, tr := range n.Transitions {
		if tr.Silent() {
			lg.Width[np+t], lg.Height[np+t] = 10, 32
		} else {
			lg.Width[np+t], lg.Height[np+t] = math.Max(80, textWidth(tr.Label)), 36
			if m, ok := o.transition(t); ok {
				lg.Width[np+t] = math.Max(lg.Width[np+t], textWidth(m.Text)-10)
				lg.Height[np+t] += textRoom
			}
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
		fill, title := "#ffffff", "place "+n.Places[p].ID
		m, marked := o.place(p)
		if marked {
			y -= textRoom / 2
			fill, title = o.Ramp.At(m.Level), title+": "+m.Title
		}
		s.f(`<g class="place"><title>%s</title><circle cx="%.1f" cy="%.1f" r="13" fill="%s" stroke="#1d2327" stroke-width="1.5"/>`, esc(title), x, y, fill)
		if marked {
			s.f(`<text class="mark" x="%.1f" y="%.1f" text-anchor="middle">%s</text>`, x, y+28, esc(m.Text))
		}
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
		fill, text, title := "#e4efe9", "#1d2327", tr.Label
		m, marked := o.transition(t)
		if marked {
			h -= textRoom
			y -= textRoom / 2
			fill, text, title = o.Ramp.At(m.Level), ink(m.Level), tr.Label+": "+m.Title
		}
		s.f(`<g class="transition"><title>%s</title><rect x="%.1f" y="%.1f" width="%.1f" height="%.1f" rx="4" fill="%s" stroke="#1d2327"/>`, esc(title), x-w/2, y-h/2, w, h, fill)
		s.f(`<text x="%.1f" y="%.1f" text-anchor="middle" fill="%s">%s</text>`, x, y+4, text, esc(tr.Label))
		if marked {
			s.f(`<text class="mark" x="%.1f" y="%.1f" text-anchor="middle">%s</text>`, x, y+h/2+15, esc(m.Text))
		}
		s.f(`</g>`)
	}
	return s.String(), res, nil
}
