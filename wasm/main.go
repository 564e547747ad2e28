//go:build js && wasm

package main

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"runtime"
	"syscall/js"

	"tracewright/core/engine"
)

// gcEvery is how many bytes are read between forced collections (see the package doc).
const gcEvery = 64 << 20

// yieldEvery is how many bytes are read between turns given to the worker's event loop. A
// stream's chunks arrive as promise reactions, which run before any message, so without these
// turns a "cancel" from the page would wait until the whole file was read.
const yieldEvery = 4 << 20

func main() {
	e := engine.New()
	e.Yield = yield
	self := js.Global()
	handler := js.FuncOf(func(this js.Value, args []js.Value) any {
		msg := args[0]
		go handle(e, self, msg)
		return nil
	})
	self.Set("tracewrightHandle", handler)
	self.Call("postMessage", map[string]any{"v": engine.APIVersion, "id": 0, "kind": "ready", "json": `{"version":"` + engine.Version + `"}`})
	select {}
}

// handle runs one request on its own goroutine, so that a cancel can arrive during a load.
func handle(e *engine.Engine, self js.Value, msg js.Value) {
	req := engine.Request{V: msg.Get("v").Int(), ID: msg.Get("id").Int(), Kind: msg.Get("kind").String()}
	if p := msg.Get("payload"); p.Type() == js.TypeString {
		req.Payload = json.RawMessage(p.String())
	}
	var file *engine.File
	var fr *fileReader
	if f := msg.Get("file"); f.Truthy() {
		fr = &fileReader{reader: f.Call("stream").Call("getReader")}
		file = &engine.File{Name: f.Get("name").String(), Size: int64(f.Get("size").Float()), R: fr}
	}
	post := func(r engine.Response) {
		b, err := json.Marshal(r.Payload)
		if err != nil {
			b, _ = json.Marshal(engine.ErrorPayload{Message: err.Error()})
			r.Kind = "error"
		}
		self.Call("postMessage", map[string]any{"v": r.V, "id": r.ID, "kind": r.Kind, "json": string(b)})
	}
	defer func() {
		if r := recover(); r != nil { // a failure of the bridge itself: say so rather than hang
			post(engine.Response{V: engine.APIVersion, ID: req.ID, Kind: "error", Payload: engine.ErrorPayload{Message: fmt.Sprintf("internal error in the engine: %v", r)}})
		}
	}()
	resp := e.Handle(context.Background(), req, file, post)
	if fr != nil {
		fr.close()
	}
	post(resp)
}

// fileReader reads a ReadableStream's chunks as an io.Reader.
type fileReader struct {
	reader     js.Value
	buf        []byte
	chunk      []byte
	done       bool
	sinceGC    int
	sinceYield int
}

func (r *fileReader) Read(p []byte) (int, error) {
	for len(r.buf) == 0 {
		if r.done {
			return 0, io.EOF
		}
		res, err := await(r.reader.Call("read"))
		if err != nil {
			return 0, err
		}
		if res.Get("done").Bool() {
			r.done = true
			continue
		}
		v := res.Get("value")
		n := v.Get("length").Int()
		if cap(r.chunk) < n {
			r.chunk = make([]byte, n)
		}
		r.chunk = r.chunk[:n]
		js.CopyBytesToGo(r.chunk, v)
		r.buf = r.chunk
		r.sinceGC += n
		if r.sinceGC >= gcEvery {
			r.sinceGC = 0
			runtime.GC() // let go of the JS chunks read so far
		}
		r.sinceYield += n
		if r.sinceYield >= yieldEvery {
			r.sinceYield = 0
			yield()
		}
	}
	n := copy(p, r.buf)
	r.buf = r.buf[n:]
	return n, nil
}

// close stops the stream: a sniff reads only the start of a file.
func (r *fileReader) close() {
	if !r.done {
		r.reader.Call("cancel")
	}
}

// yield lets the worker's event loop take its pending messages (setTimeout 0 is a task, not a
// promise reaction).
func yield() {
	var resolveFn js.Func
	resolveFn = js.FuncOf(func(this js.Value, args []js.Value) any {
		js.Global().Call("setTimeout", args[0], 0)
		return nil
	})
	defer resolveFn.Release()
	await(js.Global().Get("Promise").New(resolveFn))
}

// await waits for a promise from a goroutine (the JS event loop runs meanwhile).
func await(p js.Value) (js.Value, error) {
	type result struct {
		v   js.Value
		err error
	}
	ch := make(chan result, 1)
	then := js.FuncOf(func(this js.Value, args []js.Value) any {
		ch <- result{v: args[0]}
		return nil
	})
	catch := js.FuncOf(func(this js.Value, args []js.Value) any {
		ch <- result{err: errors.New("reading the file failed: " + args[0].Call("toString").String())}
		return nil
	})
	defer then.Release()
	defer catch.Release()
	p.Call("then", then, catch)
	r := <-ch
	return r.v, r.err
}
