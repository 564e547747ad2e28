package overview

import (
	"bytes"
	"context"
	"testing"

	"tracewright/core/intake"
	"tracewright/core/synth"
)

// BenchmarkOverview is the overview of the 1M-event log that the page's benchmark reads.
func BenchmarkOverview(b *testing.B) {
	lg := synth.Generate(synth.Config{Seed: 42, Events: 1_000_000, Noise: 0.05, Shifts: true})
	var buf bytes.Buffer
	if err := lg.WriteCSV(&buf, synth.Shuffled); err != nil {
		b.Fatal(err)
	}
	l, _, err := intake.Read(context.Background(), &buf, intake.Options{})
	if err != nil {
		b.Fatal(err)
	}
	for b.Loop() {
		Of(l, Options{})
	}
}
