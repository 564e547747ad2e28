//go:build !js

package main

import (
	"compress/gzip"
	"context"
	"encoding/json"
	"fmt"
	"net"
	"net/http"
	"net/http/httptest"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	"github.com/chromedp/cdproto/network"
	"github.com/chromedp/cdproto/runtime"
	"github.com/chromedp/chromedp"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"tracewright/core/synth"
)

const chromiumPath = "/usr/bin/chromium"

// page is built once for all browser tests.
var page struct {
	once sync.Once
	dir  string
	err  error
}

func builtPage(t testing.TB) string {
	t.Helper()
	page.once.Do(func() {
		page.dir, page.err = os.MkdirTemp("", "tracewright-page-")
		if page.err == nil {
			_, _, page.err = run("../..", filepath.Join(page.dir, "tracewright.html"), "testdata/workshop.csv", 3_000_000)
		}
	})
	require.NoError(t, page.err)
	return filepath.Join(page.dir, "tracewright.html")
}

// browser starts Debian's chromium headless with everything that would call home switched off,
// and a fresh profile. Outside CI the test skips when there is no chromium; in CI it must run.
func browser(t testing.TB) (context.Context, *requestLog) {
	t.Helper()
	if _, err := os.Stat(chromiumPath); err != nil {
		if os.Getenv("CI") != "" {
			t.Fatalf("CI needs %s for the browser tests (.ci/run installs it)", chromiumPath)
		}
		t.Skipf("no browser at %s: browser tests skipped (apt-get install chromium)", chromiumPath)
	}
	profile := t.TempDir()
	require.NoError(t, os.MkdirAll(filepath.Join(profile, "Default"), 0o755))
	require.NoError(t, os.WriteFile(filepath.Join(profile, "Default", "Preferences"), []byte(`{"net":{"network_prediction_options":2}}`), 0o644))
	opts := append(chromedp.DefaultExecAllocatorOptions[:0:0],
		chromedp.ExecPath(chromiumPath), chromedp.Headless, chromedp.NoSandbox, chromedp.DisableGPU,
		chromedp.NoFirstRun, chromedp.UserDataDir(profile),
		chromedp.Flag("disable-quic", true), chromedp.Flag("disable-component-update", true),
		chromedp.Flag("disable-sync", true), chromedp.Flag("disable-background-networking", true),
		chromedp.Flag("host-resolver-rules", "MAP * ~NOTFOUND, EXCLUDE 127.0.0.1"),
		chromedp.WindowSize(1280, 1000),
	)
	actx, cancelA := chromedp.NewExecAllocator(context.Background(), opts...)
	ctx, cancelC := chromedp.NewContext(actx)
	ctx, cancelT := context.WithTimeout(ctx, 90*time.Second)
	t.Cleanup(func() { cancelT(); cancelC(); cancelA() })
	rl := &requestLog{profile: profile}
	require.NoError(t, chromedp.Listen(ctx, rl.listen))
	_, err := chromedp.Call(ctx, network.Enable, network.EnableParams{})
	require.NoError(t, err)
	return ctx, rl
}

// requestLog keeps every request the page made, and how each one ended.
type requestLog struct {
	profile  string // the browser's profile folder, which names its processes
	mu       sync.Mutex
	urls     map[network.RequestID]string
	order    []network.RequestID
	blocked  map[network.RequestID]string
	console  []string
	failures []string
}

func (r *requestLog) listen(ev any) {
	r.mu.Lock()
	defer r.mu.Unlock()
	if r.urls == nil {
		r.urls, r.blocked = map[network.RequestID]string{}, map[network.RequestID]string{}
	}
	switch e := ev.(type) {
	case *network.EventRequestWillBeSent:
		r.urls[e.RequestID] = e.Request.URL
		r.order = append(r.order, e.RequestID)
	case *network.EventLoadingFailed:
		r.blocked[e.RequestID] = string(e.BlockedReason)
	case *runtime.EventConsoleAPICalled:
		var parts []string
		for _, a := range e.Args {
			parts = append(parts, string(a.Value))
		}
		r.console = append(r.console, strings.Join(parts, " "))
	case *runtime.EventExceptionThrown:
		d := e.ExceptionDetails
		msg := d.Text
		if d.Exception != nil {
			msg += " " + d.Exception.Description
		}
		r.failures = append(r.failures, msg)
	}
}

// outgoing lists requests that were neither the page itself nor blob:/data: URLs, with how they
// ended ("" if not blocked).
func (r *requestLog) outgoing(pageURL string) map[string]string {
	r.mu.Lock()
	defer r.mu.Unlock()
	out := map[string]string{}
	for _, id := range r.order {
		u := r.urls[id]
		if u == pageURL || strings.HasPrefix(u, "blob:") || strings.HasPrefix(u, "data:") {
			continue
		}
		out[u] = r.blocked[id]
	}
	return out
}

