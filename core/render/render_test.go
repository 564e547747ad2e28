package render

import (
	"context"
	"encoding/xml"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"tracewright/core/dfg"
	"tracewright/core/intake"
	"tracewright/core/petri"
	"tracewright/core/tree"
)

// wellFormed parses the SVG with encoding/xml: every label must have been escaped.
func wellFormed(t *testing.T, svg string) {
	t.Helper()
	d := xml.NewDecoder(strings.NewReader(svg))
	for {
		_, err := d.Token()
		if err == io.EOF {
			return
		}
		require.NoError(t, err, svg)
	}
}

func TestHostileLabelsAreText(t *testing.T) {
	csv := "case,activity,time\n1,<script>alert(1)</script>,2024-01-01T00:00:00Z\n1,a & b,2024-01-01T01:00:00Z\n1,\"q\"\"uote\",2024-01-01T02:00:00Z\n"
	l, _, err := intake.Read(context.Background(), strings.NewReader(csv), intake.Options{})
	require.NoError(t, err)
	for _, mode := range []Mode{Counts, Durations} {
		svg, _, err := DFG(dfg.Build(l, dfg.Options{}), DFGOptions{Mode: mode})
		require.NoError(t, err)
		wellFormed(t, svg)
		assert.NotContains(t, svg, "<script>")
		assert.Contains(t, svg, "&lt;script&gt;alert(1)&lt;/script&gt;")
		assert.Contains(t, svg, "a &amp; b")
	}
	tr, _ := tree.Parse("→(a, ×(b, τ))")
	tr.Children[0].Label = "<b>&"
	svg, _, err := ProcessTree(tr)
	require.NoError(t, err)
	wellFormed(t, svg)
	assert.Contains(t, svg, "&lt;b&gt;&amp;")
	svg, _, err = PetriNet(petri.FromTree(tr))
	require.NoError(t, err)
	wellFormed(t, svg)
	assert.Contains(t, svg, `class="transition silent"`)
}

// TestRampsFallInLightness: both ramps must get darker steadily (relative luminance, WCAG 2.1
// definition), which is what keeps them readable under colour vision deficiencies.
func TestRampsFallInLightness(t *testing.T) {
	for _, r := range []Ramp{CountRamp, DurationRamp} {
		prev := 2.0
		for k := 0; k <= 10; k++ {
			c := r.At(float64(k) / 10)
			l := luminance(c)
			assert.Less(t, l, prev, c)
			prev = l
		}
	}
}

func luminance(hex string) float64 {
	var rgb [3]float64
	for i := range rgb {
		var v int
		for _, ch := range hex[1+2*i : 3+2*i] {
			v *= 16
			switch {
			case ch >= '0' && ch <= '9':
				v += int(ch - '0')
			default:
				v += int(ch-'a') + 10
			}
		}
		c := float64(v) / 255
		if c <= 0.03928 {
			rgb[i] = c / 12.92
		} else {
			rgb[i] = math.Pow((c+0.055)/1.055, 2.4)
		}
	}
	return 0.2126*rgb[0] + 0.7152*rgb[1] + 0.0722*rgb[2]
}

// TestDemoDrawings writes the demo log's graph and model to $TRACEWRIGHT_SHOTS for a look.
func TestDemoDrawings(t *testing.T) {
	f, err := os.Open("../../testdata/workshop.csv")
	require.NoError(t, err)
	defer f.Close()
	l, _, err := intake.Read(context.Background(), f, intake.Options{})
	require.NoError(t, err)
	svg, _, err := DFG(dfg.Build(l, dfg.Options{Activities: 1, Edges: 0.8}), DFGOptions{})
	require.NoError(t, err)
	wellFormed(t, svg)
	if dir := os.Getenv("TRACEWRIGHT_SHOTS"); dir != "" {
		require.NoError(t, os.WriteFile(filepath.Join(dir, "demo-dfg.svg"), []byte(svg), 0o644))
	}
}
