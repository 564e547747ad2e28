package bpmn

import (
	"bytes"
	"encoding/xml"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"tracewright/core/tree"
)

func count(p Process, kind string) int {
	n := 0
	for _, x := range p.Nodes {
		if x.Kind == kind {
			n++
		}
	}
	return n
}

// TestRunningExample translates →(a, ↺(→(∧(×(b, c), d), e), f), ×(g, h)) (Tax, Sidorova and van
// der Aalst 2019) and checks the elements by hand: 8 tasks; the loop's 2 exclusive gateways, the
// two choices' 4, the parallel node's 2; every node on a path from start to end.
func TestRunningExample(t *testing.T) {
	tr, err := tree.Parse("→(a, ↺(→(∧(×(b, c), d), e), f), ×(g, h))")
	require.NoError(t, err)
	p := FromTree(tr)
	assert.Equal(t, 8, count(p, Task))
	assert.Equal(t, 6, count(p, Exclusive))
	assert.Equal(t, 2, count(p, Parallel))
	assert.Equal(t, 1, count(p, StartEvent))
	assert.Equal(t, 1, count(p, EndEvent))
	succ := map[string][]string{}
	pred := map[string][]string{}
	for _, f := range p.Flows {
		succ[f.From] = append(succ[f.From], f.To)
		pred[f.To] = append(pred[f.To], f.From)
	}
	reach := func(from string, next map[string][]string) map[string]bool {
		seen := map[string]bool{from: true}
		stack := []string{from}
		for len(stack) > 0 {
			v := stack[len(stack)-1]
			stack = stack[:len(stack)-1]
			for _, w := range next[v] {
				if !seen[w] {
					seen[w] = true
					stack = append(stack, w)
				}
			}
		}
		return seen
	}
	fwd, bwd := reach(p.Nodes[0].ID, succ), reach(p.Nodes[len(p.Nodes)-1].ID, pred)
	for _, n := range p.Nodes {
		assert.True(t, fwd[n.ID] && bwd[n.ID], "%s %s is off the path from start to end", n.Kind, n.ID)
	}
	var out bytes.Buffer
	require.NoError(t, Write(&out, p, "running example"))
	// well-formed, with one shape per node and one edge per flow (BPMN 2.0 DI, chapter 12)
	var doc struct {
		Process struct {
			Tasks []struct {
				Name string `xml:"name,attr"`
			} `xml:"task"`
			Flows []struct{} `xml:"sequenceFlow"`
		} `xml:"process"`
		Diagram struct {
			Plane struct {
				Shapes []struct{} `xml:"BPMNShape"`
				Edges  []struct{} `xml:"BPMNEdge"`
			} `xml:"BPMNPlane"`
		} `xml:"BPMNDiagram"`
	}
	require.NoError(t, xml.Unmarshal(out.Bytes(), &doc))
	assert.Len(t, doc.Process.Tasks, 8)
	assert.Len(t, doc.Process.Flows, len(p.Flows))
	assert.Len(t, doc.Diagram.Plane.Shapes, len(p.Nodes))
	assert.Len(t, doc.Diagram.Plane.Edges, len(p.Flows))
}

func TestSilentAndEscaping(t *testing.T) {
	tr, _ := tree.Parse("×(τ, a)")
	tr.Children[1].Label = `a & "b" <c>`
	p := FromTree(tr)
	var out bytes.Buffer
	require.NoError(t, Write(&out, p, "x"))
	assert.Contains(t, out.String(), `name="a &amp; &#34;b&#34; &lt;c&gt;"`)
	var any struct{}
	require.NoError(t, xml.Unmarshal(out.Bytes(), &any))
	// τ in a choice is a flow straight from the split to the join
	direct := false
	for _, f := range p.Flows {
		if f.From == "n2" && f.To == "n3" {
			direct = true
		}
	}
	assert.True(t, direct)
	only, _ := tree.Parse("τ")
	assert.Len(t, FromTree(only).Flows, 1, "τ alone: start straight to end")
}
