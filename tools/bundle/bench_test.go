//go:build !js

package main

import (
	"bytes"
	"context"
	"net/http"
	"net/http/httptest"
	"net/url"
	"os"
	"os/exec"
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

		// a first read as a user makes it: the page left to settle, the file dropped, a look at
		// the columns (during which the engine reads the file and makes memory ready; wasm/main.go),
		// then Read
		ctx2, _ := browser(b)
		if err := chromedp.Do(ctx2, chromedp.Navigate("file://"+html), chromedp.WaitVisible(chromedp.CSS(`body[data-engine="ready"]`)),
			chromedp.Sleep(2*time.Second), chromedp.SetUploadFiles(chromedp.CSS(`#file-input`), []string{csv}),
			chromedp.WaitVisible(chromedp.CSS(`#mapping`)), chromedp.Sleep(lookAtColumns)); err != nil {
			b.Fatal(err)
		}
		read3 := time.Now()
		if err := chromedp.Do(ctx2, chromedp.Click(chromedp.CSS(`#read-button`)), quietWait(`#overview[data-ready="true"]`)); err != nil {
			b.Fatal(err)
		}
		readTime3 := time.Since(read3)
		b.ReportMetric(float64(readTime3.Milliseconds()), "read-after-look-ms")
		b.ReportMetric(float64(readTime3)/float64(native1), "after-look-wasm/native-1core")
	}
}

// lookAtColumns is how long the benchmark's user looks at the guessed columns before reading.
const lookAtColumns = 3 * time.Second

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

// BenchmarkIntakeInChromium runs core/intake's BenchmarkIntakeCSV at 1M events (the same
// generated log as BenchmarkPage's, its bytes in memory: no file, no page, no progress) compiled
// for wasm in a worker of headless chromium, the same compiled for wasm under node, and natively
// on one core, one after the other in the same run. It measures the engine's computing apart
// from what the page adds to it (reading and copying the file, progress, the overview drawn),
// which is the difference between BenchmarkPage's warm read and this.
func BenchmarkIntakeInChromium(b *testing.B) {
	const bench = "IntakeCSV/events=1000000$"
	args := []string{"-test.run=^$", "-test.bench=" + bench, "-test.benchtime=5x"}
	gobin := filepath.Join(runtime.GOROOT(), "bin", "go")
	dir := b.TempDir()
	build := func(out string, env ...string) {
		cmd := exec.Command(gobin, "test", "-c", "-o", out, "../../core/intake")
		cmd.Env = append(os.Environ(), env...)
		if msg, err := cmd.CombinedOutput(); err != nil {
			b.Fatalf("building the intake benchmark: %v\n%s", err, msg)
		}
	}
	build(filepath.Join(dir, "intake.wasm"), "GOOS=js", "GOARCH=wasm")
	build(filepath.Join(dir, "intake.native"))
	wasmExec, err := os.ReadFile(filepath.Join(runtime.GOROOT(), "lib", "wasm", "wasm_exec.js"))
	if err != nil {
		b.Fatal(err)
	}
	for name, text := range map[string]string{"wasm_exec.js": string(wasmExec), "index.html": harnessPage, "worker.js": harnessWorker} {
		if err := os.WriteFile(filepath.Join(dir, name), []byte(text), 0o644); err != nil {
			b.Fatal(err)
		}
	}
	nsPerOp := func(out string) float64 {
		for _, line := range strings.Split(out, "\n") {
			f := strings.Fields(line)
			if len(f) >= 4 && strings.HasPrefix(f[0], "BenchmarkIntakeCSV/events=1000000") && f[3] == "ns/op" {
				v, _ := strconv.ParseFloat(f[2], 64)
				return v
			}
		}
		b.Fatalf("no result in the benchmark's output:\n%s", out)
		return 0
	}
	for b.Loop() {
		cmd := exec.Command(filepath.Join(dir, "intake.native"), args...)
		cmd.Env = append(os.Environ(), "GOMAXPROCS=1")
		out, err := cmd.CombinedOutput()
		if err != nil {
			b.Fatalf("%v\n%s", err, out)
		}
		native := nsPerOp(string(out))

		cmd = exec.Command(filepath.Join(runtime.GOROOT(), "lib", "wasm", "go_js_wasm_exec"), append([]string{filepath.Join(dir, "intake.wasm")}, args...)...)
		cmd.Dir = filepath.Join(runtime.GOROOT(), "..") // any directory; the benchmark reads no file
		if out, err = cmd.CombinedOutput(); err != nil {
			b.Fatalf("%v\n%s", err, out)
		}
		node := nsPerOp(string(out))

		srv := httptest.NewServer(http.FileServer(http.Dir(dir)))
		ctx, _ := browser(b)
		if err := chromedp.Do(ctx, chromedp.Navigate(srv.URL+"/index.html?args="+url.QueryEscape(strings.Join(args, " ")))); err != nil {
			b.Fatal(err)
		}
		text, err := chromedp.Run(ctx, quietWaitText(`#out[data-done]`))
		srv.Close()
		if err != nil {
			b.Fatal(err)
		}
		chromium := nsPerOp(text)
		b.ReportMetric(native/1e6, "native-1core-ms")
		b.ReportMetric(node/1e6, "node-ms")
		b.ReportMetric(chromium/1e6, "chromium-worker-ms")
		b.ReportMetric(node/native, "node/native")
		b.ReportMetric(chromium/native, "chromium/native")
	}
}

// quietWaitText is quietWait that returns the element's text.
func quietWaitText(selector string) chromedp.Action[string] {
	return chromedp.Evaluate[string](`new Promise((resolve) => {
		const check = () => { const e = document.querySelector(`+strconv.Quote(selector)+`); if (e) resolve(e.textContent); else setTimeout(check, 100); };
		check();
	})`, chromedp.EvalAwaitPromise)
}

// harnessPage runs a Go test binary compiled for wasm in a worker, with the arguments in the
// query, and writes its output into #out, marked data-done at the end.
const harnessPage = `<!doctype html><html><body><pre id="out"></pre><script>
const out = document.getElementById('out');
const w = new Worker('worker.js');
w.onmessage = (e) => { if (e.data === null) out.dataset.done = 'true'; else out.textContent += e.data; };
w.postMessage(new URLSearchParams(location.search).get('args').split(' '));
</script></body></html>`

const harnessWorker = `importScripts('wasm_exec.js');
onmessage = async (e) => {
  const decoder = new TextDecoder();
  globalThis.fs.writeSync = (fd, buf) => { postMessage(decoder.decode(buf)); return buf.length; };
  const go = new Go();
  go.argv = ['intake.wasm', ...e.data];
  go.exit = () => postMessage(null);
  const { instance } = await WebAssembly.instantiateStreaming(fetch('intake.wasm'), go.importObject);
  await go.run(instance);
};`
