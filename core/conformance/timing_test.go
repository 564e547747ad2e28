package conformance

import (
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"tracewright/core/eventlog"
	"tracewright/core/intake"
	"tracewright/core/internal/logtest"
)

func readCSV(t *testing.T, text string) *eventlog.Log {
	return logtest.FromCSV(t, text, intake.Options{})
}

// TestTimeOnModelByHand: on a → ∧(b, c) → d, one case with starts and completions (minutes):
// a 0–10, b 15–30, c 40–45, d 50–60. Worked by hand with the firing rules of TimeOnModel: the
// initial token is made at 0; a is enabled at 0 (waiting 0, service 10, sojourn 10); the split
// fires at 10, so b and c are enabled at 10: b waits 5, serves 15, sojourn 20; c waits 30,
// serves 5, sojourn 35; the join fires when its last token arrives, at 45; d waits 5, serves 10,
// sojourn 15. Tokens waited 0 before a, 5 before b, 30 before c and 5 before d.
func TestTimeOnModelByHand(t *testing.T) {
	l := readCSV(t, `case,activity,time,lifecycle
1,a,2024-01-01T00:00:00Z,start
1,a,2024-01-01T00:10:00Z,complete
1,b,2024-01-01T00:15:00Z,start
1,b,2024-01-01T00:30:00Z,complete
1,c,2024-01-01T00:40:00Z,start
1,c,2024-01-01T00:45:00Z,complete
1,d,2024-01-01T00:50:00Z,start
1,d,2024-01-01T01:00:00Z,complete
`)
	n := netOf(t, "→(a, ∧(b, c), d)")
	res, err := AlignLog(l, n, Costs{}, Bound{States: 1000})
	require.NoError(t, err)
	tm := TimeOnModel(l, n, res)
	require.True(t, tm.HasStart)
	want := map[string][3]float64{"a": {0, 10, 10}, "b": {5, 15, 20}, "c": {30, 5, 35}, "d": {5, 10, 15}} // waiting, service, sojourn
	for _, tt := range tm.Transitions {
		w := want[tt.Activity]
		assert.Equal(t, w[0]*60, tt.Waiting.Median, "waiting at %s", tt.Activity)
		assert.Equal(t, w[1]*60, tt.Service.Median, "service at %s", tt.Activity)
		assert.Equal(t, w[2]*60, tt.Sojourn.Median, "sojourn at %s", tt.Activity)
	}
	var waits []float64
	for p, pt := range tm.Places {
		for _, tr := range n.Transitions {
			if !tr.Silent() && len(tr.In) == 1 && tr.In[0] == p {
				waits = append(waits, pt.Wait.Median/60)
			}
		}
	}
	assert.ElementsMatch(t, []float64{0, 5, 30, 5}, waits)
	assert.Equal(t, 1, tm.Fitting.N)
	assert.Equal(t, 3600.0, tm.Fitting.Median)
}

// TestTimeOnModelWithoutStarts: completions only, and b skipped: ⟨a 0, c 20, d 50⟩ (minutes).
// The skipped b fires as soon as it is enabled (at 0, a's completion), so the join waits for c
// alone: c's sojourn is 20 and d's 30 (worked by hand). The case deviates: 50 minutes.
func TestTimeOnModelWithoutStarts(t *testing.T) {
	l := readCSV(t, `case,activity,time
1,a,2024-01-01T00:00:00Z
1,c,2024-01-01T00:20:00Z
1,d,2024-01-01T00:50:00Z
2,a,2024-01-01T00:00:00Z
2,x,2024-01-01T00:05:00Z
`)
	n := netOf(t, "→(a, ∧(b, c), d)")
	res, err := AlignLog(l, n, Costs{}, Bound{States: 1000})
	require.NoError(t, err)
	tm := TimeOnModel(l, n, res)
	require.False(t, tm.HasStart)
	got := map[string]float64{}
	for _, tt := range tm.Transitions {
		got[tt.Activity] = tt.Sojourn.Median / 60
		assert.Zero(t, tt.Waiting.N)
	}
	assert.Equal(t, map[string]float64{"a": 0, "b": 0, "c": 20, "d": 30}, got)
	assert.Equal(t, 0, tm.Fitting.N)
	assert.Equal(t, 2, tm.Deviating.N)
	assert.Equal(t, []int32{0, 1}, res.CaseSet(false))
	assert.Empty(t, res.CaseSet(true))
}
