package discovery

import (
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func l1() Log {
	var ts []string
	for i := 0; i < 3; i++ {
		ts = append(ts, "a,b,c,d")
	}
	ts = append(ts, "a,c,b,d", "a,c,b,d", "a,e,d")
	return traces(ts...)
}

// TestAlphaFootprintL1: the footprint of L1 = [⟨a,b,c,d⟩³, ⟨a,c,b,d⟩², ⟨a,e,d⟩] as tabulated by van
// der Aalst (Process Mining, 2011, Table 5.1; values from memory of the book).
func TestAlphaFootprintL1(t *testing.T) {
	f := FootprintOf(l1())
	// rows and columns in the order a, b, c, d, e (first appearance in the log)
	want := strings.Join([]string{
		"a # → → # →",
		"b ← # ∥ → #",
		"c ← ∥ # → #",
		"d # ← ← # ←",
		"e ← # # → #",
	}, "\n") + "\n"
	assert.Equal(t, want, f.String())
}

// TestAlphaPlacesL1: alpha's places for L1 (same source, section 5.2): ({a},{b,e}), ({a},{c,e}),
// ({b,e},{d}), ({c,e},{d}), with the source place before a and the sink place after d.
func TestAlphaPlacesL1(t *testing.T) {
	net, err := Alpha(l1())
	require.NoError(t, err)
	assert.Equal(t, []string{"a", "b", "c", "d", "e"}, net.Transitions)
	assert.Equal(t, []AlphaPlace{
		{Out: []string{"a"}},
		{In: []string{"a"}, Out: []string{"b", "e"}},
		{In: []string{"a"}, Out: []string{"c", "e"}},
		{In: []string{"b", "e"}, Out: []string{"d"}},
		{In: []string{"c", "e"}, Out: []string{"d"}},
		{In: []string{"d"}},
	}, net.Places)
}

// TestAlphaNetIsSound: for L1 the alpha net is a sound workflow net (Process Mining, 2011,
// section 5.2, from memory: L1 is one of the book's examples where alpha succeeds).
func TestAlphaNetIsSound(t *testing.T) {
	net, err := Alpha(l1())
	require.NoError(t, err)
	assert.NoError(t, net.PetriNet().Sound(10000))
}
