package render

import (
	"fmt"
	"math"
	"time"

	"tracewright/core/dfg"
	"tracewright/core/layout"
)

// Mode chooses what a directly-follows graph shows.
type Mode uint8

// Counts colours by how often; Durations by how long edges take (median).
const (
	Counts Mode = iota
	Durations
)

// DFGOptions steer DFG drawing.
type DFGOptions struct {
	Mode      Mode
	Direction layout.Direction
	Previous  *layout.Result // the last drawing, so nodes keep their places
}

// DFG draws a directly-follows graph and returns the SVG and the layout (to pass as Previous
// next time).
func DFG(g *dfg.Graph, opt DFGOptions) (string, *layout.Result, error) {
	n := len(g.Nodes)
	lg := layout.Graph{Width: make([]float64, n), Height: make([]float64, n)}
	keys := make([]string, n)
	maxCount, maxEdge, maxDur := 1, 1, 1.0
	for i, nd := range g.Nodes {
		keys[i] = nd.Name
		if nd.Activity < 0 {
			lg.Width[i], lg.Height[i] = 28, 28
			keys[i] = fmt.Sprint("\x00", nd.Activity)
			continue
		}
		lg.Width[i], lg.Height[i] = math.Max(90, textWidth(nd.Name)), 44
		maxCount = max(maxCount, nd.Count)
	}
	for _, e := range g.Edges {
		lg.Edges = append(lg.Edges, layout.Edge{From: e.From, To: e.To, Weight: e.Count})
		maxEdge = max(maxEdge, e.Count)
		maxDur = math.Max(maxDur, e.Duration.Median)
	}
	res, err := layout.Layout(lg, layout.Options{Direction: opt.Direction, Keys: keys, Previous: opt.Previous})
	if err != nil {
		return "", nil, err
	}
	var s svg
	title := "Directly-follows graph, by frequency"
	if opt.Mode == Durations {
		title = "Directly-follows graph, by median time between activities"
	}
	s.open("dfg", res.Width, res.Height, title)
	for i, e := range g.Edges {
		width := 1 + 6*math.Sqrt(float64(e.Count)/float64(maxEdge))
		color := "#8a949a"
		label := fmt.Sprint(e.Count)
		if opt.Mode == Durations && e.Duration.N > 0 {
			color = DurationRamp.At(e.Duration.Median / maxDur)
			label = Human(e.Duration.Median)
		} else if opt.Mode == Counts {
			color = CountRamp.At(0.35 + 0.65*float64(e.Count)/float64(maxEdge))
		}
		s.f(`<g class="edge" data-from="%d" data-to="%d" data-count="%d">`, e.From, e.To, e.Count)
		s.f(`<title>%s → %s: %d times in %d cases</title>`, esc(g.Nodes[e.From].Name), esc(g.Nodes[e.To].Name), e.Count, e.Cases)
		s.path(res.Paths[i], width, color, "")
		if p := res.Paths[i]; len(p) > 0 && !(opt.Mode == Durations && e.Duration.N == 0) {
			mid := p[len(p)/2]
			s.f(`<text x="%.1f" y="%.1f" text-anchor="middle" fill="#3b4449" font-size="11" stroke="#ffffff" stroke-width="3" paint-order="stroke">%s</text>`, mid.X+6, mid.Y-4, esc(label))
		}
		s.f(`</g>`)
	}
	for i, nd := range g.Nodes {
		x, y, w, h := res.X[i], res.Y[i], lg.Width[i], lg.Height[i]
		s.f(`<g class="node" data-id="%d" tabindex="0">`, i)
		if nd.Activity < 0 {
			fill := "#2f6f5e"
			if nd.Activity == -2 {
				fill = "#1d2327"
			}
			s.f(`<title>%s: %d cases</title><circle cx="%.1f" cy="%.1f" r="%.1f" fill="%s"/>`, esc(nd.Name), nd.Cases, x, y, w/2, fill)
			s.f(`</g>`)
			continue
		}
		t := float64(nd.Count) / float64(maxCount)
		fill := CountRamp.At(t)
		if opt.Mode == Durations {
			fill = "#f4f1ea"
			t = 0
		}
		s.f(`<title>%s: %d times in %d cases</title>`, esc(nd.Name), nd.Count, nd.Cases)
		s.f(`<rect x="%.1f" y="%.1f" width="%.1f" height="%.1f" rx="8" fill="%s" stroke="#5c666d" stroke-width="1"/>`, x-w/2, y-h/2, w, h, fill)
		s.f(`<text x="%.1f" y="%.1f" text-anchor="middle" fill="%s">%s</text>`, x, y-2, ink(t), esc(nd.Name))
		s.f(`<text x="%.1f" y="%.1f" text-anchor="middle" fill="%s" font-size="10">%d</text>`, x, y+13, ink(t), nd.Count)
		s.f(`</g>`)
	}
	return s.String(), res, nil
}

// Human writes a duration in seconds the way the drawings label it: seconds, minutes, hours or
// days with the unit, one decimal from hours up.
func Human(s float64) string {
	d := time.Duration(s * float64(time.Second))
	switch {
	case d >= 24*time.Hour:
		return fmt.Sprintf("%.1f d", s/86400)
	case d >= time.Hour:
		return fmt.Sprintf("%.1f h", s/3600)
	case d >= time.Minute:
		return fmt.Sprintf("%.0f min", s/60)
	}
	return fmt.Sprintf("%.0f s", s)
}