// watcher is a loopback listener that must never see a connection: the ground truth that nothing
// left the page.
type watcher struct {
	ln    net.Listener
	count atomic.Int32
}

func newWatcher(t *testing.T) *watcher {
	ln, err := net.Listen("tcp", "127.0.0.1:0")
	require.NoError(t, err)
	w := &watcher{ln: ln}
	go func() {
		for {
			c, err := ln.Accept()
			if err != nil {
				return
			}
			w.count.Add(1)
			c.Close()
		}
	}()
	t.Cleanup(func() { ln.Close() })
	return w
}

func cliInspect(t *testing.T, file string) map[string]any {
	t.Helper()
	bin := filepath.Join(t.TempDir(), "tracewright")
	build := exec.Command("go", "build", "-o", bin, "./tools/tracewright")
	build.Dir = "../.."
	out, err := build.CombinedOutput()
	require.NoError(t, err, string(out))
	out, err = exec.Command(bin, "inspect", file, "--json").Output()
	require.NoError(t, err)
	var m map[string]any
	require.NoError(t, json.Unmarshal(out, &m))
	return m
}

func shot(t testing.TB, ctx context.Context, name string) {
	png, err := chromedp.Run(ctx, chromedp.FullScreenshot(100))
	require.NoError(t, err)
	dir := os.Getenv("TRACEWRIGHT_SHOTS")
	if dir == "" {
		dir = t.TempDir()
	}
	p := filepath.Join(dir, name+".png")
	require.NoError(t, os.WriteFile(p, png, 0o644))
	t.Logf("screenshot: %s", p)
}

func metrics(t testing.TB, ctx context.Context) map[string]string {
	got, err := chromedp.Run(ctx, chromedp.Evaluate[map[string]string](
		`Object.fromEntries([...document.querySelectorAll('[data-metric]')].map(e => [e.dataset.metric, e.dataset.value]))`))
	require.NoError(t, err)
	return got
}

// TestDropALog opens the page from file:// and from a loopback server, reads a CSV log and an
// XES log through the mapping step, and checks the figures against the command-line tool's
// `inspect --json` for the same files; no request may leave the page.
func TestDropALog(t *testing.T) {
	html := builtPage(t)
	srv := httptest.NewServer(http.FileServer(http.Dir(filepath.Dir(html))))
	defer srv.Close()
	csv, _ := filepath.Abs("../../testdata/workshop.csv")
	xes, _ := filepath.Abs("../../testdata/workshop.xes.gz")
	want := cliInspect(t, csv)
	wantX := cliInspect(t, xes)
	for _, origin := range []struct{ name, url string }{
		{"file", "file://" + html},
		{"server", srv.URL + "/tracewright.html"},
	} {
		t.Run(origin.name, func(t *testing.T) {
			ctx, rl := browser(t)
			require.NoError(t, chromedp.Do(ctx,
				chromedp.Navigate(origin.url),
				chromedp.WaitVisible(chromedp.CSS(`body[data-engine="ready"]`)),
				chromedp.SetUploadFiles(chromedp.CSS(`#file-input`), []string{csv}),
				chromedp.WaitVisible(chromedp.CSS(`#mapping`)),
			))
			shot(t, ctx, "mapping-"+origin.name)
			shown, err := chromedp.Run(ctx, chromedp.Evaluate[string](`getComputedStyle(document.getElementById('views')).display`))
			require.NoError(t, err)
			assert.Equal(t, "none", shown, "no views to switch to before a log is read")
			require.NoError(t, chromedp.Do(ctx,
				chromedp.Click(chromedp.CSS(`#read-button`)),
				chromedp.WaitVisible(chromedp.CSS(`#overview[data-ready="true"]`)),
			))
			got := metrics(t, ctx)
			for _, k := range []string{"cases", "events", "activities", "variants"} {
				assert.Equal(t, fmt.Sprint(want[k]), got[k], k)
			}
			shot(t, ctx, "overview-"+origin.name)

			// An XES file goes straight to the overview.
			require.NoError(t, chromedp.Do(ctx,
				chromedp.Click(chromedp.CSS(`#again-button`)),
				chromedp.WaitVisible(chromedp.CSS(`#start`)),
				chromedp.SetUploadFiles(chromedp.CSS(`#file-input`), []string{xes}),
				chromedp.WaitVisible(chromedp.CSS(`#overview-name`)),
				chromedp.WaitVisible(chromedp.CSS(`#overview[data-ready="true"]`)),
			))
			name, err := chromedp.Run(ctx, chromedp.Text(chromedp.CSS(`#overview-name`)))
			require.NoError(t, err)
			assert.Equal(t, "workshop.xes.gz", name)
			got = metrics(t, ctx)
			for _, k := range []string{"cases", "events", "activities", "variants"} {
				assert.Equal(t, fmt.Sprint(wantX[k]), got[k], k)
			}
			assert.Empty(t, rl.outgoing(origin.url), "no request may leave the page")
			assert.Empty(t, rl.failures, "no script errors")
		})
	}
}

