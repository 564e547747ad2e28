package intake

import (
	"bytes"
	"context"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"tracewright/core/overview"
	"tracewright/core/synth"
)

// TestGeneratedLogsMatchTheirTruth reads generated logs (property test with known ground truth:
// package synth records every case's true trace) as CSV in shuffled row order and as XES, with
// and without start times, and checks cases, events, activities, variants and every trace.
func TestGeneratedLogsMatchTheirTruth(t *testing.T) {
	for _, cfg := range []synth.Config{
		{Seed: 1, Events: 4000, Noise: 0.1, StartTimes: true, Shifts: true},
		{Seed: 2, Events: 4000, Noise: 0.3, StartTimes: false, Shifts: false},
		{Seed: 3, Events: 800, Noise: 0, StartTimes: true, Shifts: false},
	} {
		lg := synth.Generate(cfg)
		truth := lg.Truth(true)
		var csvBuf, xesBuf bytes.Buffer
		require.NoError(t, lg.WriteCSV(&csvBuf, synth.Shuffled))
		require.NoError(t, lg.WriteXES(&xesBuf))
		for name, data := range map[string][]byte{"csv": csvBuf.Bytes(), "xes": xesBuf.Bytes()} {
			t.Run(name, func(t *testing.T) {
				l, rep, err := Read(context.Background(), bytes.NewReader(data), Options{})
				require.NoError(t, err)
				assert.Equal(t, name, rep.Format)
				o := overview.Of(l, overview.Options{})
				assert.Equal(t, truth.Cases, o.Cases)
				assert.Equal(t, truth.Events, o.Events)
				assert.Equal(t, truth.Instances, o.Instances)
				assert.Equal(t, truth.Activities, o.Activities)
				assert.Equal(t, truth.Variants, o.Variants)
				assert.Equal(t, truth.Resources, o.Resources)
				got := traces(l)
				for _, c := range truth.CaseDetail {
					if !assert.Equal(t, strings.Join(c.Activity, ","), got[c.ID], "case %s", c.ID) {
						break
					}
				}
				for _, a := range o.ActivityCounts {
					assert.Equal(t, truth.ActivityCounts[a.Name], a.Instances, a.Name)
				}
			})
		}
	}
}
