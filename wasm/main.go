//go:build js && wasm

package main

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"runtime"
	"sync/atomic"
	"syscall/js"

	"tracewright/core/engine"
)

// gcEvery is how many bytes are read between forced collections (see the package doc).
const gcEvery = 64 << 20

// yieldEvery is how many bytes are read between turns given to the worker's event loop. A slice
// read ahead is often there before the engine asks for it, and then the engine does not wait, so
// without these turns a "cancel" from the page would wait until the whole file was read.
const yieldEvery = 4 << 20

func main() {
	e := engine.New()
	e.Yield = yield
	self := js.Global()
	h := &host{engine: e, self: self}
	handler := js.FuncOf(func(this js.Value, args []js.Value) any {
		var w *warmer
		if args[0].Get("kind").String() != "parse_time" { // the mapping step's quick check runs beside it
			w = h.stopWarming()
		}
		go h.handle(args[0], w)
		return nil
	})
	self.Set("tracewrightHandle", handler)
	self.Call("postMessage", map[string]any{"v": engine.APIVersion, "id": 0, "kind": "ready", "json": `{"version":"` + engine.Version + `"}`})
	select {}
}

// host connects the engine to the worker: messages in, responses out, and the memory warmed
// between a sniff and the load that follows.
type host struct {
	engine  *engine.Engine
	self    js.Value
	warming *warmer // the one running, or the last one, until the next message takes it
}

// warmer is what the host does between a sniff and the load that follows: it reads the file into
// memory (readAhead) and then warms memory for the load (warmMemory). stop asks it to end, done
// says it has; then its blocks are garbage and data[:n] holds the start of the file (all of it
// when n == len(data)), which a load of the same file reads before the rest.
type warmer struct {
	stop atomic.Bool
	done chan struct{}

	file js.Value // the File sniffed
	data []byte   // the file's bytes read so far: data[:n]
	n    int
	r    *fileReader // reads on from n, its next slice already asked for; nil at the end
}

// stopWarming asks the running warmer to stop and returns it, or nil.
func (h *host) stopWarming() *warmer {
	w := h.warming
	if w != nil {
		w.stop.Store(true)
		h.warming = nil
	}
	return w
}

// handle runs one request on its own goroutine, so that a cancel can arrive during a load. It
// first waits for the warmer w, if any, to let go of its blocks, so that a load can collect them;
// a request for the file w read ahead reads w's bytes first and then reads on with w's reader.
func (h *host) handle(msg js.Value, w *warmer) {
	if w != nil {
		<-w.done
	}
	e, self := h.engine, h.self
	req := engine.Request{V: msg.Get("v").Int(), ID: msg.Get("id").Int(), Kind: msg.Get("kind").String()}
	if p := msg.Get("payload"); p.Type() == js.TypeString {
		req.Payload = json.RawMessage(p.String())
	}
	var file *engine.File
	var fr *fileReader
	f := msg.Get("file")
	if f.Truthy() {
		file = &engine.File{Name: f.Get("name").String(), Size: int64(f.Get("size").Float())}
		if w != nil && w.n > 0 && sameFile(w.file, f) {
			// the start of the file, or all of it, was read while the user checked the columns
			fr = w.r
			if fr == nil {
				fr = newFileReader(f, int64(w.n))
			}
			file.R = io.MultiReader(bytes.NewReader(w.data[:w.n]), fr)
		} else {
			fr = newFileReader(f, 0)
			file.R = fr
		}
	}
	if w != nil && w.r != nil && w.r != fr {
		w.r.close()
	}
	w = nil // the warm-up's blocks are garbage now, for the load to collect
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
	if sr, ok := resp.Payload.(*engine.SniffResult); ok && file != nil && file.Size >= warmMin && h.warming == nil {
		w := &warmer{done: make(chan struct{}), file: f}
		h.warming = w
		if file.Size <= readAheadMax {
			w.readAhead(f, int(file.Size))
		}
		if sr.Need > 0 {
			warmMemory(min(sr.Need, warmMax), &w.stop)
		}
		close(w.done) // h.warming stays w: the next message takes its data, or lets it go
	}
}

// readAhead reads the file f of size bytes into w.data until it is all read or w.stop is set.
// A failure ends it quietly: the load reads on from w.n and reports it. When stopped it leaves
// its reader in w.r, with the next slice on its way, for the load to read on with.
//
// The page's read of a 70 MB CSV took 0.91-0.92 s from memory against 1.26-1.30 s from the
// file, on the 2-core test machine: reading a File in Chromium costs about 0.6 s of processor
// time on other threads (the nested reader, the browser's file and IPC threads) for 70 MB, and
// while it runs beside the parse the engine's thread waits for a core. Read while the user
// checks the columns, the file costs the load nothing.
func (w *warmer) readAhead(f js.Value, size int) {
	r := newFileReader(f, 0)
	w.data = make([]byte, size)
	for w.n < size && !w.stop.Load() {
		k, err := r.Read(w.data[w.n:])
		w.n += k
		if err != nil {
			r.close()
			return
		}
	}
	if w.n < size {
		w.r = r
	} else {
		r.close()
	}
}