func TestDemoAndMalformedFile(t *testing.T) {
	html := builtPage(t)
	ctx, rl := browser(t)
	bad := filepath.Join(t.TempDir(), "broken.csv")
	require.NoError(t, os.WriteFile(bad, []byte("case,activity,time\n1,a,2024-01-01T10:00:00Z\n1,\"b,2024-01-02T10:00:00Z\n"), 0o644))
	step := func(name string, a ...chromedp.Action[chromedp.Void]) {
		t.Helper()
		sctx, cancel := context.WithTimeout(ctx, 20*time.Second)
		defer cancel()
		if err := chromedp.Do(sctx, a...); err != nil {
			shot(t, ctx, "failed-"+name)
			st, _ := chromedp.Run(ctx, chromedp.Evaluate[string](`document.body.dataset.state + ' | ' + document.getElementById('problem-message').textContent`))
			t.Logf("state at failure: %s", st)
			t.Fatalf("%s: %v (console: %v, errors: %v)", name, err, rl.console, rl.failures)
		}
	}
	step("open", chromedp.Navigate("file://"+html), chromedp.WaitVisible(chromedp.CSS(`body[data-engine="ready"]`)))
	step("demo", chromedp.Click(chromedp.CSS(`#demo-button`)), chromedp.WaitVisible(chromedp.CSS(`#mapping`)))
	step("read demo", chromedp.Click(chromedp.CSS(`#read-button`)), chromedp.WaitVisible(chromedp.CSS(`#overview[data-ready="true"]`)))
	step("back to start", chromedp.Click(chromedp.CSS(`#again-button`)), chromedp.WaitVisible(chromedp.CSS(`#start`)))
	step("upload malformed", chromedp.SetUploadFiles(chromedp.CSS(`#file-input`), []string{bad}))
	step("see the problem", chromedp.WaitVisible(chromedp.CSS(`#problem`)))
	msg, err := chromedp.Run(ctx, chromedp.Text(chromedp.CSS(`#problem-message`)))
	require.NoError(t, err)
	where, err := chromedp.Run(ctx, chromedp.Text(chromedp.CSS(`#problem-where`)))
	require.NoError(t, err)
	assert.Contains(t, msg, "line 3")
	assert.Contains(t, msg, "not closed")
	assert.Contains(t, where, "3")
	shot(t, ctx, "problem")
	assert.Empty(t, rl.outgoing("file://"+html))
}

// TestNothingLeavesThePage tries every kind of request a page or its worker can make, aimed at
// a loopback listener: the Content-Security-Policy must block them all (the browser reports each
// as blocked) and the listener must see no connection.
func TestNothingLeavesThePage(t *testing.T) {
	html := builtPage(t)
	w := newWatcher(t)
	target := "http://" + w.ln.Addr().String()
	ctx, rl := browser(t)
	require.NoError(t, chromedp.Do(ctx,
		chromedp.Navigate("file://"+html),
		chromedp.WaitVisible(chromedp.CSS(`body[data-engine="ready"]`)),
	))
	attempts := `(async (u) => {
		const tries = [];
		let kinds = 4; // the worker's four below
		const t = (name, f) => { kinds++; try { const p = f(); if (p && p.catch) tries.push(p.catch(() => {})); } catch (e) {} };
		t('fetch', () => fetch(u + '/fetch'));
		t('xhr', () => { const x = new XMLHttpRequest(); x.open('GET', u + '/xhr'); x.send(); });
		t('img', () => { const i = new Image(); i.src = u + '/img'; });
		t('websocket', () => new WebSocket(u.replace('http', 'ws') + '/ws'));
		t('beacon', () => navigator.sendBeacon(u + '/beacon', 'x'));
		t('eventsource', () => new EventSource(u + '/es'));
		t('script', () => { const s = document.createElement('script'); s.src = u + '/script.js'; document.head.append(s); });
		t('prefetch', () => { const l = document.createElement('link'); l.rel = 'prefetch'; l.href = u + '/prefetch'; document.head.append(l); });
		t('stylesheet', () => { const l = document.createElement('link'); l.rel = 'stylesheet'; l.href = u + '/style.css'; document.head.append(l); });
		t('iframe', () => { const f = document.createElement('iframe'); f.src = u + '/frame'; document.body.append(f); });
		t('audio', () => { const a = new Audio(u + '/audio'); a.play().catch(() => {}); });
		t('worker-url', () => new Worker(u + '/worker.js'));
		t('form', () => { const f = document.createElement('form'); f.action = u + '/form'; f.method = 'post'; document.body.append(f); f.submit(); });
		const code = 'const u=' + JSON.stringify(u) + ';' +
			'try{fetch(u+"/w-fetch").catch(()=>{})}catch(e){}' +
			'try{const x=new XMLHttpRequest();x.open("GET",u+"/w-xhr");x.send()}catch(e){}' +
			'try{new WebSocket(u.replace("http","ws")+"/w-ws")}catch(e){}' +
			'try{importScripts(u+"/w-import.js")}catch(e){}' +
			'postMessage("tried")';
		const wk = new Worker(URL.createObjectURL(new Blob([code], {type: 'text/javascript'})));
		tries.push(new Promise((r) => { wk.onmessage = r; wk.onerror = r; }));
		await Promise.all(tries);
		await new Promise((r) => setTimeout(r, 1500));
		return kinds;
	})(` + "`" + target + "`" + `)`
	n, err := chromedp.Run(ctx, chromedp.Evaluate[int](attempts, chromedp.EvalAwaitPromise))
	require.NoError(t, err)
	time.Sleep(500 * time.Millisecond)
	assert.Zero(t, w.count.Load(), "the loopback listener saw a connection")
	out := rl.outgoing("file://" + html)
	for u, reason := range out {
		assert.NotEmpty(t, reason, "request to %s was not blocked", u)
	}
	t.Logf("%d kinds of request tried; the browser reported %d, all blocked: %v", n, len(out), out)
}

