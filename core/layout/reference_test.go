//go:build !js

package layout

import (
	"bytes"
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/goccy/go-graphviz"
)

// Graphviz's dot (through go-graphviz, Graphviz compiled to WebAssembly and run by wazero) is the
// reference drawing. Both drawings get the same node sizes and spacing (dot's defaults: boxes of
// 0.75 by 0.5 inch, nodesep 0.25 inch, ranksep 0.5 inch, in points), and both are measured the
// same way: edge curves flattened to polylines, crossings counted between segments of different
// edges that share no end node, lengths summed.

func dotText(g Graph) string {
	var b strings.Builder
	b.WriteString("digraph G {\n node [shape=box, fixedsize=true, width=0.75, height=0.5];\n")
	for v := range g.Width {
		fmt.Fprintf(&b, " n%d;\n", v)
	}
	for _, e := range g.Edges {
		fmt.Fprintf(&b, " n%d -> n%d [weight=%d];\n", e.From, e.To, max(1, e.Weight))
	}
	b.WriteString("}\n")
	return b.String()
}

var (
	nodePos = regexp.MustCompile(`(?m)^\s*n(\d+)\s*\[[^\]]*?pos="([-\d.]+),([-\d.]+)"`)
	edgePos = regexp.MustCompile(`(?ms)^\s*n(\d+)\s*->\s*n(\d+)\s*\[[^\]]*?pos="([^"]+)"`)
)

// dotLayout returns dot's node centres and edge curves (as Bézier control points).
func dotLayout(gv *graphviz.Graphviz, g Graph) ([]Point, map[[2]int][][]Point, error) {
	ctx := context.Background()
	graph, err := graphviz.ParseBytes([]byte(dotText(g)))
	if err != nil {
		return nil, nil, err
	}
	defer graph.Close()
	var buf bytes.Buffer
	if err := gv.Render(ctx, graph, "dot", &buf); err != nil {
		return nil, nil, err
	}
	text := strings.ReplaceAll(buf.String(), "\\\n", "")
	nodes := make([]Point, len(g.Width))
	for _, m := range nodePos.FindAllStringSubmatch(text, -1) {
		v, _ := strconv.Atoi(m[1])
		x, _ := strconv.ParseFloat(m[2], 64)
		y, _ := strconv.ParseFloat(m[3], 64)
		nodes[v] = Point{x, -y}
	}
	edges := map[[2]int][][]Point{}
	for _, m := range edgePos.FindAllStringSubmatch(text, -1) {
		a, _ := strconv.Atoi(m[1])
		b, _ := strconv.Atoi(m[2])
		var pts []Point
		for _, f := range strings.Fields(m[3]) {
			if strings.HasPrefix(f, "e,") || strings.HasPrefix(f, "s,") {
				continue // arrowhead ends
			}
			xy := strings.Split(f, ",")
			x, _ := strconv.ParseFloat(xy[0], 64)
			y, _ := strconv.ParseFloat(xy[1], 64)
			pts = append(pts, Point{x, -y})
		}
		edges[[2]int{a, b}] = append(edges[[2]int{a, b}], pts)
	}
	return nodes, edges, nil
}

// flatten samples a piecewise cubic Bézier (P0, then three points per segment).
func flatten(c []Point) []Point {
	if len(c) < 4 {
		return c
	}
	out := []Point{c[0]}
	for i := 0; i+3 < len(c); i += 3 {
		p0, p1, p2, p3 := c[i], c[i+1], c[i+2], c[i+3]
		for k := 1; k <= 8; k++ {
			t := float64(k) / 8
			u := 1 - t
			out = append(out, Point{
				u*u*u*p0.X + 3*u*u*t*p1.X + 3*u*t*t*p2.X + t*t*t*p3.X,
				u*u*u*p0.Y + 3*u*u*t*p1.Y + 3*u*t*t*p2.Y + t*t*t*p3.Y,
			})
		}
	}
	return out
}

type polyEdge struct {
	from, to int
	pts      []Point
}

