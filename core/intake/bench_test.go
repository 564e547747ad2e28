package intake

import (
	"bytes"
	"context"
	"encoding/csv"
	"fmt"
	"io"
	"runtime"
	"sync"
	"testing"

	"tracewright/core/synth"
)

var benchLogs sync.Map // events -> []byte

// benchCSV is a generated log of about n events (one row each), rows in random order: the
// hardest order for grouping by case.
func benchCSV(b *testing.B, n int) []byte {
	if v, ok := benchLogs.Load(n); ok {
		return v.([]byte)
	}
	lg := synth.Generate(synth.Config{Seed: 42, Events: n, Noise: 0.05, Shifts: true})
	var buf bytes.Buffer
	if err := lg.WriteCSV(&buf, synth.Shuffled); err != nil {
		b.Fatal(err)
	}
	benchLogs.Store(n, buf.Bytes())
	return buf.Bytes()
}

var sizes = []int{10_000, 100_000, 1_000_000}

// BenchmarkIntakeCSV is the full intake: sniff, parse, intern, timestamps, grouping by case,
// ordering, instances, variants, attribute typing. It reports events/s and, for the built Log,
// column bytes per event (the target is 40) and dictionary bytes.
func BenchmarkIntakeCSV(b *testing.B) {
	for _, n := range sizes {
		data := benchCSV(b, n)
		b.Run(fmt.Sprintf("events=%d", n), func(b *testing.B) {
			b.SetBytes(int64(len(data)))
			b.ReportAllocs()
			var events, cols, dicts int
			for b.Loop() {
				l, _, err := Read(context.Background(), bytes.NewReader(data), Options{Size: int64(len(data))})
				if err != nil {
					b.Fatal(err)
				}
				events = l.NumEvents()
				cols, dicts = l.MemoryBytes()
			}
			b.ReportMetric(float64(events)*float64(b.N)/b.Elapsed().Seconds(), "events/s")
			b.ReportMetric(float64(cols)/float64(events), "colbytes/event")
			b.ReportMetric(float64(dicts)/float64(events), "dictbytes/event")
		})
	}
}

// BenchmarkEncodingCSV is the reference: encoding/csv from the standard library reading the same
// bytes into records with ReuseRecord, and nothing else.
func BenchmarkEncodingCSV(b *testing.B) {
	for _, n := range sizes {
		data := benchCSV(b, n)
		b.Run(fmt.Sprintf("events=%d", n), func(b *testing.B) {
			b.SetBytes(int64(len(data)))
			b.ReportAllocs()
			rows := 0
			for b.Loop() {
				r := csv.NewReader(bytes.NewReader(data))
				r.ReuseRecord = true
				rows = 0
				for {
					_, err := r.Read()
					if err == io.EOF {
						break
					}
					if err != nil {
						b.Fatal(err)
					}
					rows++
				}
			}
			b.ReportMetric(float64(rows)*float64(b.N)/b.Elapsed().Seconds(), "events/s")
		})
	}
}

// BenchmarkRecords is our splitter alone on the same bytes, to show where intake time goes.
func BenchmarkRecords(b *testing.B) {
	data := benchCSV(b, 1_000_000)
	b.SetBytes(int64(len(data)))
	for b.Loop() {
		rr := newRecords(context.Background(), bytes.NewReader(data), ',', 4<<20)
		for {
			fs, err := rr.next()
			if err != nil {
				b.Fatal(err)
			}
			if fs == nil {
				break
			}
		}
	}
}

// BenchmarkIntakeMemory measures the heap a built 1M-event Log keeps (runtime.MemStats after a
// collection, the Log alive) and the peak heap while reading, per event.
func BenchmarkIntakeMemory(b *testing.B) {
	data := benchCSV(b, 1_000_000)
	for b.Loop() {
		var before, after runtime.MemStats
		runtime.GC()
		runtime.ReadMemStats(&before)
		l, _, err := Read(context.Background(), bytes.NewReader(data), Options{Size: int64(len(data))})
		if err != nil {
			b.Fatal(err)
		}
		runtime.ReadMemStats(&after)
		peak := after.TotalAlloc - before.TotalAlloc
		runtime.GC()
		runtime.ReadMemStats(&after)
		kept := int64(after.HeapAlloc) - int64(before.HeapAlloc)
		n := float64(l.NumEvents())
		b.ReportMetric(float64(kept)/n, "heapbytes/event")
		b.ReportMetric(float64(peak)/n, "allocbytes/event")
		runtime.KeepAlive(l)
	}
}