// generatedCSV writes a generated log as a CSV file in the test's temporary folder.
func generatedCSV(t *testing.T, cfg synth.Config, order synth.RowOrder) string {
	t.Helper()
	path := filepath.Join(t.TempDir(), "generated.csv")
	f, err := os.Create(path)
	require.NoError(t, err)
	require.NoError(t, synth.Generate(cfg).WriteCSV(f, order))
	require.NoError(t, f.Close())
	return path
}

// generatedXESGz writes a generated log as gzip'd XES in the test's temporary folder.
func generatedXESGz(t *testing.T, cfg synth.Config) string {
	t.Helper()
	path := filepath.Join(t.TempDir(), "generated.xes.gz")
	f, err := os.Create(path)
	require.NoError(t, err)
	zw := gzip.NewWriter(f)
	require.NoError(t, synth.Generate(cfg).WriteXES(zw))
	require.NoError(t, zw.Close())
	require.NoError(t, f.Close())
	return path
}

// TestProgressAndCancel reads a large generated log, waits for the progress bar to move, cancels,
// and expects the start screen back (an XES file has no column step) with no overview and no
// error. The log is gzip'd XES, which the page reads about ten times slower per event than CSV
// (300k events take seconds), so that the cancel lands while the read runs: a CSV of 600k events
// came to be read in under half a second, and the read could end before the cancel arrived.
func TestProgressAndCancel(t *testing.T) {
	html := builtPage(t)
	big := generatedXESGz(t, synth.Config{Seed: 3, Events: 300_000, Shifts: true})
	ctx, rl := browser(t)
	require.NoError(t, chromedp.Do(ctx,
		chromedp.Navigate("file://"+html),
		chromedp.WaitVisible(chromedp.CSS(`body[data-engine="ready"]`)),
		chromedp.SetUploadFiles(chromedp.CSS(`#file-input`), []string{big}),
		chromedp.WaitVisible(chromedp.CSS(`#progress`)),
	))
	// wait until some progress has been reported, then cancel
	for i := 0; i < 200; i++ {
		v, err := chromedp.Run(ctx, chromedp.Evaluate[float64](`document.getElementById('progress-bar').value`))
		require.NoError(t, err)
		if v > 0 {
			break
		}
		time.Sleep(20 * time.Millisecond)
	}
	shot(t, ctx, "progress")
	require.NoError(t, chromedp.Do(ctx,
		chromedp.Click(chromedp.CSS(`#cancel-button`)),
		chromedp.WaitVisible(chromedp.CSS(`#start`)),
	))
	state, err := chromedp.Run(ctx, chromedp.Evaluate[string](`document.body.dataset.state`))
	require.NoError(t, err)
	assert.Equal(t, "start", state)
	assert.Empty(t, rl.failures)
}

