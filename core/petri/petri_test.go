package petri

import (
	"bytes"
	"errors"
	"flag"
	"os"
	"slices"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"tracewright/core/tree"
)

var update = flag.Bool("update", false, "rewrite golden files")

func mustTree(t *testing.T, s string) *tree.Node {
	n, err := tree.Parse(s)
	require.NoError(t, err)
	return n
}

// language lists the visible traces of complete firing sequences up to maxLen visible steps,
// allowing at most 8 silent steps in a row.
func language(n *Net, maxLen int) []string {
	var out []string
	seen := map[string]bool{}
	var walk func(m Marking, trace []string, silent int)
	walk = func(m Marking, trace []string, silent int) {
		if n.Final != nil && m.Equal(n.Final) {
			k := strings.Join(trace, ",")
			if !seen[k] {
				seen[k] = true
				out = append(out, k)
			}
		}
		for _, t := range n.EnabledSet(m) {
			tr := n.Transitions[t]
			if tr.Silent() {
				if silent < 8 {
					walk(n.Fire(m, t), trace, silent+1)
				}
			} else if len(trace) < maxLen {
				walk(n.Fire(m, t), append(slices.Clone(trace), tr.Label), 0)
			}
		}
	}
	walk(n.Initial, nil, 0)
	slices.Sort(out)
	return out
}

func treeLanguage(n *tree.Node, maxLen int) []string {
	var out []string
	for _, s := range n.Language(maxLen) {
		if s == "" || len(strings.Split(s, ",")) <= maxLen {
			out = append(out, s)
		}
	}
	return out
}

// TestFromTree: the translation is a sound workflow net with the tree's language (bounded),
// on the operators one by one and on the running example of Tax, Sidorova and van der Aalst (2019).
func TestFromTree(t *testing.T) {
	for _, s := range []string{
		"a", "→(a, b, c)", "×(a, b, τ)", "∧(a, →(b, c))", "↺(a, b)", "↺(→(a, b), τ)",
		"→(a, ↺(→(∧(×(b, c), d), e), f), ×(g, h))",
	} {
		t.Run(s, func(t *testing.T) {
			tr := mustTree(t, s)
			n := FromTree(tr)
			require.NoError(t, n.Sound(100000))
			assert.Equal(t, treeLanguage(tr, 7), language(n, 7))
		})
	}
}

func TestFiring(t *testing.T) {
	n := &Net{}
	p, q, r := n.AddPlace("p", ""), n.AddPlace("q", ""), n.AddPlace("r", "")
	n.AddTransition("t", "a", []int{p, q}, []int{r})
	m := n.Marking(p)
	assert.Empty(t, n.EnabledSet(m), "t needs a token in q too")
	m = n.Marking(p, q)
	assert.Equal(t, []int{0}, n.EnabledSet(m))
	assert.Equal(t, Marking{0, 0, 1}, n.Fire(m, 0))
	assert.Panics(t, func() { n.Fire(n.Marking(p), 0) })
}

// TestSoundnessFailures builds nets that break each condition of soundness (van der Aalst 1997,
// definition of a sound workflow net) and checks the reason given.
func TestSoundnessFailures(t *testing.T) {
	build := func(arcs string) *Net {
		// arcs: "i>a a>o ..." place names start with a lowercase p-like letter set below
		n := &Net{}
		places, trans := map[string]int{}, map[string]int{}
		node := func(name string, isPlace bool) int {
			if isPlace {
				if i, ok := places[name]; ok {
					return i
				}
				places[name] = n.AddPlace(name, "")
				return places[name]
			}
			if i, ok := trans[name]; ok {
				return i
			}
			trans[name] = n.AddTransition(name, strings.ToUpper(name), nil, nil)
			return trans[name]
		}
		for _, a := range strings.Fields(arcs) {
			parts := strings.Split(a, ">")
			if strings.HasPrefix(parts[0], "P") {
				ti := node(parts[1], false)
				n.Transitions[ti].In = append(n.Transitions[ti].In, node(parts[0], true))
			} else {
				ti := node(parts[0], false)
				n.Transitions[ti].Out = append(n.Transitions[ti].Out, node(parts[1], true))
			}
		}
		return n
	}
	for _, tc := range []struct {
		name string
		arcs string
		want error
	}{
		{"sound", "Pi>a a>Po", nil},
		{"two sinks", "Pi>a a>Po a>Pq", ErrNoSink},
		{"no source", "Pi>a a>Po Po>b b>Pi", ErrNoSource},
		{"dangling", "Pi>a a>Po Pi>b b>Px Px>c c>Py", ErrNoSink},
		{"unbounded", "Pi>a a>Pm Pm>b b>Pm b>Pk Pm>c c>Po Pk>d d>Po", ErrUnbounded},
		{"dead transition", "Pi>a a>Pp Pi>b b>Pq Pp>c c>Po Pq>d d>Po Pp>e Pq>e e>Po", ErrDead},
		{"improper completion", "Pi>a a>Pm a>Pk Pm>b b>Po Pk>c c>Po", ErrImproper},
	} {
		t.Run(tc.name, func(t *testing.T) {
			err := build(tc.arcs).Sound(10000)
			if tc.want == nil {
				assert.NoError(t, err)
				return
			}
			assert.True(t, errors.Is(err, tc.want), "got %v", err)
		})
	}
}

