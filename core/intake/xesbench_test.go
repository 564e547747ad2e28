package intake

import (
	"bytes"
	"context"
	"testing"

	"tracewright/core/synth"
)

// BenchmarkIntakeXES reads a generated XES log of about 300k events (start and complete
// events, four attributes each) from memory.
func BenchmarkIntakeXES(b *testing.B) {
	lg := synth.Generate(synth.Config{Seed: 4, Events: 300_000, Noise: 0.05, StartTimes: true, Shifts: true})
	var buf bytes.Buffer
	if err := lg.WriteXES(&buf); err != nil {
		b.Fatal(err)
	}
	data := buf.Bytes()
	b.SetBytes(int64(len(data)))
	b.ReportAllocs()
	events := 0
	for b.Loop() {
		l, _, err := Read(context.Background(), bytes.NewReader(data), Options{Size: int64(len(data))})
		if err != nil {
			b.Fatal(err)
		}
		events = l.NumEvents()
	}
	b.ReportMetric(float64(events)*float64(b.N)/b.Elapsed().Seconds(), "events/s")
}
