package layout

import (
	"fmt"
	"math"
	"slices"
	"strconv"
)

// Layout draws the graph (see the package doc).
func Layout(g Graph, opt Options) (*Result, error) {
	opt.defaults()
	n := len(g.Width)
	if len(g.Height) != n {
		return nil, fmt.Errorf("layout: %d widths and %d heights", n, len(g.Height))
	}
	for _, e := range g.Edges {
		if e.From < 0 || e.From >= n || e.To < 0 || e.To >= n {
			return nil, fmt.Errorf("layout: edge %d->%d outside 0..%d", e.From, e.To, n-1)
		}
	}
	if opt.Keys != nil && len(opt.Keys) != n {
		return nil, fmt.Errorf("layout: %d keys for %d nodes", len(opt.Keys), n)
	}
	w, h := g.Width, g.Height
	if opt.Direction == LeftRight {
		w, h = h, w
	}
	dag, reversed := breakCycles(n, g.Edges)
	rank := rankNodes(n, dag)
	L := build(Graph{Width: w, Height: h, Edges: g.Edges}, rank, func(e Edge) (int, int, bool) {
		if rank[e.From] < rank[e.To] {
			return e.From, e.To, false
		}
		return e.To, e.From, true
	})
	// the nodes' keys, and for the dummy nodes of long edges the key of their edge and place, so
	// that a layout seeded with a previous one finds its whole order again, bends included
	var keyOf []string
	if opt.Keys != nil {
		keyOf = make([]string, L.n)
		copy(keyOf, opt.Keys)
		for i, e := range g.Edges {
			c := L.chains[i]
			for k := 1; k+1 < len(c); k++ {
				keyOf[c[k]] = opt.Keys[e.From] + "\x00" + opt.Keys[e.To] + "\x00" + strconv.Itoa(k)
			}
		}
	}
	var seed []float64
	if opt.Previous != nil && keyOf != nil && opt.Previous.order != nil {
		seed = make([]float64, L.n)
		for v, k := range keyOf {
			seed[v] = -1
			if p, ok := opt.Previous.order[k]; ok {
				seed[v] = p
			}
		}
	}
	L.initialOrder(seed)
	L.order(opt.Sweeps, seed != nil)
	weights := make([]int, len(g.Edges))
	for i, e := range g.Edges {
		weights[i] = e.Weight
	}
	xs := L.positions(opt.NodeSep, weights)

	// y: each rank as tall as its tallest node
	heights := make([]float64, len(L.layers))
	for v := 0; v < n; v++ {
		heights[L.rank[v]] = max(heights[L.rank[v]], h[v])
	}
	ys := make([]float64, len(L.layers))
	y := 0.0
	for r, ht := range heights {
		ys[r] = y + ht/2
		y += ht + opt.RankSep
	}
	lo, hi := L.extent(xs)
	if len(xs) == 0 {
		lo, hi = 0, 0
	}
	res := &Result{X: make([]float64, n), Y: make([]float64, n), Rank: L.rank[:n], Reversed: reversed,
		Crossings: L.crossings(), Keys: opt.Keys}
	res.Width, res.Height = hi-lo, math.Max(0, y-opt.RankSep)
	at := func(v int) Point { return Point{xs[v] - lo, ys[L.rank[v]]} }
	for v := 0; v < n; v++ {
		p := at(v)
		res.X[v], res.Y[v] = p.X, p.Y
	}
	res.Paths = make([][]Point, len(g.Edges))
	opposite := map[[2]int]bool{}
	for i, e := range g.Edges {
		if len(L.chains[i]) == 2 {
			opposite[[2]int{e.From, e.To}] = true
		}
	}
	for i, e := range g.Edges {
		if e.From == e.To {
			c := at(e.From)
			r := w[e.From] / 2
			res.Paths[i] = []Point{{c.X + r, c.Y - 4}, {c.X + r + 24, c.Y - 18}, {c.X + r + 24, c.Y + 18}, {c.X + r, c.Y + 4}}
			continue
		}
		chain := L.chains[i]
		pts := make([]Point, 0, len(chain))
		for k, v := range chain {
			p := at(v)
			switch k {
			case 0:
				p.Y += h[v] / 2
			case len(chain) - 1:
				p.Y -= h[v] / 2
			}
			pts = append(pts, p)
		}
		if L.flip[i] {
			slices.Reverse(pts)
		}
		// an edge and its opposite between neighbouring ranks would share one line: set them apart
		if len(chain) == 2 && opposite[[2]int{e.To, e.From}] {
			d := 7.0
			if e.From > e.To {
				d = -d
			}
			for k := range pts {
				pts[k].X += d
			}
		}
		res.Paths[i] = smooth(pts)
	}
	if opt.Direction == LeftRight {
		res.X, res.Y = res.Y, res.X
		res.Width, res.Height = res.Height, res.Width
		for _, p := range res.Paths {
			for k := range p {
				p[k].X, p[k].Y = p[k].Y, p[k].X
			}
		}
	}
	if keyOf != nil {
		res.order = map[string]float64{}
		for v, k := range keyOf {
			res.order[k] = float64(L.pos[v]) / float64(max(1, len(L.layers[L.rank[v]])))
		}
	}
	return res, nil
}

// smooth turns a polyline into cubic Bézier segments through its points (a Catmull-Rom spline:
// each segment's control points follow the tangent through the neighbouring points).
func smooth(pts []Point) []Point {
	if len(pts) < 2 {
		return pts
	}
	out := []Point{pts[0]}
	for i := 0; i+1 < len(pts); i++ {
		p0 := pts[max(0, i-1)]
		p1, p2 := pts[i], pts[i+1]
		p3 := pts[min(len(pts)-1, i+2)]
		c1 := Point{p1.X + (p2.X-p0.X)/6, p1.Y + (p2.Y-p0.Y)/6}
		c2 := Point{p2.X - (p3.X-p1.X)/6, p2.Y - (p3.Y-p1.Y)/6}
		out = append(out, c1, c2, p2)
	}
	return out
}