// TestReadAhead reads a log large enough (over 16 MB) that the engine reads the file into memory
// while the columns are shown (wasm/main.go, readAhead): Read at once, when only its start is in
// memory and the load reads on from there, and Read after a pause, when all of it may be. Both
// must give the command-line tool's figures for the same file, as must a small file dropped
// after the large one was partly read ahead.
func TestReadAhead(t *testing.T) {
	html := builtPage(t)
	big := generatedCSV(t, synth.Config{Seed: 6, Events: 300_000, Shifts: true}, synth.Shuffled)
	fi, err := os.Stat(big)
	require.NoError(t, err)
	require.Greater(t, fi.Size(), int64(16<<20), "the engine reads ahead from 16 MB")
	small, _ := filepath.Abs("../../testdata/workshop.csv")
	want, wantSmall := cliInspect(t, big), cliInspect(t, small)
	ctx, rl := browser(t)
	require.NoError(t, chromedp.Do(ctx, chromedp.Navigate("file://"+html), chromedp.WaitVisible(chromedp.CSS(`body[data-engine="ready"]`))))
	read := func(file string, pause time.Duration, want map[string]any) {
		require.NoError(t, chromedp.Do(ctx,
			chromedp.SetUploadFiles(chromedp.CSS(`#file-input`), []string{file}),
			chromedp.WaitVisible(chromedp.CSS(`#mapping`)),
			chromedp.Sleep(pause),
			chromedp.Click(chromedp.CSS(`#read-button`)),
			quietWait(`#overview[data-ready="true"]`),
		))
		got := metrics(t, ctx)
		for _, k := range []string{"cases", "events", "activities", "variants"} {
			assert.Equal(t, fmt.Sprint(want[k]), got[k], "%s after a pause of %v", k, pause)
		}
		require.NoError(t, chromedp.Do(ctx, chromedp.Click(chromedp.CSS(`#again-button`)), chromedp.WaitVisible(chromedp.CSS(`#start`))))
	}
	read(big, 0, want)
	read(big, 3*time.Second, want)
	// the large file dropped and left while it is read ahead, then a small one read
	require.NoError(t, chromedp.Do(ctx,
		chromedp.SetUploadFiles(chromedp.CSS(`#file-input`), []string{big}),
		chromedp.WaitVisible(chromedp.CSS(`#mapping`)),
		chromedp.Click(chromedp.CSS(`#back-button`)),
		chromedp.WaitVisible(chromedp.CSS(`#start`)),
	))
	read(small, 0, wantSmall)
	assert.Empty(t, rl.failures)
}

// TestStopConformance checks a generated log of 400k events (30% of cases with noise, about 1,400
// paths) against its model, waits for the progress count, and stops the check (again from its
// start if it ended first): the engine takes the stop between two paths, since it yields to the
// worker's event loop while it reports progress.
func TestStopConformance(t *testing.T) { // and the forecast
	html := builtPage(t)
	big := generatedCSV(t, synth.Config{Seed: 4, Events: 400_000, Noise: 0.3, Shifts: true}, synth.ByTime)
	ctx, rl := browser(t)
	require.NoError(t, chromedp.Do(ctx, openCSV(html, big)))
	// from all paths, the discovered model is loose enough for the check to take seconds
	_, err := chromedp.Run(ctx, chromedp.Evaluate[chromedp.Void](`document.getElementById('md-variants').value = 100`))
	require.NoError(t, err)
	require.NoError(t, chromedp.Do(ctx, chromedp.Click(chromedp.CSS(`#views [data-view="conformance"]`))))
	// textUntil polls a status line until ok holds for its text (at most 30 s)
	textUntil := func(sel string, ok func(string) bool) bool {
		for i := 0; i < 1500; i++ {
			text, err := chromedp.Run(ctx, chromedp.Text(chromedp.CSS(sel)))
			require.NoError(t, err)
			if ok(text) {
				return true
			}
			time.Sleep(20 * time.Millisecond)
		}
		return false
	}
	counted := textUntil(`#cf-model`, func(s string) bool { return strings.Contains(s, " paths.") })
	require.True(t, counted, "the check reports how many paths are done")
	require.NoError(t, chromedp.Do(ctx, chromedp.Click(chromedp.CSS(`#cf-stop`))))
	// The check of this log takes about a second here and the first count shows when it is
	// about half done, so the stop can arrive after the end. Then the check runs again and is
	// stopped the moment it starts.
	running := func(s string) bool { return strings.HasPrefix(s, "Setting every path") }
	ended := textUntil(`#cf-model`, func(s string) bool { return !running(s) })
	require.True(t, ended, "the check ends or stops")
	if text, err := chromedp.Run(ctx, chromedp.Text(chromedp.CSS(`#cf-model`))); err == nil && !strings.HasPrefix(text, "Stopped") {
		t.Logf("the check ended before the stop arrived (%q); running it again", text)
		require.NoError(t, chromedp.Do(ctx, chromedp.Click(chromedp.CSS(`#cf-run`))))
		require.True(t, textUntil(`#cf-model`, running), "the check starts again")
		require.NoError(t, chromedp.Do(ctx, chromedp.Click(chromedp.CSS(`#cf-stop`))))
	}
	stopped := textUntil(`#cf-model`, func(s string) bool { return strings.HasPrefix(s, "Stopped") })
	assert.True(t, stopped, "the check stops on request")

	// the forecast, which measures itself on past cases first, reports and stops the same way
	require.NoError(t, chromedp.Do(ctx, chromedp.Click(chromedp.CSS(`#views [data-view="forecast"]`))))
	counted = textUntil(`#fc-eval`, func(s string) bool { return strings.Contains(s, "models fitted") })
	require.True(t, counted, "the forecast reports how many models are fitted")
	require.NoError(t, chromedp.Do(ctx, chromedp.Click(chromedp.CSS(`#fc-stop`))))
	stopped = textUntil(`#fc-eval`, func(s string) bool { return strings.HasPrefix(s, "Stopped") })
	assert.True(t, stopped, "the forecast stops on request")
	assert.Empty(t, rl.failures)
}

