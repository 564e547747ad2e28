//go:build js && wasm

// Package main is the engine's entry point in the browser: the core compiled with GOOS=js
// GOARCH=wasm, run inside a Web Worker of the page. It is the only syscall/js code of
// Tracewright and it only moves messages and bytes; every request is handled by core/engine,
// which is tested natively.
//
// The worker's bootstrap (site/worker.js) starts the module; main registers a handler and
// waits. Each message from the page becomes an engine.Request; a message that carries a File is
// read through an io.Reader in slices of up to 16 MB, always one ahead, by a nested worker with
// FileReaderSync (site/worker.js): on a thread of its own the next slice is read while the engine
// parses, where File.stream() on the engine's thread made reading and parsing take turns. Go
// keeps every JS value it was handed alive until its collector runs, and its heap grows slowly,
// so without care the worker held the whole file; a collection every 64 MB read keeps it flat.
//
// After a sniff, while the user checks the columns, the host reads a file of up to 256 MB into
// memory (readAhead), so that the load parses from memory without reading the file beside it, and
// then touches about as much memory as the load will need (warmMemory): memory touched for the
// first time costs a page fault, and a module's memory never shrinks, so the load reuses those
// pages. A load that comes first takes over what has been read and reads on.
package main
