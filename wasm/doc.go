//go:build js && wasm

// Package main is the engine's entry point in the browser: the core compiled with GOOS=js
// GOARCH=wasm, run inside a Web Worker of the page. It is the only syscall/js code of
// Tracewright and it only moves messages and bytes; every request is handled by core/engine,
// which is tested natively.
//
// The worker's bootstrap (site/worker.js) starts the module; main registers a handler and
// waits. Each message from the page becomes an engine.Request; a message that carries a File is
// read as a stream (File.stream(), about 200 MB/s in Chromium, faster than slicing), chunk by
// chunk through an io.Reader. Go keeps every JS value it was handed alive until its collector
// runs, and its heap grows slowly, so without care the worker held the whole file; a collection
// every 64 MB read keeps it flat.
package main