// TestViews opens the demo log's flow map and model, moves a control, opens a detail, and
// saves screenshots; nothing may leave the page.
func TestViews(t *testing.T) {
	html := builtPage(t)
	ctx, rl := browser(t)
	require.NoError(t, chromedp.Do(ctx,
		openDemo(html),
		chromedp.Click(chromedp.CSS(`#views [data-view="flowmap"]`)),
		chromedp.WaitVisible(chromedp.CSS(`#fm-canvas[data-ready="true"] svg`)),
		chromedp.Click(chromedp.CSS(`#fm-canvas .node[data-id="2"] rect`)),
		chromedp.WaitVisible(chromedp.CSS(`#fm-detail dl`)),
		chromedp.WaitVisible(chromedp.CSS(`#fm-detail ol li`)),
	))
	shot(t, ctx, "flowmap")
	note, err := chromedp.Run(ctx, chromedp.Text(chromedp.CSS(`#fm-note`)))
	require.NoError(t, err)
	assert.Contains(t, note, "12 activities")
	// fewer paths: the note must say some are hidden
	_, err = chromedp.Run(ctx, chromedp.Evaluate[chromedp.Void](`(() => { const s = document.getElementById('fm-edges'); s.value = 20; s.dispatchEvent(new Event('input')); })()`))
	require.NoError(t, err)
	for i := 0; i < 100; i++ {
		note, _ = chromedp.Run(ctx, chromedp.Text(chromedp.CSS(`#fm-note`)))
		if strings.Contains(note, "hidden") {
			break
		}
		time.Sleep(50 * time.Millisecond)
	}
	assert.Contains(t, note, "rarer paths hidden")
	require.NoError(t, chromedp.Do(ctx,
		chromedp.Click(chromedp.CSS(`#views [data-view="model"]`)),
		chromedp.WaitVisible(chromedp.CSS(`#md-canvas[data-ready="true"] svg`)),
	))
	summary, err := chromedp.Run(ctx, chromedp.Text(chromedp.CSS(`#md-summary`)))
	require.NoError(t, err)
	assert.Contains(t, summary, "sound")
	shot(t, ctx, "model")
	require.NoError(t, chromedp.Do(ctx,
		chromedp.Click(chromedp.CSS(`input[name="md-draw"][value="tree"]`)),
		chromedp.WaitVisible(chromedp.CSS(`#md-canvas .operator`)),
	))
	shot(t, ctx, "model-tree")
	assert.Empty(t, rl.outgoing("file://"+html))
	assert.Empty(t, rl.failures)
}

// TestForecastView opens the forecast of the demo log with an outcome and checks that the error
// figures stand beside the list of open cases, with the caution.
func TestForecastView(t *testing.T) {
	html := builtPage(t)
	ctx, rl := browser(t)
	require.NoError(t, chromedp.Do(ctx,
		openDemo(html),
		chromedp.Click(chromedp.CSS(`#views [data-view="forecast"]`)),
		chromedp.WaitVisible(chromedp.CSS(`#forecast[data-ready="true"] #fc-list tbody tr`)),
	))
	// by default the states are refined by the case attribute that lowered the error, if any: in
	// the demo scenario the bike model sets the lead time of parts (package synth)
	first, err := chromedp.Run(ctx, chromedp.Evaluate[string](`(() => {
		const d = document.querySelector('#fc-eval details:last-of-type');
		d.open = true;
		return document.querySelector('#fc-eval p.muted').textContent + '|' + d.querySelector('summary').textContent + '|rows:' + d.querySelectorAll('tbody tr').length;
	})()`))
	require.NoError(t, err)
	assert.Contains(t, first, "apart by bike_model, which lowered the error on past cases")
	assert.Contains(t, first, "|Settings compared on past cases")
	assert.Contains(t, first, "|rows:3", "without an attribute, by bike_model, by warranty")
	shot(t, ctx, "forecast-default")
	require.NoError(t, chromedp.Do(ctx,
		chromedp.SetValue(chromedp.CSS(`#fc-outcome-kind`), "ends"),
		chromedp.SetValue(chromedp.CSS(`#fc-outcome-arg`), "Hand over bike"),
		chromedp.SetValue(chromedp.CSS(`#fc-attr`), "warranty"),
		chromedp.Click(chromedp.CSS(`#fc-run`)),
		chromedp.WaitVisible(chromedp.CSS(`#fc-eval [data-metric="auc"]`)),
	))
	got := metrics(t, ctx)
	for _, k := range []string{"mae_days", "baseline_mae_days", "coverage", "auc"} {
		assert.NotEmpty(t, got[k], k)
	}
	how, err := chromedp.Run(ctx, chromedp.Text(chromedp.CSS(`#fc-eval p.muted`)))
	require.NoError(t, err)
	assert.Contains(t, how, "apart by warranty.", "chosen by the user, not measured")
	assert.Contains(t, how, "Tested at 3 past dates")
	assert.Regexp(t, `likely 0\.\d\d to \d\.\d\d on other past cases`, how, "the error ratio comes with its range")
	cov, err := chromedp.Run(ctx, chromedp.Text(chromedp.CSS(`#fc-eval [data-metric="coverage"]`)))
	require.NoError(t, err)
	assert.Regexp(t, `likely \d+(\.\d)?% to \d+(\.\d)?%`, cov, "the coverage comes with its range")
	caution, err := chromedp.Run(ctx, chromedp.Text(chromedp.CSS(`#forecast .notice`)))
	require.NoError(t, err)
	assert.Contains(t, caution, "not guarantees")

	// one case's detail: the forecast's basis, the next steps as bars, the events so far
	require.NoError(t, chromedp.Do(ctx,
		chromedp.Click(chromedp.CSS(`#fc-list tbody tr button`)),
		chromedp.WaitVisible(chromedp.CSS(`#fc-detail[data-ready="true"] tbody tr`)),
	))
	detail, err := chromedp.Run(ctx, chromedp.Evaluate[string](`(() => {
		const d = document.getElementById('fc-detail');
		const bar = d.querySelector('.bar').getBoundingClientRect().width;
		return d.textContent + '|bar:' + (bar > 0) + '|events:' + d.querySelectorAll('tbody tr').length;
	})()`))
	require.NoError(t, err)
	assert.Contains(t, detail, "Expected finish")
	assert.Contains(t, detail, "Based on")
	assert.Contains(t, detail, "|bar:true", "the bars have their widths under the page's policy")
	assert.NotContains(t, detail, "|events:0")
	shot(t, ctx, "forecast")
	assert.Empty(t, rl.outgoing("file://"+html))
	assert.Empty(t, rl.failures)
}