func TestReadPNML(t *testing.T) {
	f, err := os.Open("testdata/hand.pnml")
	require.NoError(t, err)
	defer f.Close()
	n, err := ReadPNML(f)
	require.NoError(t, err)
	assert.Equal(t, "hand", n.Name)
	require.Len(t, n.Places, 3)
	require.Len(t, n.Transitions, 3)
	assert.Equal(t, "register & check", n.Transitions[0].Label)
	assert.True(t, n.Transitions[1].Silent(), "no name: silent")
	assert.True(t, n.Transitions[2].Silent(), "empty name: silent")
	assert.Equal(t, []int{1, 1}, n.Transitions[0].Out, "weight 2 is two arcs")
	assert.Equal(t, Marking{1, 0, 0}, n.Initial)
	assert.Equal(t, Marking{0, 0, 1}, n.Final, "no final marking given: the sink place")
}

// TestPNMLRoundTrip writes the running example's net, compares with the golden file
// (testdata/running-example.pnml, rewritten with -update), and reads it back to the same net.
func TestPNMLRoundTrip(t *testing.T) {
	n := FromTree(mustTree(t, "→(a, ↺(→(∧(×(b, c), d), e), f), ×(g, h))"))
	n.Name = "running example"
	var out bytes.Buffer
	require.NoError(t, WritePNML(&out, n))
	golden := "testdata/running-example.pnml"
	if *update {
		require.NoError(t, os.WriteFile(golden, out.Bytes(), 0o644))
	}
	want, err := os.ReadFile(golden)
	require.NoError(t, err)
	assert.Equal(t, string(want), out.String())
	back, err := ReadPNML(bytes.NewReader(out.Bytes()))
	require.NoError(t, err)
	assert.Equal(t, n.Places, back.Places)
	assert.Equal(t, n.Transitions, back.Transitions)
	assert.Equal(t, n.Initial, back.Initial)
	assert.Equal(t, n.Final, back.Final)
	var again bytes.Buffer
	require.NoError(t, WritePNML(&again, back))
	assert.Equal(t, out.String(), again.String())
}

func TestPNMLErrors(t *testing.T) {
	for _, tc := range []struct{ in, msg string }{
		{"<pnml><net id='n'><page id='p'><place id='a'/><place id='a'/></page></net></pnml>", "repeated"},
		{"<pnml><net id='n'><page id='p'><place id='a'/><arc id='x' source='a' target='a'/></page></net></pnml>", "must join a place and a transition"},
		{"<pnml><net id='n' type='http://example/coloured'></net></pnml>", "not a place/transition net"},
		{"<pnml><net id='n'><page id='p'><place id='a'>", "line 1"},
		{"<pnml></pnml>", "no <net>"},
	} {
		_, err := ReadPNML(strings.NewReader(tc.in))
		require.ErrorIs(t, err, ErrPNML, tc.in)
		assert.Contains(t, err.Error(), tc.msg)
	}
}

func TestDOTEscapes(t *testing.T) {
	n := &Net{Name: "x"}
	p := n.AddPlace("p1", "")
	n.AddTransition("t1", `<script>alert("1")</script>`, []int{p}, nil)
	var b bytes.Buffer
	require.NoError(t, WriteDOT(&b, n))
	assert.Contains(t, b.String(), `label="<script>alert(\"1\")</script>"`)
}

func FuzzReadPNML(f *testing.F) {
	seed, _ := os.ReadFile("testdata/hand.pnml")
	f.Add(string(seed))
	f.Fuzz(func(t *testing.T, in string) {
		n, err := ReadPNML(strings.NewReader(in))
		if err != nil {
			return
		}
		var out bytes.Buffer
		require.NoError(t, WritePNML(&out, n))
		back, err := ReadPNML(bytes.NewReader(out.Bytes()))
		require.NoError(t, err, out.String())
		assert.Equal(t, len(n.Places), len(back.Places))
		assert.Equal(t, len(n.Transitions), len(back.Transitions))
	})
}
