package petri

import (
	"bufio"
	"encoding/xml"
	"errors"
	"fmt"
	"io"
	"strconv"
	"strings"
)

// ErrPNML is the cause of every error from ReadPNML.
var ErrPNML = errors.New("not a usable PNML net")

// PNML namespaces and net type of place/transition nets (ISO/IEC 15909-2:2011, the 2009 grammar).
const (
	pnmlNS     = "http://www.pnml.org/version-2009/grammar/pnml"
	ptnetType  = "http://www.pnml.org/version-2009/grammar/ptnet"
	toolName   = "Tracewright"
	toolFormat = "1"
)

type pnmlText struct {
	Text string `xml:"text"`
}

type pnmlNode struct {
	ID      string    `xml:"id,attr"`
	Name    *pnmlText `xml:"name"`
	Marking *pnmlText `xml:"initialMarking"`
}

type pnmlArc struct {
	ID          string    `xml:"id,attr"`
	Source      string    `xml:"source,attr"`
	Target      string    `xml:"target,attr"`
	Inscription *pnmlText `xml:"inscription"`
}

type pnmlPage struct {
	ID          string     `xml:"id,attr"`
	Places      []pnmlNode `xml:"place"`
	Transitions []pnmlNode `xml:"transition"`
	Arcs        []pnmlArc  `xml:"arc"`
	Pages       []pnmlPage `xml:"page"`
	RefPlaces   []struct{} `xml:"referencePlace"`
	RefTrans    []struct{} `xml:"referenceTransition"`
}

type pnmlFinal struct {
	Place  string `xml:"place,attr"`
	Tokens int    `xml:"tokens,attr"`
}

type pnmlTool struct {
	Tool    string      `xml:"tool,attr"`
	Version string      `xml:"version,attr"`
	Final   []pnmlFinal `xml:"finalMarking"`
}

type pnmlNet struct {
	ID    string     `xml:"id,attr"`
	Type  string     `xml:"type,attr"`
	Name  *pnmlText  `xml:"name"`
	Pages []pnmlPage `xml:"page"`
	Tools []pnmlTool `xml:"toolspecific"`
}

type pnmlDoc struct {
	XMLName xml.Name  `xml:"pnml"`
	Nets    []pnmlNet `xml:"net"`
}

// ReadPNML reads the first net of a PNML document. Places and transitions on nested pages are
// gathered into one net. A transition without a name, or with an empty one, is silent. The
// initial marking comes from the places' initialMarking; the final marking from our tool-specific
// element if the file has one, else it is one token in the sink place when the net has exactly
// one place without outgoing arcs (else none).
func ReadPNML(r io.Reader) (*Net, error) {
	var doc pnmlDoc
	d := xml.NewDecoder(bufio.NewReader(r))
	if err := d.Decode(&doc); err != nil {
		var se *xml.SyntaxError
		if errors.As(err, &se) {
			return nil, fmt.Errorf("%w: line %d: %s", ErrPNML, se.Line, se.Msg)
		}
		return nil, fmt.Errorf("%w: %w", ErrPNML, err)
	}
	if len(doc.Nets) == 0 {
		return nil, fmt.Errorf("%w: the document holds no <net>", ErrPNML)
	}
	pn := doc.Nets[0]
	if pn.Type != "" && !strings.Contains(pn.Type, "ptnet") {
		return nil, fmt.Errorf("%w: net type %q is not a place/transition net", ErrPNML, pn.Type)
	}
	n := &Net{ID: pn.ID}
	if pn.Name != nil {
		n.Name = pn.Name.Text
	}
	var places, trans []pnmlNode
	var arcs []pnmlArc
	var walk func([]pnmlPage) error
	walk = func(pages []pnmlPage) error {
		for _, pg := range pages {
			if len(pg.RefPlaces)+len(pg.RefTrans) > 0 {
				return fmt.Errorf("%w: reference places and transitions are not supported", ErrPNML)
			}
			places = append(places, pg.Places...)
			trans = append(trans, pg.Transitions...)
			arcs = append(arcs, pg.Arcs...)
			if err := walk(pg.Pages); err != nil {
				return err
			}
		}
		return nil
	}
	if err := walk(pn.Pages); err != nil {
		return nil, err
	}
	pidx, tidx := map[string]int{}, map[string]int{}
	initial := []int{}
	for _, p := range places {
		if _, dup := pidx[p.ID]; dup || p.ID == "" {
			return nil, fmt.Errorf("%w: place id %q is empty or repeated", ErrPNML, p.ID)
		}
		name := ""
		if p.Name != nil {
			name = p.Name.Text
		}
		pidx[p.ID] = n.AddPlace(p.ID, name)
		k := 0
		if p.Marking != nil && strings.TrimSpace(p.Marking.Text) != "" {
			v, err := strconv.Atoi(strings.TrimSpace(p.Marking.Text))
			if err != nil || v < 0 {
				return nil, fmt.Errorf("%w: place %s: initial marking %q is not a count", ErrPNML, p.ID, p.Marking.Text)
			}
			k = v
		}
		initial = append(initial, k)
	}
	for _, t := range trans {
		if _, dup := tidx[t.ID]; dup || t.ID == "" {
			return nil, fmt.Errorf("%w: transition id %q is empty or repeated", ErrPNML, t.ID)
		}
		if _, clash := pidx[t.ID]; clash {
			return nil, fmt.Errorf("%w: id %q names a place and a transition", ErrPNML, t.ID)
		}
		label := ""
		if t.Name != nil {
			label = strings.TrimSpace(t.Name.Text)
		}
		tidx[t.ID] = n.AddTransition(t.ID, label, nil, nil)
	}
	for _, a := range arcs {
		w := 1
		if a.Inscription != nil && strings.TrimSpace(a.Inscription.Text) != "" {
			v, err := strconv.Atoi(strings.TrimSpace(a.Inscription.Text))
			if err != nil || v < 1 {
				return nil, fmt.Errorf("%w: arc %s: weight %q", ErrPNML, a.ID, a.Inscription.Text)
			}
			w = v
		}
		sp, sIsP := pidx[a.Source]
		st, sIsT := tidx[a.Source]
		tp, tIsP := pidx[a.Target]
		tt, tIsT := tidx[a.Target]
		switch {
		case sIsP && tIsT:
			for k := 0; k < w; k++ {
				n.Transitions[tt].In = append(n.Transitions[tt].In, sp)
			}
		case sIsT && tIsP:
			for k := 0; k < w; k++ {
				n.Transitions[st].Out = append(n.Transitions[st].Out, tp)
			}
		default:
			return nil, fmt.Errorf("%w: arc %s must join a place and a transition (%q to %q)", ErrPNML, a.ID, a.Source, a.Target)
		}
	}
	n.Initial = Marking(initial)
	for _, tool := range pn.Tools {
		if tool.Tool == toolName && len(tool.Final) > 0 {
			n.Final = make(Marking, len(n.Places))
			for _, f := range tool.Final {
				p, ok := pidx[f.Place]
				if !ok {
					return nil, fmt.Errorf("%w: final marking names unknown place %q", ErrPNML, f.Place)
				}
				n.Final[p] += f.Tokens
			}
		}
	}
	if n.Final == nil {
		if sink := n.sinkPlace(); sink >= 0 {
			n.Final = n.Marking(sink)
		}
	}
	return n, nil
}