func segmentsCross(a, b, c, d Point) bool {
	o := func(p, q, r Point) float64 { return (q.X-p.X)*(r.Y-p.Y) - (q.Y-p.Y)*(r.X-p.X) }
	d1, d2, d3, d4 := o(c, d, a), o(c, d, b), o(a, b, c), o(a, b, d)
	return ((d1 > 0 && d2 < 0) || (d1 < 0 && d2 > 0)) && ((d3 > 0 && d4 < 0) || (d3 < 0 && d4 > 0))
}

// measure counts crossings between edges that share no end node, and sums edge lengths.
func measure(es []polyEdge) (crossings int, length float64) {
	for _, e := range es {
		for k := 1; k < len(e.pts); k++ {
			length += math.Hypot(e.pts[k].X-e.pts[k-1].X, e.pts[k].Y-e.pts[k-1].Y)
		}
	}
	for i := range es {
		for j := i + 1; j < len(es); j++ {
			a, b := es[i], es[j]
			if a.from == b.from || a.from == b.to || a.to == b.from || a.to == b.to {
				continue
			}
			crossed := false
			for p := 1; p < len(a.pts) && !crossed; p++ {
				for q := 1; q < len(b.pts); q++ {
					if segmentsCross(a.pts[p-1], a.pts[p], b.pts[q-1], b.pts[q]) {
						crossed = true
						break
					}
				}
			}
			if crossed {
				crossings++
			}
		}
	}
	return crossings, length
}

func ourEdges(g Graph, res *Result) []polyEdge {
	var out []polyEdge
	for i, e := range g.Edges {
		out = append(out, polyEdge{e.From, e.To, flatten(res.Paths[i])})
	}
	return out
}

func dotEdges(edges map[[2]int][][]Point) []polyEdge {
	var out []polyEdge
	for k, cs := range edges {
		for _, c := range cs {
			out = append(out, polyEdge{k[0], k[1], flatten(c)})
		}
	}
	return out
}

// BenchmarkAgainstDot lays out directly-follows-like graphs of 20, 50, 100 and 200 nodes with our
// engine and with dot in the same run, and reports time, crossings and total edge length of each
// and the share of graphs where we cross no more than dot.
func BenchmarkAgainstDot(b *testing.B) {
	gv, err := graphviz.New(context.Background())
	if err != nil {
		b.Fatal(err)
	}
	defer gv.Close()
	for _, n := range []int{20, 50, 100, 200} {
		b.Run(fmt.Sprintf("nodes=%d", n), func(b *testing.B) {
			r := rand.New(rand.NewPCG(uint64(n), 99))
			const graphs = 10
			var ours, dots time.Duration
			var oc, dc int
			var ol, dl float64
			notWorse := 0
			for b.Loop() {
				oc, dc, ol, dl, notWorse = 0, 0, 0, 0, 0
				ours, dots = 0, 0
				for k := 0; k < graphs; k++ {
					g := directlyFollowsLike(r, n)
					t0 := time.Now()
					res, err := Layout(g, Options{NodeSep: dotNodeSep, RankSep: dotRankSep})
					ours += time.Since(t0)
					if err != nil {
						b.Fatal(err)
					}
					t1 := time.Now()
					_, de, err := dotLayout(gv, g)
					dots += time.Since(t1)
					if err != nil {
						b.Fatal(err)
					}
					c1, l1 := measure(ourEdges(g, res))
					c2, l2 := measure(dotEdges(de))
					oc, dc, ol, dl = oc+c1, dc+c2, ol+l1, dl+l2
					if c1 <= c2 {
						notWorse++
					}
				}
			}
			b.ReportMetric(float64(ours.Microseconds())/graphs/1000, "ours-ms/graph")
			b.ReportMetric(float64(dots.Microseconds())/graphs/1000, "dot-ms/graph")
			b.ReportMetric(float64(oc)/graphs, "ours-crossings")
			b.ReportMetric(float64(dc)/graphs, "dot-crossings")
			b.ReportMetric(ol/dl, "length-ratio")
			b.ReportMetric(float64(notWorse)/graphs, "share-not-worse")
		})
	}
}