// TestForecastListPages: a log with hundreds of open cases lists them a hundred at a time, in
// the chosen order, with a button for more; the CSV holds them all.
func TestForecastListPages(t *testing.T) {
	html := builtPage(t)
	// many arrivals a day: at the export date a few hundred cases are still open (synth)
	csv := generatedCSV(t, synth.Config{Seed: 8, Events: 30_000, CasesPerDay: 80}, synth.ByTime)
	ctx, rl := browser(t)
	rows := func() int {
		n, err := chromedp.Run(ctx, chromedp.Evaluate[int](`document.querySelectorAll('#fc-list tbody tr').length`))
		require.NoError(t, err)
		return n
	}
	require.NoError(t, chromedp.Do(ctx,
		openCSV(html, csv),
		chromedp.Click(chromedp.CSS(`#views [data-view="forecast"]`)),
		chromedp.WaitVisible(chromedp.CSS(`#forecast[data-ready="true"] #fc-list tbody tr`)),
	))
	count, err := chromedp.Run(ctx, chromedp.Text(chromedp.CSS(`#fc-count`)))
	require.NoError(t, err)
	var shown, total int
	_, err = fmt.Sscanf(strings.ReplaceAll(count, ",", ""), "%d of %d open cases shown.", &shown, &total)
	require.NoError(t, err, "the count says how many are shown: %q", count)
	require.Greater(t, total, 200, "the log has hundreds of open cases")
	assert.Equal(t, 100, shown)
	assert.Equal(t, 100, rows())
	shot(t, ctx, "forecast-pages")
	require.NoError(t, chromedp.Do(ctx, chromedp.Click(chromedp.CSS(`#fc-more`))))
	assert.Equal(t, 200, rows())
	// a new order starts again from the first hundred, sorted over all open cases
	require.NoError(t, chromedp.Do(ctx, chromedp.SetValue(chromedp.CSS(`#fc-sort`), "late")))
	_, err = chromedp.Run(ctx, chromedp.Evaluate[bool](`document.getElementById('fc-sort').dispatchEvent(new Event('change'))`))
	require.NoError(t, err)
	assert.Equal(t, 100, rows())
	firsts, err := chromedp.Run(ctx, chromedp.Evaluate[[]string](`[...document.querySelectorAll('#fc-list tbody tr td:nth-child(4)')].map((td) => td.textContent.slice(-10))`))
	require.NoError(t, err)
	for i := 1; i < len(firsts); i++ {
		assert.GreaterOrEqual(t, firsts[i-1], firsts[i], "latest possible finish first")
	}
	for range (total - 100 + 99) / 100 {
		require.NoError(t, chromedp.Do(ctx, chromedp.Click(chromedp.CSS(`#fc-more`))))
	}
	assert.Equal(t, total, rows())
	hidden, err := chromedp.Run(ctx, chromedp.Evaluate[bool](`document.getElementById('fc-more').hidden`))
	require.NoError(t, err)
	assert.True(t, hidden, "no more to show")
	assert.Empty(t, rl.failures)
}

