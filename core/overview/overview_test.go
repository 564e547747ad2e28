package overview

import (
	"context"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"tracewright/core/intake"
)

// TestOverviewByHand checks every figure on a log small enough to count by hand.
func TestOverviewByHand(t *testing.T) {
	const in = `case,activity,time,resource
1,a,2024-01-01T00:00:00Z,r1
1,b,2024-01-01T01:00:00Z,r2
1,c,2024-01-01T03:00:00Z,r1
2,a,2024-01-02T00:00:00Z,r1
2,c,2024-01-02T00:30:00Z,
3,a,2024-01-03T00:00:00Z,r2
3,b,2024-01-03T02:00:00Z,r2
3,c,2024-01-03T03:00:00Z,r2
`
	l, _, err := intake.Read(context.Background(), strings.NewReader(in), intake.Options{})
	require.NoError(t, err)
	o := Of(l, Options{Bins: 3})
	assert.Equal(t, 3, o.Cases)
	assert.Equal(t, 8, o.Events)
	assert.Equal(t, 3, o.Activities)
	assert.Equal(t, 2, o.Variants) // <a,b,c> twice, <a,c> once
	assert.Equal(t, 2, o.Resources)
	assert.Equal(t, "2024-01-01T00:00:00Z", o.First)
	assert.Equal(t, "2024-01-03T03:00:00Z", o.Last)
	assert.Equal(t, float64(2*86400+3*3600), o.SpanSeconds)
	// durations 3h, 0.5h, 3h: sorted 1800, 10800, 10800 s; median 10800; mean 7800
	assert.Equal(t, 10800.0, o.CaseDuration.Median)
	assert.Equal(t, 7800.0, o.CaseDuration.Mean)
	assert.Equal(t, 1800.0, o.CaseDuration.Min)
	// events per case 3, 2, 3: P25 by definition 7 of Hyndman and Fan: h = 2*0.25 = 0.5 -> 2.5
	assert.Equal(t, 2.5, o.EventsPerCase.P25)
	assert.Equal(t, []Count{{Name: "a", Events: 3, Cases: 3}}, o.StartActivities)
	assert.Equal(t, []Count{{Name: "c", Events: 3, Cases: 3}}, o.EndActivities)
	assert.Equal(t, []Count{{"a", 3, 3, 3}, {"c", 3, 3, 3}, {"b", 2, 2, 2}}, o.ActivityCounts)
	assert.Equal(t, []Count{{Name: "r2", Events: 4, Cases: 2}, {Name: "r1", Events: 3, Cases: 2}}, o.ResourceCounts)
	require.Len(t, o.TopVariants, 2)
	assert.Equal(t, []string{"a", "b", "c"}, o.TopVariants[0].Activities)
	assert.InDelta(t, 2.0/3, o.TopVariants[0].Share, 1e-12)
	assert.Equal(t, 1.0, o.VariantsCoverage)
	// three bins over [1800, 10800]: width 3000
	assert.Equal(t, 1, o.DurationBins[0].Count)
	assert.Equal(t, 2, o.DurationBins[2].Count)
}
