// Package wasm will hold the only syscall/js code of Tracewright: the engine's entry point when
// the core is compiled with GOOS=js GOARCH=wasm and run in a Web Worker of the page. It moves
// bytes and messages only; the request handling is pure Go in core/ and tested natively.
//
// It is empty until the page is built (see DEVELOPERS.md, "Roadmap").
package wasm
