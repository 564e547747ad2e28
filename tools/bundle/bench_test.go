//go:build !js

package main

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/chromedp/chromedp"

	"tracewright/core/intake"
	"tracewright/core/overview"
	"tracewright/core/synth"
)

// BenchmarkPage measures the page as a user meets it, in headless chromium: from navigation to
// the engine being ready, and a generated 1M-event CSV (rows in random order) from the drop to
// the overview, with the peak memory of the browser's processes; and, in the same run, the same
// file read natively, for the wasm/native ratio. It is a measurement, not a test: it reports
// figures and asserts nothing about time.
func BenchmarkPage(b *testing.B) {
	html := builtPage(b)
	lg := synth.Generate(synth.Config{Seed: 42, Events: 1_000_000, Noise: 0.05, Shifts: true})
	var buf bytes.Buffer
	if err := lg.WriteCSV(&buf, synth.Shuffled); err != nil {
		b.Fatal(err)
	}
	csv := filepath.Join(b.TempDir(), "big.csv")
	if err := os.WriteFile(csv, buf.Bytes(), 0o644); err != nil {
		b.Fatal(err)
	}

	// native, same file, same run: the best of three, on all cores and on one
	nativeRead := func() time.Duration {
		var best time.Duration
		for i := 0; i < 3; i++ {
			start := time.Now()
			f, _ := os.Open(csv)
			l, _, err := intake.Read(context.Background(), f, intake.Options{Size: int64(buf.Len())})
			f.Close()
			if err != nil {
				b.Fatal(err)
			}
			overview.Of(l, overview.Options{})
			if d := time.Since(start); i == 0 || d < best {
				best = d
			}
		}
		return best
	}
	native := nativeRead()
	prev := runtime.GOMAXPROCS(1)
	native1 := nativeRead()
	runtime.GOMAXPROCS(prev)

	for b.Loop() {
		ctx, rl := browser(b)
		profile := rl.profile
		start := time.Now()
		if err := chromedp.Do(ctx, chromedp.Navigate("file://"+html), chromedp.WaitVisible(chromedp.CSS(`body[data-engine="ready"]`))); err != nil {
			b.Fatal(err)
		}
		ready := time.Since(start)
		navReady, _ := chromedp.Run(ctx, chromedp.Evaluate[float64](`performance.now()`))
		base := rssOf(profile)
		peak := base
		stop := make(chan struct{})
		var wg sync.WaitGroup
		wg.Go(func() {
			for {
				select {
				case <-stop:
					return
				case <-time.After(50 * time.Millisecond):
					peak = max(peak, rssOf(profile))
				}
			}
		})
		dropped := time.Now()
		if err := chromedp.Do(ctx, chromedp.SetUploadFiles(chromedp.CSS(`#file-input`), []string{csv}), chromedp.WaitVisible(chromedp.CSS(`#mapping`))); err != nil {
			b.Fatal(err)
		}
		sniffed := time.Since(dropped)
		read := time.Now()
		if err := chromedp.Do(ctx, chromedp.Click(chromedp.CSS(`#read-button`)), quietWait(`#overview[data-ready="true"]`)); err != nil {
			b.Fatal(err)
		}
		readTime := time.Since(read)
		// a second read of the same file, with the engine warm
		if err := chromedp.Do(ctx, chromedp.Click(chromedp.CSS(`#again-button`)), chromedp.WaitVisible(chromedp.CSS(`#start`)),
			chromedp.SetUploadFiles(chromedp.CSS(`#file-input`), []string{csv}), chromedp.WaitVisible(chromedp.CSS(`#mapping`))); err != nil {
			b.Fatal(err)
		}
		read2 := time.Now()
		if err := chromedp.Do(ctx, chromedp.Click(chromedp.CSS(`#read-button`)), quietWait(`#overview[data-ready="true"]`)); err != nil {
			b.Fatal(err)
		}
		readTime2 := time.Since(read2)
		b.ReportMetric(float64(readTime2.Milliseconds()), "second-read-ms")
		close(stop)
		wg.Wait()
		got := metrics(b, ctx)
		b.ReportMetric(float64(ready.Milliseconds()), "ready-ms")
		b.ReportMetric(navReady, "nav-to-ready-ms")
		b.ReportMetric(float64(sniffed.Milliseconds()), "drop-to-columns-ms")
		b.ReportMetric(float64(readTime.Milliseconds()), "read-to-overview-ms")
		b.ReportMetric(float64(native.Milliseconds()), "native-ms")
		b.ReportMetric(float64(readTime)/float64(native), "wasm/native")
		b.ReportMetric(float64(native1.Milliseconds()), "native-1core-ms")
		b.ReportMetric(float64(readTime2)/float64(native1), "warm-wasm/native-1core")
		b.ReportMetric(float64(peak-base)/(1<<20), "peak-extra-MB")
		b.Logf("events %s, file %d MB, browser RSS %d MB before and %d MB at peak", got["events"], buf.Len()>>20, base>>20, peak>>20)
	}
}

// quietWait waits inside the page, which checks every 20 ms, for an element to match selector.
// chromedp's WaitVisible asks the page over the DevTools protocol every 5 ms, and on a machine of
// two cores those queries and the test process answering them took CPU from the engine being
// measured.
func quietWait(selector string) chromedp.Action[chromedp.Void] {
	return chromedp.Func(func(ctx context.Context, _ *chromedp.Target) error {
		_, err := chromedp.Run(ctx, chromedp.Evaluate[bool](`new Promise((resolve) => {
			const check = () => document.querySelector(`+strconv.Quote(selector)+`) ? resolve(true) : setTimeout(check, 20);
			check();
		})`, chromedp.EvalAwaitPromise))
		return err
	})
}

type proc struct {
	pid string
	cmd string
}

func procs() []proc {
	var out []proc
	ents, _ := os.ReadDir("/proc")
	for _, e := range ents {
		if _, err := strconv.Atoi(e.Name()); err != nil {
			continue
		}
		cmd, err := os.ReadFile(filepath.Join("/proc", e.Name(), "cmdline"))
		if err != nil || !bytes.Contains(cmd, []byte("chromium")) {
			continue
		}
		out = append(out, proc{pid: e.Name(), cmd: string(cmd)})
	}
	return out
}

// rssOf sums the resident memory of the chromium processes started with the profile.
func rssOf(profile string) int64 {
	var total int64
	for _, p := range procs() {
		if profile != "" && !strings.Contains(p.cmd, profile) {
			continue
		}
		status, err := os.ReadFile(filepath.Join("/proc", p.pid, "status"))
		if err != nil {
			continue
		}
		for _, line := range strings.Split(string(status), "\n") {
			if strings.HasPrefix(line, "VmRSS:") {
				f := strings.Fields(line)
				if len(f) >= 2 {
					kb, _ := strconv.ParseInt(f[1], 10, 64)
					total += kb << 10
				}
			}
		}
	}
	return total
}