// WritePNML writes the net as a PNML place/transition net on one page. Silent transitions get no
// name; the final marking goes in a tool-specific element, which other tools skip.
func WritePNML(w io.Writer, n *Net) error {
	bw := bufio.NewWriter(w)
	esc := func(s string) string {
		var b strings.Builder
		xml.EscapeText(&b, []byte(s))
		return b.String()
	}
	id := n.ID
	if id == "" {
		id = "net1"
	}
	fmt.Fprintf(bw, "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n<pnml xmlns=\"%s\">\n  <net id=\"%s\" type=\"%s\">\n", pnmlNS, esc(id), ptnetType)
	if n.Name != "" {
		fmt.Fprintf(bw, "    <name><text>%s</text></name>\n", esc(n.Name))
	}
	fmt.Fprintf(bw, "    <page id=\"page1\">\n")
	for i, p := range n.Places {
		fmt.Fprintf(bw, "      <place id=\"%s\">", esc(p.ID))
		if p.Name != "" {
			fmt.Fprintf(bw, "<name><text>%s</text></name>", esc(p.Name))
		}
		if n.Initial != nil && n.Initial[i] > 0 {
			fmt.Fprintf(bw, "<initialMarking><text>%d</text></initialMarking>", n.Initial[i])
		}
		fmt.Fprintf(bw, "</place>\n")
	}
	for _, t := range n.Transitions {
		fmt.Fprintf(bw, "      <transition id=\"%s\">", esc(t.ID))
		if t.Label != "" {
			fmt.Fprintf(bw, "<name><text>%s</text></name>", esc(t.Label))
		}
		fmt.Fprintf(bw, "</transition>\n")
	}
	arc := 0
	writeArcs := func(from, to string, ps []int, placeFirst bool) {
		count := map[int]int{}
		var order []int
		for _, p := range ps {
			if count[p] == 0 {
				order = append(order, p)
			}
			count[p]++
		}
		for _, p := range order {
			arc++
			src, dst := n.Places[p].ID, to
			if !placeFirst {
				src, dst = from, n.Places[p].ID
			}
			fmt.Fprintf(bw, "      <arc id=\"a%d\" source=\"%s\" target=\"%s\">", arc, esc(src), esc(dst))
			if count[p] > 1 {
				fmt.Fprintf(bw, "<inscription><text>%d</text></inscription>", count[p])
			}
			fmt.Fprintf(bw, "</arc>\n")
		}
	}
	for _, t := range n.Transitions {
		writeArcs("", t.ID, t.In, true)
		writeArcs(t.ID, "", t.Out, false)
	}
	fmt.Fprintf(bw, "    </page>\n")
	if n.Final != nil {
		fmt.Fprintf(bw, "    <toolspecific tool=\"%s\" version=\"%s\">\n", toolName, toolFormat)
		for p, k := range n.Final {
			if k > 0 {
				fmt.Fprintf(bw, "      <finalMarking place=\"%s\" tokens=\"%d\"/>\n", esc(n.Places[p].ID), k)
			}
		}
		fmt.Fprintf(bw, "    </toolspecific>\n")
	}
	fmt.Fprintf(bw, "  </net>\n</pnml>\n")
	return bw.Flush()
}

// sinkPlace is the only place without outgoing arcs, or -1 when there is none or more than one.
func (n *Net) sinkPlace() int {
	hasOut := make([]bool, len(n.Places))
	for _, t := range n.Transitions {
		for _, p := range t.In {
			hasOut[p] = true
		}
	}
	sink := -1
	for p, out := range hasOut {
		if !out {
			if sink >= 0 {
				return -1
			}
			sink = p
		}
	}
	return sink
}
