// Package bpmn writes process trees as BPMN 2.0 process diagrams (OMG, Business Process Model and
// Notation 2.0, formal/2011-01-03: the process elements of chapter 10 and the diagram interchange
// of chapter 12), so a discovered model can be opened in any BPMN modeller.
//
// The translation is block by block: an activity is a task; a sequence chains its parts; an
// exclusive choice and a parallel node become a diverging and a converging gateway of their kind
// around their parts; a loop is a converging exclusive gateway before the body and a diverging
// one after it, from which the redo part leads back; τ is a direct sequence flow. The diagram's
// shapes and waypoints come from package layout, left to right.
package bpmn

import (
	"bufio"
	"fmt"
	"html"
	"io"

	"tracewright/core/layout"
	"tracewright/core/tree"
)

const (
	modelNS = "http://www.omg.org/spec/BPMN/20100524/MODEL"
	diNS    = "http://www.omg.org/spec/BPMN/20100524/DI"
	dcNS    = "http://www.omg.org/spec/DD/20100524/DC"
	ddiNS   = "http://www.omg.org/spec/DD/20100524/DI"
)

// Kinds of flow nodes.
const (
	StartEvent = "startEvent"
	EndEvent   = "endEvent"
	Task       = "task"
	Exclusive  = "exclusiveGateway"
	Parallel   = "parallelGateway"
)

// Node is a flow node of the process.
type Node struct {
	ID, Kind, Name string
	Diverging      bool // for gateways
}

// Flow is a sequence flow.
type Flow struct{ ID, From, To string }

// Process is a BPMN process as flow nodes and sequence flows.
type Process struct {
	Nodes []Node
	Flows []Flow
}

type builder struct {
	p      Process
	nn, nf int
}

func (b *builder) node(kind, name string, diverging bool) string {
	b.nn++
	id := fmt.Sprintf("n%d", b.nn)
	b.p.Nodes = append(b.p.Nodes, Node{ID: id, Kind: kind, Name: name, Diverging: diverging})
	return id
}

func (b *builder) flow(from, to string) {
	b.nf++
	b.p.Flows = append(b.p.Flows, Flow{ID: fmt.Sprintf("f%d", b.nf), From: from, To: to})
}

// block translates t and returns its entry and exit nodes; "" for both means τ (no node).
func (b *builder) block(t *tree.Node) (string, string) {
	switch t.Op {
	case tree.Activity:
		id := b.node(Task, t.Label, false)
		return id, id
	case tree.Tau:
		return "", ""
	case tree.Seq:
		entry, exit := "", ""
		for _, c := range t.Children {
			in, out := b.block(c)
			if in == "" {
				continue
			}
			if exit != "" {
				b.flow(exit, in)
			} else {
				entry = in
			}
			exit = out
		}
		return entry, exit
	case tree.Xor, tree.And:
		kind := Exclusive
		if t.Op == tree.And {
			kind = Parallel
		}
		split, join := b.node(kind, "", true), b.node(kind, "", false)
		for _, c := range t.Children {
			in, out := b.block(c)
			if in == "" {
				b.flow(split, join)
				continue
			}
			b.flow(split, in)
			b.flow(out, join)
		}
		return split, join
	case tree.Loop:
		join, split := b.node(Exclusive, "", false), b.node(Exclusive, "", true)
		in, out := b.block(t.Children[0])
		if in == "" {
			b.flow(join, split)
		} else {
			b.flow(join, in)
			b.flow(out, split)
		}
		rin, rout := b.block(t.Children[1])
		if rin == "" {
			b.flow(split, join)
		} else {
			b.flow(split, rin)
			b.flow(rout, join)
		}
		return join, split
	}
	panic("bpmn: unknown process tree operator")
}

