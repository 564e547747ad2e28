// Command bundle makes the product: one self-contained HTML file, dist/tracewright.html, with
// the engine (the core compiled to WebAssembly, gzip'd and base64'd), its worker bootstrap, the
// page's script and style, and the demo log inlined. The output is deterministic: the same
// sources and Go version give the same bytes, and the command prints their sha256.
//
//	go run ./tools/bundle [-out dist/tracewright.html] [-budget 3000000]
//
// It computes the Content-Security-Policy from the inlined script and style (sha256 hashes, no
// 'unsafe-inline'): default-src 'none'; the page's one script and WebAssembly compilation;
// its one style; workers and images from blob: only (local objects the page makes itself); no
// forms, no base URL. Nothing may be fetched from anywhere.
package main

import (
	"bytes"
	"compress/gzip"
	"crypto/sha256"
	"encoding/base64"
	"encoding/hex"
	"flag"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"

	"github.com/tdewolff/minify/v2"
	"github.com/tdewolff/minify/v2/css"
	"github.com/tdewolff/minify/v2/html"
	"github.com/tdewolff/minify/v2/js"

	"tracewright/core/engine"
)

func main() {
	out := flag.String("out", "dist/tracewright.html", "output file")
	budget := flag.Int("budget", 3_000_000, "largest allowed size in bytes")
	demo := flag.String("demo", "testdata/workshop.csv", "demo log to embed")
	flag.Parse()
	sum, size, err := run(".", *out, *demo, *budget)
	if err == nil {
		fmt.Printf("%s  %s\n%d bytes\n", sum, *out, size)
	}
	if err != nil {
		fmt.Fprintln(os.Stderr, "bundle:", err)
		os.Exit(1)
	}
}

// run builds the page from the project at root and writes it to out; it returns the page's
// sha256 and size.
func run(root, out, demoPath string, budget int) (string, int, error) {
	fail := func(err error) (string, int, error) { return "", 0, err }
	tmp, err := os.MkdirTemp("", "tracewright-bundle-")
	if err != nil {
		return fail(err)
	}
	defer os.RemoveAll(tmp)
	wasmPath := filepath.Join(tmp, "engine.wasm")
	build := exec.Command("go", "build", "-trimpath", "-ldflags=-s -w -buildid=", "-buildvcs=false", "-o", wasmPath, "./wasm")
	build.Env = append(os.Environ(), "GOOS=js", "GOARCH=wasm", "CGO_ENABLED=0")
	build.Dir = root
	build.Stderr = os.Stderr
	if err := build.Run(); err != nil {
		return fail(fmt.Errorf("building the engine: %w", err))
	}
	wasm, err := os.ReadFile(wasmPath)
	if err != nil {
		return fail(err)
	}
	goroot, err := exec.Command("go", "env", "GOROOT").Output()
	if err != nil {
		return fail(fmt.Errorf("go env GOROOT: %w", err))
	}
	wasmExec, err := os.ReadFile(filepath.Join(strings.TrimSpace(string(goroot)), "lib", "wasm", "wasm_exec.js"))
	if err != nil {
		return fail(err)
	}
	read := func(name string) (string, error) {
		b, err := os.ReadFile(filepath.Join(root, "site", name))
		return string(b), err
	}
	page, err := read("index.html")
	if err != nil {
		return fail(err)
	}
	style, err := read("style.css")
	if err != nil {
		return fail(err)
	}
	app, err := read("app.js")
	if err != nil {
		return fail(err)
	}
	boot, err := read("worker.js")
	if err != nil {
		return fail(err)
	}
	demo, err := os.ReadFile(filepath.Join(root, demoPath))
	if err != nil {
		return fail(err)
	}

	m := minify.New()
	m.AddFunc("text/css", css.Minify)
	m.AddFunc("application/javascript", js.Minify)
	minStyle, err := m.String("text/css", style)
	if err != nil {
		return fail(fmt.Errorf("style.css: %w", err))
	}
	minApp, err := m.String("application/javascript", app)
	if err != nil {
		return fail(fmt.Errorf("app.js: %w", err))
	}
	minWorker, err := m.String("application/javascript", string(wasmExec)+"\n"+boot)
	if err != nil {
		return fail(fmt.Errorf("worker: %w", err))
	}
	for name, text := range map[string]string{"app.js": minApp, "worker": minWorker, "style.css": minStyle} {
		if strings.Contains(strings.ToLower(text), "</script") || strings.Contains(strings.ToLower(text), "</style") {
			return fail(fmt.Errorf("%s contains a closing tag and cannot be inlined", name))
		}
	}
	// The template is minified alone (scripts and styles are already), so its placeholders
	// survive; then the parts go in.
	hm := minify.New()
	hm.Add("text/html", &html.Minifier{KeepDocumentTags: true, KeepEndTags: true, KeepQuotes: true})
	minPage, err := hm.String("text/html", page)
	if err != nil {
		return fail(fmt.Errorf("index.html: %w", err))
	}
	csp := strings.Join([]string{
		"default-src 'none'",
		"script-src '" + hash(minApp) + "' 'wasm-unsafe-eval'",
		"style-src '" + hash(minStyle) + "'",
		"worker-src blob:",
		"img-src blob:", // a drawing saved as PNG passes through an image of a local Blob
		"form-action 'none'",
		"base-uri 'none'",
	}, "; ")
	replacements := []string{
		"{{CSP}}", csp,
		"{{STYLE}}", minStyle,
		"{{SCRIPT}}", minApp,
		"{{WORKER}}", minWorker,
		"{{ENGINE}}", base64.StdEncoding.EncodeToString(gz(wasm)),
		"{{DEMO}}", base64.StdEncoding.EncodeToString(gz(demo)),
		"{{VERSION}}", engine.Version,
	}
	for i := 0; i < len(replacements); i += 2 {
		if strings.Count(minPage, replacements[i]) != 1 {
			return fail(fmt.Errorf("index.html must hold %s exactly once", replacements[i]))
		}
	}
	html := strings.NewReplacer(replacements...).Replace(minPage)
	if len(html) > budget {
		return fail(fmt.Errorf("the page is %d bytes, over the budget of %d", len(html), budget))
	}
	if err := os.MkdirAll(filepath.Dir(out), 0o755); err != nil {
		return fail(err)
	}
	if err := os.WriteFile(out, []byte(html), 0o644); err != nil {
		return fail(err)
	}
	sum := sha256.Sum256([]byte(html))
	return hex.EncodeToString(sum[:]), len(html), nil
}

// hash is the CSP source expression of an inline script or style (CSP Level 3, section 8.4).
func hash(s string) string {
	sum := sha256.Sum256([]byte(s))
	return "sha256-" + base64.StdEncoding.EncodeToString(sum[:])
}

// gz compresses deterministically: no name, no time in the header.
func gz(b []byte) []byte {
	var buf bytes.Buffer
	w, _ := gzip.NewWriterLevel(&buf, gzip.BestCompression)
	w.Write(b)
	w.Close()
	return buf.Bytes()
}
