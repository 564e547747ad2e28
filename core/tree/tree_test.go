package tree

import (
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func TestParseAndString(t *testing.T) {
	for _, s := range []string{
		"→(a, ↺(→(∧(×(b, c), d), e), f), ×(g, h))",
		"×(τ, a)",
		"a",
	} {
		n, err := Parse(s)
		require.NoError(t, err)
		assert.Equal(t, s, n.String())
	}
	n, err := Parse("seq(a, seq(b, c), loop(d, tau))")
	require.NoError(t, err)
	assert.Equal(t, "→(a, b, c, ↺(d, τ))", n.String(), "nested sequences flatten")
	for _, bad := range []string{"→(a", "→()", "foo(a)", "↺(a)", "→(a) b"} {
		_, err := Parse(bad)
		assert.Error(t, err, bad)
	}
}

func TestCanonical(t *testing.T) {
	a, _ := Parse("×(h, g, ∧(d, ×(c, b)))")
	assert.Equal(t, "×(g, h, ∧(d, ×(b, c)))", a.Canonical().String())
}

// TestLanguage works small languages out by hand from the operators' semantics (van der Aalst,
// Process Mining, 2nd ed. 2016, section 3.2.8).
func TestLanguage(t *testing.T) {
	for _, tc := range []struct {
		tree  string
		loops int
		want  []string
	}{
		{"→(a, ×(b, c), d)", 0, []string{"a,b,d", "a,c,d"}},
		{"∧(a, →(b, c))", 0, []string{"a,b,c", "b,a,c", "b,c,a"}},
		{"↺(a, b)", 2, []string{"a", "a,b,a", "a,b,a,b,a"}},
		{"×(τ, a)", 0, []string{"", "a"}},
	} {
		n, err := Parse(tc.tree)
		require.NoError(t, err)
		assert.Equal(t, tc.want, n.Language(tc.loops), tc.tree)
	}
}

// FuzzParse reads any text as a process tree: it never panics, and a tree it reads, written
// out, reads back as the same tree (String is a fixed point after one round).
func FuzzParse(f *testing.F) {
	for _, s := range []string{"→(a, ↺(→(∧(×(b, c), d), e), f), ×(g, h))", "×(τ, a)", "a", "seq(a, seq(b, c), loop(d, tau))", "↺(a)", "→(a"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		n, err := Parse(s)
		if err != nil {
			return
		}
		text := n.String()
		again, err := Parse(text)
		if err != nil {
			t.Fatalf("%q read as %q, which does not read back: %v", s, text, err)
		}
		if again.String() != text {
			t.Fatalf("%q: %q then %q", s, text, again.String())
		}
	})
}