// TestConformanceView checks the demo log against its discovered model and against a PNML file.
func TestConformanceView(t *testing.T) {
	html := builtPage(t)
	pnml, _ := filepath.Abs("../../core/petri/testdata/running-example.pnml")
	ctx, rl := browser(t)
	require.NoError(t, chromedp.Do(ctx,
		openDemo(html),
		chromedp.Click(chromedp.CSS(`#views [data-view="conformance"]`)),
		chromedp.WaitVisible(chromedp.CSS(`#conformance[data-ready="true"] [data-metric="fitness"]`)),
	))
	got := metrics(t, ctx)
	assert.NotEmpty(t, got["fitness"])
	assert.NotEmpty(t, got["precision"])
	drawn, err := chromedp.Run(ctx, chromedp.Evaluate[string](`document.querySelector('#cf-canvas svg').textContent`))
	require.NoError(t, err)
	assert.Contains(t, drawn, "skipped", "the departures are drawn on the model")
	cases, err := chromedp.Run(ctx, chromedp.Evaluate[string](`(() => {
		const d = document.querySelector('#cf-pats details');
		d.open = true;
		return d.textContent;
	})()`))
	require.NoError(t, err)
	assert.Contains(t, cases, "Cases: WR-", "a departure lists the cases behind it")
	shot(t, ctx, "conformance")

	// weights: make the most frequent departure count 50 times; the check runs again with them
	act, err := chromedp.Run(ctx, chromedp.Evaluate[string](`(() => {
		const row = document.querySelector('#cf-acts tbody tr');
		for (const i of row.querySelectorAll('input.weight')) i.value = '50';
		document.getElementById('cf-run').click();
		return row.querySelector('input.weight').dataset.activity;
	})()`))
	require.NoError(t, err)
	require.NoError(t, chromedp.Do(ctx, chromedp.WaitVisible(chromedp.CSS(`#conformance[data-ready="true"] [data-metric="fitness"]`))))
	weighted := metrics(t, ctx)
	assert.NotEqual(t, got["fitness"], weighted["fitness"], "weights of 50 on %s change the fitness", act)
	kept, err := chromedp.Run(ctx, chromedp.Evaluate[string](`document.querySelector('#cf-acts input.weight[data-activity="`+act+`"]').value`))
	require.NoError(t, err)
	assert.Equal(t, "50", kept, "the weights stay after the check")

	// the delays view: time on the same model
	require.NoError(t, chromedp.Do(ctx,
		chromedp.Click(chromedp.CSS(`#views [data-view="timing"]`)),
		chromedp.WaitVisible(chromedp.CSS(`#timing[data-ready="true"] [data-metric="fitting_median"]`)),
	))
	timed, err := chromedp.Run(ctx, chromedp.Evaluate[string](`document.querySelector('#tm-canvas svg').textContent + '|' + document.querySelectorAll('#tm-steps tbody tr').length + '|' + document.querySelectorAll('#tm-hist rect').length`))
	require.NoError(t, err)
	assert.Contains(t, timed, "median")
	assert.NotContains(t, timed, "|0|")
	shot(t, ctx, "timing")

	require.NoError(t, chromedp.Do(ctx,
		chromedp.Click(chromedp.CSS(`#views [data-view="conformance"]`)),
		chromedp.SetUploadFiles(chromedp.CSS(`#cf-file`), []string{pnml}),
		chromedp.WaitVisible(chromedp.CSS(`#cf-notes .notice`)),
	))
	notes, err := chromedp.Run(ctx, chromedp.Text(chromedp.CSS(`#cf-notes`)))
	require.NoError(t, err)
	assert.Contains(t, notes, "Activities the model does not know")
	assert.Empty(t, rl.outgoing("file://"+html))
	assert.Empty(t, rl.failures)
}

// openCSV opens the page from file:// and reads a CSV file through the column step, as guessed.
func openCSV(html, csv string) chromedp.Action[chromedp.Void] {
	return chromedp.Steps(
		chromedp.Navigate("file://"+html),
		chromedp.WaitVisible(chromedp.CSS(`body[data-engine="ready"]`)),
		chromedp.SetUploadFiles(chromedp.CSS(`#file-input`), []string{csv}),
		chromedp.WaitVisible(chromedp.CSS(`#mapping`)),
		chromedp.Click(chromedp.CSS(`#read-button`)),
		chromedp.WaitVisible(chromedp.CSS(`#overview[data-ready="true"]`)),
	)
}

// openDemo opens the page from disk and reads the embedded demo log to its overview.
func openDemo(html string) chromedp.Action[chromedp.Void] {
	return chromedp.Steps(
		chromedp.Navigate("file://"+html),
		chromedp.WaitVisible(chromedp.CSS(`body[data-engine="ready"]`)),
		chromedp.Click(chromedp.CSS(`#demo-button`)),
		chromedp.WaitVisible(chromedp.CSS(`#mapping`)),
		chromedp.Click(chromedp.CSS(`#read-button`)),
		chromedp.WaitVisible(chromedp.CSS(`#overview[data-ready="true"]`)),
	)
}
