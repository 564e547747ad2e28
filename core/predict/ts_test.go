package predict

import (
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"tracewright/core/eventlog"
	"tracewright/core/intake"
	"tracewright/core/internal/logtest"
)

func read(t *testing.T, csv string) *eventlog.Log {
	t.Helper()
	return logtest.FromCSV(t, csv, intake.Options{CSV: intake.CSVOptions{TimeFormat: "epoch-s",
		Mapping: intake.Mapping{Case: "case", Activity: "activity", Time: "time"}}})
}

// key is the state of a prefix as a string, for comparing states.
func (c Config) key(acts []int32, attr string, horizon int) string {
	return string(c.appendKey(nil, acts, attr, horizon))
}

func all(l *eventlog.Log) []int {
	var cs []int
	for c := 0; c < l.NumCases(); c++ {
		cs = append(cs, c)
	}
	return cs
}

func ids(t *testing.T, l *eventlog.Log, names ...string) []int32 {
	var out []int32
	for _, n := range names {
		id, ok := l.Activities.Lookup(n)
		require.True(t, ok, n)
		out = append(out, id)
	}
	return out
}

// TestPaperExample works the annotation definitions of van der Aalst, Schonenberg and Song (2011,
// section 4) by hand: c1 = a@0, b@2, c@5 and c2 = a@0, c@4 (times in seconds here). Under the set
// abstraction state {a} is reached after a in both cases, with remaining times 5 and 4 (mean and
// median 4.5) and sojourn times 2 and 4 (mean 3).
func TestPaperExample(t *testing.T) {
	l := read(t, "case,activity,time\n1,a,1000000000\n1,b,1000000002\n1,c,1000000005\n2,a,1000000000\n2,c,1000000004\n")
	s, err := Build(l, all(l), Config{Abstraction: Set}, nil)
	require.NoError(t, err)
	p := s.Predict(ids(t, l, "a"), "")
	assert.Equal(t, 4.5, p.MeanSeconds)
	assert.Equal(t, 4.5, p.MedianSeconds)
	assert.Equal(t, 3.0, p.SojournMean)
	assert.Equal(t, map[string]float64{"b": 0.5, "c": 0.5}, p.Next)
	assert.False(t, p.Fallback)
}

// TestAbstractionsDiffer: the prefixes ⟨a,b,a⟩ and ⟨a,a,b⟩ are two states as sequences, one as
// multisets ({a², b}); as sets they are the state of ⟨a,b⟩ too ({a, b}) (paper, section 4.1).
func TestAbstractionsDiffer(t *testing.T) {
	l := read(t, "case,activity,time\n1,a,1000000000\n1,b,1000000001\n1,a,1000000002\n1,x,1000000010\n2,a,1000000000\n2,a,1000000001\n2,b,1000000002\n2,x,1000000020\n3,a,1000000000\n3,b,1000000001\n3,x,1000000030\n")
	aba, aab, ab := ids(t, l, "a", "b", "a"), ids(t, l, "a", "a", "b"), ids(t, l, "a", "b")
	for _, tc := range []struct {
		abs        Abstraction
		sameAbaAab bool
		sameAbaAb  bool
	}{{Sequence, false, false}, {Multiset, true, false}, {Set, true, true}} {
		c := Config{Abstraction: tc.abs}
		assert.Equal(t, tc.sameAbaAab, c.key(aba, "", 0) == c.key(aab, "", 0), tc.abs)
		assert.Equal(t, tc.sameAbaAb, c.key(aba, "", 0) == c.key(ab, "", 0), tc.abs)
	}
	// with horizon 1 only the last activity counts
	c := Config{Horizon: 1}
	assert.Equal(t, c.key(aba, "", 1), c.key(ids(t, l, "b", "a"), "", 1))
	s, err := Build(l, all(l), Config{Abstraction: Multiset}, nil)
	require.NoError(t, err)
	p := s.Predict(aab, "")
	assert.Equal(t, 2, p.Support, "{a², b} was reached in cases 1 and 2")
}

func TestFallback(t *testing.T) {
	l := read(t, "case,activity,time\n1,a,1000000000\n1,b,1000000010\n2,c,1000000000\n2,b,1000000020\n")
	s, err := Build(l, all(l), Config{}, nil)
	require.NoError(t, err)
	p := s.Predict(ids(t, l, "a", "c", "b"), "") // never seen as a whole; its last two, c then b, were
	assert.True(t, p.Fallback)
	assert.Equal(t, 2, p.Horizon)
	assert.Equal(t, 0.0, p.MeanSeconds, "b always ended its case")
}

func TestOutcomes(t *testing.T) {
	for _, tc := range []struct{ in, want string }{
		{"ends:Hand over bike", "ends with Hand over bike"},
		{"contains:Adjust repair", "contains Adjust repair"},
		{"longer:10d", "takes longer than 240h0m0s"},
		{"longer:36h", "takes longer than 36h0m0s"},
	} {
		o, err := ParseOutcome(tc.in)
		require.NoError(t, err)
		assert.Equal(t, tc.want, o.String())
	}
	for _, bad := range []string{"ends", "soon:x", "longer:-1h", "longer:abc"} {
		_, err := ParseOutcome(bad)
		assert.Error(t, err, bad)
	}
}
