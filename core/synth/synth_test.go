package synth

import (
	"bytes"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func TestDeterministic(t *testing.T) {
	cfg := Config{Seed: 7, Events: 2000, Noise: 0.1, StartTimes: true, Shifts: true}
	var a, b bytes.Buffer
	require.NoError(t, Generate(cfg).WriteCSV(&a, ByTime))
	require.NoError(t, Generate(cfg).WriteCSV(&b, ByTime))
	assert.Equal(t, a.Bytes(), b.Bytes())
}

// TestTracesFollowTheModel checks, on a noise-free log, that every finished case is a word of the
// process tree in the package doc (checked by a hand-written recogniser of that language).
func TestTracesFollowTheModel(t *testing.T) {
	lg := Generate(Config{Seed: 3, Events: 5000, StartTimes: true})
	for _, c := range lg.Cases {
		if c.Running {
			continue
		}
		assert.True(t, inLanguage(c.Activity), "%s: %v", c.ID, c.Activity)
	}
}

func inLanguage(tr []string) bool {
	n := func(a int) string { return Activities[a].Name }
	if len(tr) < 4 || tr[0] != n(Register) || tr[1] != n(Inspect) {
		return false
	}
	rest := tr[2:]
	if rest[0] == n(Reject) {
		return len(rest) == 2 && rest[1] == n(Return)
	}
	if len(rest) < 7 {
		return false
	}
	// the four parallel steps: each branch in its own order, interleaved in any way
	par := rest[:4]
	pos := map[string]int{}
	for i, a := range par {
		pos[a] = i + 1
	}
	if pos[n(Order)] == 0 || pos[n(Receive)] < pos[n(Order)] || pos[n(Quote)] == 0 || pos[n(Approve)] < pos[n(Quote)] {
		return false
	}
	rest = rest[4:]
	if rest[0] != n(Repair) || rest[1] != n(Test) || rest[len(rest)-1] != n(Handover) {
		return false
	}
	loop := rest[2 : len(rest)-1]
	for i := 0; i < len(loop); i += 2 {
		if i+1 >= len(loop) || loop[i] != n(Adjust) || loop[i+1] != n(Test) {
			return false
		}
	}
	return true
}

func TestShifts(t *testing.T) {
	mon := time.Date(2025, 1, 6, 7, 30, 0, 0, time.UTC).Unix()
	assert.Equal(t, time.Date(2025, 1, 6, 8, 0, 0, 0, time.UTC).Unix(), nextShift(mon, shiftOffice))
	fri := time.Date(2025, 1, 10, 17, 0, 0, 0, time.UTC).Unix()
	assert.Equal(t, time.Date(2025, 1, 13, 8, 0, 0, 0, time.UTC).Unix(), nextShift(fri, shiftOffice), "Friday evening waits for Monday")
	assert.Equal(t, time.Date(2025, 1, 11, 6, 0, 0, 0, time.UTC).Unix(), nextShift(fri, shiftEarly), "the early shift works Saturdays")
}

func TestTruthCounts(t *testing.T) {
	lg := Generate(Config{Seed: 11, Events: 10000, Noise: 0.2, StartTimes: false})
	tr := lg.Truth(false)
	assert.Equal(t, len(lg.Instances), tr.Events)
	assert.Greater(t, tr.NoisyCases, 0)
	assert.Greater(t, tr.RunningCases, 0)
	assert.LessOrEqual(t, tr.Activities, int(numActivities))
}