// FromTree translates a process tree into a BPMN process with one start and one end event.
func FromTree(t *tree.Node) Process {
	b := &builder{}
	start := b.node(StartEvent, "", false)
	in, out := b.block(t)
	end := b.node(EndEvent, "", false)
	if in == "" {
		b.flow(start, end)
	} else {
		b.flow(start, in)
		b.flow(out, end)
	}
	return b.p
}

func size(n Node) (w, h float64) {
	switch n.Kind {
	case Task:
		return 110, 60
	case StartEvent, EndEvent:
		return 36, 36
	}
	return 50, 50
}

// Write writes the process as a BPMN 2.0 XML document with its diagram.
func Write(w io.Writer, p Process, name string) error {
	idx := map[string]int{}
	g := layout.Graph{}
	for i, n := range p.Nodes {
		idx[n.ID] = i
		wd, ht := size(n)
		g.Width = append(g.Width, wd)
		g.Height = append(g.Height, ht)
	}
	for _, f := range p.Flows {
		g.Edges = append(g.Edges, layout.Edge{From: idx[f.From], To: idx[f.To], Weight: 1})
	}
	res, err := layout.Layout(g, layout.Options{Direction: layout.LeftRight, NodeSep: 30, RankSep: 50})
	if err != nil {
		return err
	}
	bw := bufio.NewWriter(w)
	e := html.EscapeString
	fmt.Fprintf(bw, "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n<definitions xmlns=\"%s\" xmlns:bpmndi=\"%s\" xmlns:dc=\"%s\" xmlns:di=\"%s\" id=\"definitions\" targetNamespace=\"urn:tracewright:model\">\n", modelNS, diNS, dcNS, ddiNS)
	fmt.Fprintf(bw, "  <process id=\"process\" name=\"%s\" isExecutable=\"false\">\n", e(name))
	for _, n := range p.Nodes {
		attrs := ""
		if n.Name != "" {
			attrs += fmt.Sprintf(" name=\"%s\"", e(n.Name))
		}
		if n.Kind == Exclusive || n.Kind == Parallel {
			dir := "Converging"
			if n.Diverging {
				dir = "Diverging"
			}
			attrs += fmt.Sprintf(" gatewayDirection=\"%s\"", dir)
		}
		fmt.Fprintf(bw, "    <%s id=\"%s\"%s/>\n", n.Kind, n.ID, attrs)
	}
	for _, f := range p.Flows {
		fmt.Fprintf(bw, "    <sequenceFlow id=\"%s\" sourceRef=\"%s\" targetRef=\"%s\"/>\n", f.ID, f.From, f.To)
	}
	fmt.Fprintf(bw, "  </process>\n  <bpmndi:BPMNDiagram id=\"diagram\">\n    <bpmndi:BPMNPlane id=\"plane\" bpmnElement=\"process\">\n")
	for i, n := range p.Nodes {
		wd, ht := size(n)
		fmt.Fprintf(bw, "      <bpmndi:BPMNShape id=\"%s_di\" bpmnElement=\"%s\"><dc:Bounds x=\"%.0f\" y=\"%.0f\" width=\"%.0f\" height=\"%.0f\"/></bpmndi:BPMNShape>\n",
			n.ID, n.ID, res.X[i]-wd/2, res.Y[i]-ht/2, wd, ht)
	}
	for i, f := range p.Flows {
		fmt.Fprintf(bw, "      <bpmndi:BPMNEdge id=\"%s_di\" bpmnElement=\"%s\">", f.ID, f.ID)
		path := res.Paths[i]
		for k := 0; k < len(path); k += 3 { // the curve's end points, without its control points
			fmt.Fprintf(bw, "<di:waypoint x=\"%.0f\" y=\"%.0f\"/>", path[k].X, path[k].Y)
		}
		fmt.Fprintf(bw, "</bpmndi:BPMNEdge>\n")
	}
	fmt.Fprintf(bw, "    </bpmndi:BPMNPlane>\n  </bpmndi:BPMNDiagram>\n</definitions>\n")
	return bw.Flush()
}