// sameFile reports whether two File objects (each message carries its own copy) are the same
// file as the user chose it.
func sameFile(a, b js.Value) bool {
	return a.Get("name").String() == b.Get("name").String() &&
		a.Get("size").Float() == b.Get("size").Float() &&
		a.Get("lastModified").Float() == b.Get("lastModified").Float()
}

// Warming memory: in Chromium a wasm page touched for the first time costs a page fault, and on the
// 2-core test machine the engine's first read of a 70 MB CSV spent about 0.5 s of its 1.8 s on them
// (a 16 MB copy into fresh memory took 120-136 ms, into used memory about 1 ms). The engine's
// memory never shrinks, so memory touched once stays ready. After a sniff, while the user checks
// the columns, warmMemory touches about as much as the load will allocate (after readAhead has
// read the file), in blocks, giving the event loop a turn after each one; any message but the
// mapping step's parse_time stops it, and waits for it to let go of its blocks. The load then
// collects those blocks (engine.load) and reuses their pages. A load that starts at once loses
// nothing: the pages touched by then are the pages it would have touched.
const (
	warmBlock    = 4 << 20
	warmMin      = 16 << 20  // smaller files read fast enough anyway
	warmMax      = 1 << 30   // the engine's memory is at most 4 GB
	readAheadMax = 256 << 20 // a larger file is held in memory only as it is read
)

// warmMemory allocates about n bytes in warmBlock blocks and touches every page of them (one the
// heap used before costs nothing) until stop is set; then it lets go of them.
func warmMemory(n int64, stop *atomic.Bool) {
	var held [][]byte // held until the end, so that each block takes new pages
	for done := int64(0); done < n && !stop.Load(); done += warmBlock {
		b := make([]byte, warmBlock)
		for i := 0; i < len(b); i += 4096 {
			b[i] = 1
		}
		held = append(held, b)
		yield()
	}
	runtime.KeepAlive(held)
}

// fileReader reads a File as an io.Reader, slice by slice and always one slice ahead. The
// slices are read by tracewrightReadSlice (site/worker.js) on a thread of their own, so the next
// one arrives while the engine parses this one. Read on the engine's thread, a slice or a
// stream's chunk needs tasks of that thread's event loop, which cannot run while the engine
// parses: reading and parsing took turns, and a 74 MB CSV waited 350-450 ms on its chunks.
//
// Slices start at sliceFirst, so that a sniff, which needs only the first SampleBytes, reads
// little, and double up to sliceMax.
type fileReader struct {
	file       js.Value
	size       int64
	off        int64            // where the next slice to ask for starts
	ahead      chan sliceResult // the slice being read; nil when the file is all asked for
	aheadLen   int
	buf        []byte // the unread part of chunk
	chunk      []byte
	sinceGC    int
	sinceYield int
}

const (
	sliceFirst = 256 << 10
	sliceMax   = 16 << 20
)

type sliceResult struct {
	buf js.Value // an ArrayBuffer
	err error
}

// newFileReader reads f from byte off on.
func newFileReader(f js.Value, off int64) *fileReader {
	r := &fileReader{file: f, size: int64(f.Get("size").Float()), off: off}
	r.askNext()
	return r
}

// askNext asks for the next slice; it arrives on r.ahead.
func (r *fileReader) askNext() {
	if r.off >= r.size {
		r.ahead = nil
		return
	}
	n := int64(sliceFirst)
	if r.aheadLen > 0 {
		n = int64(min(2*r.aheadLen, sliceMax))
	}
	n = min(n, r.size-r.off)
	ch := make(chan sliceResult, 1)
	var then, catch js.Func
	done := func(res sliceResult) {
		ch <- res
		then.Release()
		catch.Release()
	}
	then = js.FuncOf(func(this js.Value, args []js.Value) any {
		done(sliceResult{buf: args[0]})
		return nil
	})
	catch = js.FuncOf(func(this js.Value, args []js.Value) any {
		done(sliceResult{err: errors.New("reading the file failed: " + args[0].Call("toString").String())})
		return nil
	})
	js.Global().Call("tracewrightReadSlice", r.file, float64(r.off), float64(r.off+n)).Call("then", then, catch)
	r.off += n
	r.aheadLen = int(n)
	r.ahead = ch
}

func (r *fileReader) Read(p []byte) (int, error) {
	for len(r.buf) == 0 {
		if r.ahead == nil {
			return 0, io.EOF
		}
		res := <-r.ahead
		if res.err != nil {
			return 0, res.err
		}
		r.askNext()
		v := js.Global().Get("Uint8Array").New(res.buf)
		n := v.Get("length").Int()
		if cap(r.chunk) < n {
			// at once as large as the slices will grow: pages are touched only where written
			r.chunk = make([]byte, max(n, int(min(sliceMax, r.size))))
		}
		r.chunk = r.chunk[:n]
		js.CopyBytesToGo(r.chunk, v)
		r.buf = r.chunk
		r.sinceGC += n
		if r.sinceGC >= gcEvery {
			r.sinceGC = 0
			runtime.GC() // let go of the JS buffers read so far
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

// close forgets the slice still being read: a sniff reads only the start of a file.
func (r *fileReader) close() { r.ahead = nil }

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
